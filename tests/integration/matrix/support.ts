import type { Caller, MatrixRow } from './types';

/**
 * Support routes: staff only. Visitors 401; members, owners and outsiders 403 before
 * any input is read. Rows run in order against one world, so a disable is followed
 * by an enable and a suspension by a restore, leaving the world as it was.
 */
const staffOnly = (staff: number | number[]): Record<Caller, number | number[]> => ({ visitor: 401, member: 403, owner: 403, staff, outsider: 403 });
const reason = () => ({ reason: 'Matrix check of the support routes.' });

export const rows: MatrixRow[] = [
  { file: 'app/api/support/calculators/route.ts', method: 'GET', url: () => '/api/support/calculators?q=matrix&sort=openReports&dir=desc&page=1', expect: staffOnly(200) },
  { file: 'app/api/support/calculators/[id]/route.ts', method: 'GET', url: (w) => `/api/support/calculators/${w.embedId}`, params: (w) => ({ id: String(w.embedId) }), expect: staffOnly(200) },
  { file: 'app/api/support/calculators/[id]/disable/route.ts', method: 'POST', url: (w) => `/api/support/calculators/${w.embedId}/disable`, params: (w) => ({ id: String(w.embedId) }), body: reason, expect: staffOnly(200) },
  { file: 'app/api/support/calculators/[id]/enable/route.ts', method: 'POST', url: (w) => `/api/support/calculators/${w.embedId}/enable`, params: (w) => ({ id: String(w.embedId) }), body: reason, expect: staffOnly(200) },
  {
    file: 'app/api/support/calculators/[id]/clear-flag/route.ts',
    method: 'POST',
    url: (w) => `/api/support/calculators/${w.embedId}/clear-flag`,
    params: (w) => ({ id: String(w.embedId) }),
    body: () => ({ note: 'Reviewed.' }),
    expect: staffOnly(409),
    note: "the world's calculator is not flagged: 409 shows staff passed the role check",
  },
  {
    file: 'app/api/support/reports/[id]/route.ts',
    method: 'PATCH',
    url: () => '/api/support/reports/1',
    params: () => ({ id: '1' }),
    body: () => ({ status: 'closed' }),
    expect: staffOnly([200, 404]),
    note: 'the world may hold no abuse report: 404 shows staff passed the role check',
  },
  { file: 'app/api/support/workspaces/[id]/suspend/route.ts', method: 'POST', url: (w) => `/api/support/workspaces/${w.workspaceId}/suspend`, params: (w) => ({ id: String(w.workspaceId) }), body: reason, expect: staffOnly(200) },
  { file: 'app/api/support/workspaces/[id]/restore/route.ts', method: 'POST', url: (w) => `/api/support/workspaces/${w.workspaceId}/restore`, params: (w) => ({ id: String(w.workspaceId) }), body: reason, expect: staffOnly(200) },
  { file: 'app/api/support/audit/route.ts', method: 'GET', url: () => '/api/support/audit?action=support.&page=1', expect: staffOnly(200) },
  { file: 'app/api/support/sweep/route.ts', method: 'POST', url: () => '/api/support/sweep', expect: staffOnly(200) },
];
