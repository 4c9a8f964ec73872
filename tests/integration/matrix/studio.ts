import type { MatrixRow } from './types';

/** Studio: datasets, fits, named models. Members and owners of A may do all; staff may not read datasets. */
const studio = { visitor: 401, member: 200, owner: 200, staff: 403, outsider: 404 } as const;
const list = { visitor: 401, member: 200, owner: 200, staff: 403, outsider: 200 } as const;
const csv = 'a,b\n' + Array.from({ length: 12 }, (_, i) => `${i},${(i * 7) % 5}`).join('\n') + '\n';

export const rows: MatrixRow[] = [
  { file: 'app/api/datasets/route.ts', method: 'GET', url: () => '/api/datasets', expect: list, note: 'outsiders see their own (empty) list' },
  {
    file: 'app/api/datasets/route.ts',
    method: 'POST',
    url: () => '/api/datasets?name=Matrix%20upload',
    headers: () => ({ 'content-type': 'text/csv' }),
    body: () => undefined,
    expect: { visitor: 401, member: 400, owner: 400, staff: 403, outsider: 400 },
    note: 'the harness sends no CSV body; the empty body is refused (400) only after the role check; uploads are tested in studio/datasets.test.ts',
  },
  { file: 'app/api/datasets/[id]/route.ts', method: 'GET', url: (w) => `/api/datasets/${w.datasetId}`, params: (w) => ({ id: String(w.datasetId) }), expect: studio },
  {
    file: 'app/api/datasets/[id]/route.ts',
    method: 'PATCH',
    url: (w) => `/api/datasets/${w.datasetId}`,
    params: (w) => ({ id: String(w.datasetId) }),
    body: () => ({ name: 'Rides (renamed)' }),
    expect: studio,
  },
  {
    file: 'app/api/datasets/[id]/route.ts',
    method: 'DELETE',
    url: () => '/api/datasets/999999',
    params: () => ({ id: '999999' }),
    expect: { visitor: 401, member: 404, owner: 404, staff: 403, outsider: 404 },
    note: 'an id that exists nowhere, so the shared world keeps its dataset; deletion itself is tested in studio/datasets.test.ts',
  },
  { file: 'app/api/fits/route.ts', method: 'GET', url: () => '/api/fits', expect: list },
  {
    file: 'app/api/fits/route.ts',
    method: 'POST',
    url: () => '/api/fits',
    body: (w) => ({ datasetId: w.datasetId, features: ['avg_speed_kmh', 'weekly_distance_km'], minComponents: 1, maxComponents: 2, covariances: ['diagonal'], restarts: 1 }),
    expect: { visitor: 401, member: 202, owner: 202, staff: 403, outsider: 404 },
  },
  { file: 'app/api/fits/[id]/route.ts', method: 'GET', url: (w) => `/api/fits/${w.fitId}`, params: (w) => ({ id: String(w.fitId) }), expect: studio },
  {
    file: 'app/api/fits/[id]/cancel/route.ts',
    method: 'POST',
    url: (w) => `/api/fits/${w.fitId}/cancel`,
    params: (w) => ({ id: String(w.fitId) }),
    expect: { visitor: 401, member: 409, owner: 409, staff: 403, outsider: 404 },
    note: "the world's fit has finished, so there is nothing to cancel (409) once the role check passes",
  },
  {
    file: 'app/api/fits/[id]/review/route.ts',
    method: 'GET',
    url: (w) => `/api/fits/${w.fitId}/review`,
    params: (w) => ({ id: String(w.fitId) }),
    expect: { visitor: 401, member: [200, 409], owner: [200, 409], staff: 403, outsider: 404 },
    note: "the world's fit row carries no stored result, so members get 409",
  },
  { file: 'app/api/models/route.ts', method: 'GET', url: () => '/api/models', expect: list },
  {
    file: 'app/api/models/route.ts',
    method: 'POST',
    url: () => '/api/models',
    body: (w) => ({ fitId: w.fitId, candidate: 0, name: 'From the matrix' }),
    expect: { visitor: 401, member: [201, 409], owner: [201, 409], staff: 403, outsider: 404 },
    note: "the world's fit row carries no stored result, so members get 409",
  },
  { file: 'app/api/models/[id]/route.ts', method: 'GET', url: (w) => `/api/models/${w.modelId}`, params: (w) => ({ id: String(w.modelId) }), expect: studio },
  {
    file: 'app/api/models/[id]/route.ts',
    method: 'PATCH',
    url: (w) => `/api/models/${w.modelId}`,
    params: (w) => ({ id: String(w.modelId) }),
    body: () => ({ caution: 'Similarity to groups in our ride logs, not advice.' }),
    expect: studio,
  },
  { file: 'app/api/models/[id]/review/route.ts', method: 'GET', url: (w) => `/api/models/${w.modelId}/review`, params: (w) => ({ id: String(w.modelId) }), expect: studio },
  { file: 'app/api/models/[id]/download/route.ts', method: 'GET', url: (w) => `/api/models/${w.modelId}/download`, params: (w) => ({ id: String(w.modelId) }), expect: studio },
];
