import type { Exemption, MatrixRow } from './types';

export const rows: MatrixRow[] = [
  {
    file: 'app/api/health/route.ts',
    method: 'GET',
    url: () => '/api/health',
    expect: { visitor: 200, member: 200, owner: 200, staff: 200, outsider: 200 },
    note: 'public: load balancers and uptime checks call it',
  },
];

export const exemptions: Exemption[] = [
  { file: 'app/api/auth/[...nextauth]/route.ts', why: "next-auth's own protocol handler (sign-in, CSRF, session); it needs Next's request context and is exercised by the browser sign-in test" },
];
