import type { MatrixRow } from './types';

/**
 * Calculators: studio routes are for members of the workspace (staff and outsiders see
 * nothing: 403 without a workspace, 404 for another workspace's ids); the scoring and
 * report routes are public.
 */
const studio = { visitor: 401, member: 200, owner: 200, staff: 403, outsider: 404 };

export const rows: MatrixRow[] = [
  {
    file: 'app/api/embeds/route.ts',
    method: 'GET',
    url: () => '/api/embeds',
    expect: { visitor: 401, member: 200, owner: 200, staff: 403, outsider: 200 },
    note: "lists the caller's own workspace: the outsider gets B's (empty) list",
  },
  {
    file: 'app/api/embeds/route.ts',
    method: 'POST',
    url: () => '/api/embeds',
    body: (w) => ({ mixtureModelId: w.modelId }),
    expect: { visitor: 401, member: 201, owner: 201, staff: 403, outsider: 404 },
  },
  { file: 'app/api/embeds/[id]/route.ts', method: 'GET', url: (w) => `/api/embeds/${w.embedId}`, params: (w) => ({ id: String(w.embedId) }), expect: studio },
  {
    file: 'app/api/embeds/[id]/route.ts',
    method: 'PATCH',
    url: (w) => `/api/embeds/${w.embedId}`,
    params: (w) => ({ id: String(w.embedId) }),
    body: () => ({ theme: 'light' }),
    expect: studio,
  },
  { file: 'app/api/embeds/[id]/versions/route.ts', method: 'GET', url: (w) => `/api/embeds/${w.embedId}/versions`, params: (w) => ({ id: String(w.embedId) }), expect: studio },
  {
    file: 'app/api/embeds/[id]/versions/route.ts',
    method: 'POST',
    url: (w) => `/api/embeds/${w.embedId}/versions`,
    params: (w) => ({ id: String(w.embedId) }),
    body: () => ({ activate: false }),
    expect: { ...studio, member: 201, owner: 201 },
  },
  {
    file: 'app/api/embeds/[id]/active-version/route.ts',
    method: 'PUT',
    url: (w) => `/api/embeds/${w.embedId}/active-version`,
    params: (w) => ({ id: String(w.embedId) }),
    body: (w) => ({ versionId: w.versionId }),
    expect: studio,
  },
  {
    file: 'app/api/embeds/[id]/compare/route.ts',
    method: 'GET',
    url: (w) => `/api/embeds/${w.embedId}/compare?from=${w.versionId}&to=${w.otherVersionId}`,
    params: (w) => ({ id: String(w.embedId) }),
    expect: studio,
  },
  {
    file: 'app/api/embeds/[id]/rotate/route.ts',
    method: 'POST',
    url: (w) => `/api/embeds/${w.embedId + 1}/rotate`,
    params: (w) => ({ id: String(w.embedId + 1) }),
    expect: studio,
    note: "acts on the calculator the POST /api/embeds row above published as member (the next id), so the world's own token stays valid for other areas' rows",
  },
  {
    file: 'app/api/embeds/[id]/retire/route.ts',
    method: 'POST',
    url: (w) => `/api/embeds/${w.embedId + 1}/retire`,
    params: (w) => ({ id: String(w.embedId + 1) }),
    expect: studio,
    note: 'the same published-by-member calculator as the rotate row; retiring twice is a no-op 200',
  },
  {
    file: 'app/api/score/[token]/route.ts',
    method: 'POST',
    url: () => '/api/score/NoSuchCalculatorToken_000',
    params: () => ({ token: 'NoSuchCalculatorToken_000' }),
    body: () => ({ values: { avg_speed_kmh: 20, weekly_distance_km: 50, climb_per_ride_m: 100 } }),
    expect: { visitor: 404, member: 404, owner: 404, staff: 404, outsider: 404 },
    note: 'public and the same for everyone (a session changes nothing); good answers and each refusal are in tests/integration/embeds/score.test.ts',
  },
  {
    file: 'app/api/reports/route.ts',
    method: 'POST',
    url: () => '/api/reports',
    body: (w) => ({ token: w.embedToken, reason: 'other', message: 'Checking that anyone may report.' }),
    headers: () => ({ 'x-forwarded-for': '192.0.2.200' }),
    expect: { visitor: 201, member: 201, owner: 201, staff: 201, outsider: 201 },
    note: 'public abuse intake; rate-limited per address (5 in a burst, exactly the callers here)',
  },
];
