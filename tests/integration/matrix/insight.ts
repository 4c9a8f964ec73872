import type { MatrixRow } from './types';

/**
 * Answer insight: the report, the switch, the export and each member's weekly mail are
 * for members of the calculator's workspace (403 without one, 404 for another's ids).
 */
const studio = { visitor: 401, member: 200, owner: 200, staff: 403, outsider: 404 };
const params = (w: { embedId: number }) => ({ id: String(w.embedId) });

export const rows: MatrixRow[] = [
  { file: 'app/api/embeds/[id]/insight/route.ts', method: 'GET', url: (w) => `/api/embeds/${w.embedId}/insight?days=30`, params, expect: studio },
  {
    file: 'app/api/embeds/[id]/insight/route.ts',
    method: 'PUT',
    url: (w) => `/api/embeds/${w.embedId}/insight`,
    params,
    body: () => ({ enabled: true }),
    expect: studio,
    note: 'members switch insight like the other calculator settings (PATCH /api/embeds/[id] is for members too)',
  },
  { file: 'app/api/embeds/[id]/insight/export/route.ts', method: 'GET', url: (w) => `/api/embeds/${w.embedId}/insight/export`, params, expect: studio },
  {
    file: 'app/api/embeds/[id]/insight/alerts/route.ts',
    method: 'PUT',
    url: (w) => `/api/embeds/${w.embedId}/insight/alerts`,
    params,
    body: () => ({ subscribed: true, driftThreshold: 0.2, unusualShare: 0.1 }),
    expect: studio,
    note: "each member's own mail settings",
  },
];
