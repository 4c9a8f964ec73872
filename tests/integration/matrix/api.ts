import type { KeyMatrixRow, MatrixRow } from './types';

/**
 * Programmatic access. The owners' key management routes take sessions like the rest of
 * the studio; /api/v1 takes workspace API keys only, so every session caller gets 401
 * there (the key rows below run in matrix-keys.test.ts).
 */
const ownersOnly = (owner: number, outsider = owner) => ({ visitor: 401, member: 403, owner, staff: 403, outsider });

const keyed = (ok: number | number[], foreign: number | number[] = 404) =>
  ({ 'no key': 401, 'session cookie, no key': 401, 'revoked key': 401, 'expired key': 401, 'key without the scope': 403, "workspace B's key": foreign, key: ok }) as const;

const csv = 'speed,distance\n' + Array.from({ length: 12 }, (_, i) => `${20 + i},${(i * 7) % 5}`).join('\n') + '\n';
const features = ['avg_speed_kmh', 'weekly_distance_km'];

export const keyRows: KeyMatrixRow[] = [
  { file: 'app/api/v1/datasets/route.ts', method: 'GET', scope: 'read', url: () => '/api/v1/datasets', expect: keyed(200, 200), note: "B's key lists B's (empty) datasets" },
  {
    file: 'app/api/v1/datasets/route.ts',
    method: 'POST',
    scope: 'fit',
    url: () => '/api/v1/datasets?name=Matrix%20upload',
    raw: () => ({ body: csv, contentType: 'text/csv' }),
    expect: keyed(201, 201),
    note: "B's key uploads into B",
  },
  { file: 'app/api/v1/datasets/[id]/route.ts', method: 'GET', scope: 'read', url: (w) => `/api/v1/datasets/${w.datasetId}`, params: (w) => ({ id: String(w.datasetId) }), expect: keyed(200) },
  {
    file: 'app/api/v1/fits/route.ts',
    method: 'POST',
    scope: 'fit',
    url: () => '/api/v1/fits',
    body: (w) => ({ datasetId: w.datasetId, features, minComponents: 1, maxComponents: 2, covariances: ['diagonal'], restarts: 1 }),
    expect: keyed(202),
  },
  { file: 'app/api/v1/fits/[id]/route.ts', method: 'GET', scope: 'read', url: (w) => `/api/v1/fits/${w.fitId}`, params: (w) => ({ id: String(w.fitId) }), expect: keyed(200) },
  {
    file: 'app/api/v1/fits/[id]/ranking/route.ts',
    method: 'GET',
    scope: 'read',
    url: (w) => `/api/v1/fits/${w.fitId}/ranking`,
    params: (w) => ({ id: String(w.fitId) }),
    expect: keyed(409),
    note: "the world's fit row carries no stored result, so the right key gets 409 (rankings are read in api/v1-routes.test.ts)",
  },
  {
    file: 'app/api/v1/models/route.ts',
    method: 'POST',
    scope: 'fit',
    url: () => '/api/v1/models',
    body: (w) => ({ fitId: w.fitId, candidate: 0, name: 'From the matrix' }),
    expect: keyed(409),
    note: "the world's fit has no stored candidates (409) once the key is accepted",
  },
  { file: 'app/api/v1/models/[id]/route.ts', method: 'GET', scope: 'read', url: (w) => `/api/v1/models/${w.modelId}`, params: (w) => ({ id: String(w.modelId) }), expect: keyed(200) },
  { file: 'app/api/v1/models/[id]/route.ts', method: 'PATCH', scope: 'fit', url: (w) => `/api/v1/models/${w.modelId}`, params: (w) => ({ id: String(w.modelId) }), body: () => ({ name: 'Ride groups (by key)' }), expect: keyed(200) },
  { file: 'app/api/v1/calculators/route.ts', method: 'GET', scope: 'read', url: () => '/api/v1/calculators', expect: keyed(200, 200) },
  { file: 'app/api/v1/calculators/route.ts', method: 'POST', scope: 'publish', url: () => '/api/v1/calculators', body: (w) => ({ mixtureModelId: w.modelId, title: 'Matrix calculator' }), expect: keyed(201) },
  { file: 'app/api/v1/calculators/[id]/route.ts', method: 'GET', scope: 'read', url: (w) => `/api/v1/calculators/${w.embedId}`, params: (w) => ({ id: String(w.embedId) }), expect: keyed(200) },
  {
    file: 'app/api/v1/calculators/[id]/versions/route.ts',
    method: 'POST',
    scope: 'publish',
    url: (w) => `/api/v1/calculators/${w.embedId}/versions`,
    params: (w) => ({ id: String(w.embedId) }),
    body: () => ({ activate: false }),
    expect: keyed(201),
  },
  {
    file: 'app/api/v1/calculators/[id]/served-version/route.ts',
    method: 'PUT',
    scope: 'publish',
    url: (w) => `/api/v1/calculators/${w.embedId}/served-version`,
    params: (w) => ({ id: String(w.embedId) }),
    body: (w) => ({ versionId: w.versionId }),
    expect: keyed(200),
  },
  {
    file: 'app/api/v1/calculators/[id]/scores/route.ts',
    method: 'POST',
    scope: 'score',
    url: (w) => `/api/v1/calculators/${w.embedId}/scores`,
    params: (w) => ({ id: String(w.embedId) }),
    body: () => ({ rows: [[24.5, 130, 420]] }),
    expect: keyed(200),
    note: "B's key cannot score A's calculator",
  },
  { file: 'app/api/v1/usage/route.ts', method: 'GET', scope: 'read', url: () => '/api/v1/usage', expect: keyed(200, 200), note: "B's key reads B's usage" },
];

export const rows: MatrixRow[] = [
  { file: 'app/api/openapi.json/route.ts', method: 'GET', url: () => '/api/openapi.json', expect: { visitor: 200, member: 200, owner: 200, staff: 200, outsider: 200 }, note: 'the public API document' },
  { file: 'app/api/workspaces/current/api-keys/route.ts', method: 'GET', url: () => '/api/workspaces/current/api-keys', expect: ownersOnly(200) },
  { file: 'app/api/workspaces/current/api-keys/route.ts', method: 'POST', url: () => '/api/workspaces/current/api-keys', body: () => ({ name: 'Matrix key', scopes: ['read'] }), expect: ownersOnly(201) },
  {
    file: 'app/api/workspaces/current/api-keys/[id]/route.ts',
    method: 'DELETE',
    url: () => '/api/workspaces/current/api-keys/999999',
    params: () => ({ id: '999999' }),
    expect: ownersOnly(404),
    note: 'an id that exists nowhere; revoking is tested in api/keys.test.ts',
  },
  // Sessions never open /api/v1: every session caller gets 401, whatever its role.
  ...keyRows.map(
    (k): MatrixRow => ({
      file: k.file,
      method: k.method,
      url: k.url,
      params: k.params,
      body: k.raw ? undefined : k.body,
      expect: { visitor: 401, member: 401, owner: 401, staff: 401, outsider: 401 },
      note: 'key-authenticated: a session cookie is not a key',
    }),
  ),
];
