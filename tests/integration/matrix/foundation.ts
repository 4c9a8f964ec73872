import type { Exemption, MatrixRow } from './types';

export const rows: MatrixRow[] = [
  {
    file: 'app/api/health/route.ts',
    method: 'GET',
    url: () => '/api/health',
    expect: { visitor: 200, member: 200, owner: 200, staff: 200, outsider: 200 },
    note: 'public: load balancers and uptime checks call it',
  },
  ...(['GET', 'POST', 'PUT', 'PATCH', 'DELETE'] as const).map((method) => ({
    file: 'app/api/[[...rest]]/route.ts',
    method,
    url: () => '/api/no-such-thing/12',
    params: () => ({ rest: ['no-such-thing', '12'] }),
    expect: { visitor: 404, member: 404, owner: 404, staff: 404, outsider: 404 },
    note: 'unknown /api addresses: the JSON 404 for everyone',
  })),
];

export const exemptions: Exemption[] = [
  { file: 'app/api/auth/[...nextauth]/route.ts', why: "next-auth's own protocol handler (sign-in, CSRF, session); it needs Next's request context and is exercised by the browser sign-in test" },
];
