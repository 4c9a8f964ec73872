/**
 * The OpenAPI 3.1 document of the public API: every /api/v1 route and the public scoring
 * route, generated from the zod schemas the routes validate with (imported from the lib
 * modules, never copied). tests/integration/api/openapi.test.ts fails when a route file
 * on disk has no operation here, or an operation has no route file.
 *
 * Words for readers go on with zod's own `.meta()`, which zod-to-openapi v9 reads.
 * Not `.openapi()` (extendZodWithOpenApi): that patches ZodType's prototype, and zod 4
 * copies prototype methods onto a schema only when it is made, so the lib modules'
 * schemas, made before this module loads in the production bundle, never got it.
 */
import { OpenAPIRegistry, OpenApiGeneratorV31, type RouteConfig } from '@asteasolutions/zod-to-openapi';
import { z } from 'zod';
import { datasetPreviewQuery, datasetUploadQuery, fitWaitQuery, MAX_WAIT_SECONDS } from '@/lib/api/v1';
import { publishSchema, publishVersionSchema, servedVersionSchema } from '@/lib/embeds/service';
import { createModelSchema, updateModelSchema } from '@/lib/fitting/models';
import { fitParamsSchema } from '@/lib/fitting/params';
import { idParam } from '@/lib/http/handler';
import { MAX_SCORE_BODY_BYTES, scoreBodySchema, scoreTokenParam } from '@/lib/scoring';
import { batchQuery } from '@/lib/scoring/batch-service';
import { BATCH_ROWS_PER_REQUEST } from '@/lib/plans';
import { SCOPE_WORDS } from '@/lib/auth/api-key-schemas';
import type { ApiKeyScope } from '@/models/api-key-scopes';
import * as out from './schemas';

export const TAGS = [
  { name: 'Datasets', description: 'Tables of measurements, uploaded as CSV.' },
  { name: 'Fits', description: 'Model searches over a dataset: components × covariance structures, ranked by BIC.' },
  { name: 'Models', description: 'A candidate kept from a fit, with cluster names and calculator fields.' },
  { name: 'Calculators', description: 'Published models: immutable versions, one of them served.' },
  { name: 'Usage', description: 'Answers this month against the plan.' },
  { name: 'Scoring', description: 'The public route every calculator answers through.' },
] as const;
type Tag = (typeof TAGS)[number]['name'];

/** The extension each key-authenticated operation carries: the scope its key needs. */
export const SCOPE_EXTENSION = 'x-partwise-scope';

const idPath = z.object({ id: idParam.shape.id.meta({ description: 'A decimal id, like 12.', pattern: '^[1-9][0-9]{0,15}$', example: '12' }) });

// The routes' own query and body schemas, with words for the reader on their fields.
const waitQuery = z.object({ wait: fitWaitQuery.shape.wait.meta({ description: `Seconds to wait for the fit to finish, 0–${MAX_WAIT_SECONDS}; left out, the answer comes at once.`, pattern: '^(0|[1-9][0-9]?)$', example: '30' }) }).strict();
const previewQuery = z.object({ preview: datasetPreviewQuery.shape.preview.meta({ description: 'How many rows to include as a preview, 0–200.', pattern: '^(0|[1-9][0-9]{0,2})$', default: '20' }) }).strict();
const uploadQuery = z
  .object({
    name: datasetUploadQuery.shape.name.meta({ description: 'The dataset’s name (else taken from the file name).', example: 'Rides, week 49' }),
    filename: datasetUploadQuery.shape.filename.meta({ description: 'The file name to keep with it.', example: 'rides.csv' }),
  })
  .strict();
const scoreBody = z
  .object({
    values: scoreBodySchema.shape.values.meta({
      type: 'object',
      additionalProperties: { type: ['number', 'null'] },
      description: 'Feature name → value, for the fields of the served version; null (or left out) for a blank optional field.',
    }),
  })
  .strict();

const json = (schema: z.ZodType, description: string) => ({ description, content: { 'application/json': { schema } } });
const refusal = (description: string) => json(out.errorResponse, description);

/** The answers every key-authenticated operation may give besides its own. */
const keyRefusals = {
  401: refusal('No key, or a key that is unknown, revoked or expired (the message says which). A session cookie is not a key.'),
  403: refusal('The key lacks the scope this operation needs, or its workspace is suspended.'),
};
const badInput = { 422: refusal('Bad input: `issues` names each field and why. Nothing was written.') };
const notFound = { 404: refusal('No such thing in the key’s workspace (ids of other workspaces are not found either).') };

interface Operation {
  method: 'get' | 'post' | 'put' | 'patch' | 'delete';
  path: string;
  tag: Tag;
  summary: string;
  description?: string;
  /** The scope a key needs; null for the public scoring route, which takes no key. */
  scope: ApiKeyScope | null;
  request?: RouteConfig['request'];
  responses: RouteConfig['responses'];
}

const operations: Operation[] = [
  {
    method: 'post',
    path: '/api/v1/datasets',
    tag: 'Datasets',
    summary: 'Upload a dataset',
    description: 'Send the table as the body with `Content-Type: text/csv` (a header row, then one row per record). The plan’s upload size and row limits apply.',
    scope: 'fit',
    request: { query: uploadQuery, body: { required: true, description: 'The CSV table.', content: { 'text/csv': { schema: z.string().meta({ example: 'avg_speed_kmh,weekly_distance_km\n27.5,140\n' }) } } } },
    responses: { 201: json(z.object({ dataset: out.dataset }), 'The dataset as stored.'), ...keyRefusals, ...badInput, 402: refusal('Over a plan limit (rows or size).'), 413: refusal('Larger than the plan’s upload size.'), 415: refusal('Not a text/csv body.') },
  },
  { method: 'get', path: '/api/v1/datasets', tag: 'Datasets', summary: 'List datasets', scope: 'read', responses: { 200: json(z.object({ datasets: z.array(out.datasetListItem) }), 'Newest first.'), ...keyRefusals } },
  {
    method: 'get',
    path: '/api/v1/datasets/{id}',
    tag: 'Datasets',
    summary: 'Read a dataset',
    scope: 'read',
    request: { params: idPath, query: previewQuery },
    responses: { 200: json(z.object({ dataset: out.dataset }), 'Columns and the first rows.'), ...keyRefusals, ...notFound, ...badInput },
  },
  {
    method: 'post',
    path: '/api/v1/fits',
    tag: 'Fits',
    summary: 'Start a fit',
    description: 'Queues a model search over the chosen numeric columns. Answers at once (202); poll or wait with GET /api/v1/fits/{id}?wait=30. The plan caps fits waiting or running at once.',
    scope: 'fit',
    request: { body: { required: true, content: { 'application/json': { schema: fitParamsSchema } } } },
    responses: { 202: json(z.object({ fit: out.fit }), 'Queued (or already running).'), ...keyRefusals, ...notFound, ...badInput, 429: refusal('The plan’s limit of fits at once is reached.') },
  },
  {
    method: 'get',
    path: '/api/v1/fits/{id}',
    tag: 'Fits',
    summary: 'Read (or wait for) a fit',
    description: `Status and progress. With \`?wait=N\` (at most ${MAX_WAIT_SECONDS}) the answer comes when the fit has finished or after N seconds, whichever is first.`,
    scope: 'read',
    request: { params: idPath, query: waitQuery },
    responses: { 200: json(z.object({ fit: out.fit }), 'The fit now.'), ...keyRefusals, ...notFound, ...badInput },
  },
  {
    method: 'get',
    path: '/api/v1/fits/{id}/ranking',
    tag: 'Fits',
    summary: 'Read a fit’s ranking',
    description: 'The candidates of a finished fit, lowest BIC first, with AIC beside it.',
    scope: 'read',
    request: { params: idPath },
    responses: { 200: json(z.object({ ranking: out.ranking }), 'Ranked candidates.'), ...keyRefusals, ...notFound, 409: refusal('The fit has not finished, or failed.') },
  },
  {
    method: 'post',
    path: '/api/v1/models',
    tag: 'Models',
    summary: 'Keep a candidate as a model',
    description: '`candidate` is the `index` from the ranking. Choosing any candidate but the BIC winner needs a `selectionNote` saying why.',
    scope: 'fit',
    request: { body: { required: true, content: { 'application/json': { schema: createModelSchema } } } },
    responses: { 201: json(z.object({ model: out.model }), 'The named model.'), ...keyRefusals, ...notFound, ...badInput, 409: refusal('The fit has no results yet.') },
  },
  { method: 'get', path: '/api/v1/models/{id}', tag: 'Models', summary: 'Read a model', scope: 'read', request: { params: idPath }, responses: { 200: json(z.object({ model: out.model }), 'The model.'), ...keyRefusals, ...notFound } },
  {
    method: 'patch',
    path: '/api/v1/models/{id}',
    tag: 'Models',
    summary: 'Name clusters, set fields',
    description: 'The studio’s model editor schema: send `clusters` with one entry per cluster, `fields` with one per feature in the model’s order; any part may be left out.',
    scope: 'fit',
    request: { params: idPath, body: { required: true, content: { 'application/json': { schema: updateModelSchema } } } },
    responses: { 200: json(z.object({ model: out.model }), 'The model as saved.'), ...keyRefusals, ...notFound, ...badInput },
  },
  { method: 'get', path: '/api/v1/calculators', tag: 'Calculators', summary: 'List calculators', scope: 'read', responses: { 200: json(z.object({ calculators: z.array(out.calculator) }), 'Newest first.'), ...keyRefusals } },
  {
    method: 'post',
    path: '/api/v1/calculators',
    tag: 'Calculators',
    summary: 'Publish a new calculator',
    description: 'Its first version is served at once at a new address. The plan limits how many calculators may be live.',
    scope: 'publish',
    request: { body: { required: true, content: { 'application/json': { schema: publishSchema } } } },
    responses: { 201: json(z.object({ calculator: out.calculator, version: out.version }), 'The calculator and its first version.'), ...keyRefusals, ...notFound, ...badInput, 402: refusal('The plan’s calculator limit is reached.') },
  },
  {
    method: 'get',
    path: '/api/v1/calculators/{id}',
    tag: 'Calculators',
    summary: 'Read a calculator and its versions',
    scope: 'read',
    request: { params: idPath },
    responses: { 200: json(z.object({ calculator: out.calculator, versions: z.array(out.version) }), 'Versions newest first; activeVersionId is the one served.'), ...keyRefusals, ...notFound },
  },
  {
    method: 'post',
    path: '/api/v1/calculators/{id}/versions',
    tag: 'Calculators',
    summary: 'Publish a new version',
    description: 'A new immutable snapshot of the calculator’s model (or of `mixtureModelId`), served at once unless `activate` is false.',
    scope: 'publish',
    request: { params: idPath, body: { required: true, content: { 'application/json': { schema: publishVersionSchema } } } },
    responses: { 201: json(z.object({ calculator: out.calculator, version: out.version }), 'The new version.'), ...keyRefusals, ...notFound, ...badInput, 409: refusal('The calculator is retired.') },
  },
  {
    method: 'put',
    path: '/api/v1/calculators/{id}/served-version',
    tag: 'Calculators',
    summary: 'Serve a version (or roll back)',
    scope: 'publish',
    request: { params: idPath, body: { required: true, content: { 'application/json': { schema: servedVersionSchema } } } },
    responses: { 200: json(z.object({ calculator: out.calculator }), 'The calculator, serving the version.'), ...keyRefusals, ...notFound, ...badInput, 409: refusal('The calculator is retired, or the version is damaged.') },
  },
  {
    method: 'post',
    path: '/api/v1/calculators/{id}/scores',
    tag: 'Calculators',
    summary: 'Score a batch of rows',
    description: `Rows scored against the served version, one metered answer per row. Send \`text/csv\` (a header naming the model's fields; extra columns are ignored) or \`application/json\` ({"rows": [...]}: arrays in the model's field order, or objects keyed by field name; null leaves an optional field blank). The answer is JSON unless \`?format=csv\` or \`Accept: text/csv\`, and streams as it is written. Per request: ${Object.entries(BATCH_ROWS_PER_REQUEST).map(([plan, rows]) => `${plan} ${rows.toLocaleString('en')} rows`).join(', ')}; a batch with more rows than answers left this month is refused whole.`,
    scope: 'score',
    request: {
      params: idPath,
      query: z.object({ format: batchQuery.shape.format.meta({ description: 'csv or json; left out, the Accept header decides (JSON by default).', example: 'csv' }) }).strict(),
      body: {
        required: true,
        content: {
          'text/csv': { schema: z.string().meta({ example: 'avg_speed_kmh,weekly_distance_km,climb_per_ride_m\n27.5,140,420\n19,60,150\n' }) },
          'application/json': { schema: out.batchRows },
        },
      },
    },
    responses: {
      200: {
        description: 'One answer per row, in the order sent.',
        content: { 'application/json': { schema: out.batchAnswer }, 'text/csv': { schema: z.string().meta({ example: 'row,p Easy social,p Fast pack,best,log_density,typicality,unusual\n1,0.91,0.09,Easy social,-9.8412,41.5,0\n' }) } },
      },
      ...keyRefusals,
      ...notFound,
      ...badInput,
      402: refusal('More rows than the plan takes per request, or than answers left this month. Nothing was scored.'),
      409: refusal('The calculator serves no version, or is disabled.'),
      413: refusal('The body is larger than the plan allows.'),
      415: refusal('Neither text/csv nor application/json.'),
    },
  },
  { method: 'get', path: '/api/v1/usage', tag: 'Usage', summary: 'Read this month’s usage', scope: 'read', responses: { 200: json(z.object({ usage: out.usage }), 'Answers per calculator and the plan’s allowance.'), ...keyRefusals } },
  {
    method: 'post',
    path: '/api/score/{token}',
    tag: 'Scoring',
    summary: 'Score one visitor’s values',
    description: `Public: no key. The calculator page and host pages on the calculator’s allowed sites call it; servers may too. \`values\` maps each field’s feature name to a number (null leaves an optional field blank). Bodies are at most ${MAX_SCORE_BODY_BYTES} bytes; answers are rate-limited and metered against the plan.`,
    scope: null,
    request: {
      params: z.object({ token: scoreTokenParam.shape.token.meta({ description: 'The calculator’s token.', example: 'MatrixToken_abcdefghijklmn' }) }),
      body: { required: true, content: { 'application/json': { schema: scoreBody.meta({ example: { values: { avg_speed_kmh: 27.5, weekly_distance_km: 140 } } }) } } },
    },
    responses: {
      200: json(out.scoreAnswer, 'Membership probabilities, the best group, typicality and the reason.'),
      403: refusal('A browser call from a site the calculator does not allow.'),
      404: refusal('No calculator at this address.'),
      410: refusal('The calculator is not available.'),
      ...badInput,
      429: refusal('Too many answers; see Retry-After.'),
      503: refusal('The workspace’s answers are paused for this month; see Retry-After.'),
    },
  },
];

function buildDocument() {
  const registry = new OpenAPIRegistry();
  registry.registerComponent('securitySchemes', 'apiKey', {
    type: 'http',
    scheme: 'bearer',
    description: 'A workspace API key (`pwk_…`), made by an owner under Studio → API keys, sent as `Authorization: Bearer pwk_…`. Cookies are never read.',
  });
  for (const op of operations) {
    registry.registerPath({
      method: op.method,
      path: op.path,
      tags: [op.tag],
      summary: op.summary,
      description: op.scope ? `${op.description ? `${op.description}\n\n` : ''}Needs a key with the \`${op.scope}\` scope (${SCOPE_WORDS[op.scope]}).` : op.description,
      operationId: `${op.method}${op.path.replace(/\{(\w+)\}/g, 'By_$1').replace(/[^A-Za-z0-9]+(\w)?/g, (_, c: string | undefined) => (c ? c.toUpperCase() : ''))}`,
      security: op.scope ? [{ apiKey: [] }] : [],
      [SCOPE_EXTENSION]: op.scope ?? undefined,
      request: op.request,
      responses: op.responses,
    } as RouteConfig);
  }
  return new OpenApiGeneratorV31(registry.definitions).generateDocument({
    openapi: '3.1.0',
    info: {
      title: 'Partwise API',
      version: '1.0.0',
      description: 'Upload tables, fit Gaussian mixture models, publish them as calculators and read usage, from your own scripts. Authenticate with a workspace API key.',
    },
    tags: TAGS.map((t) => ({ ...t })),
  });
}

export type OpenApiDocument = ReturnType<typeof buildDocument>;

let cached: OpenApiDocument | null = null;
/** The document, built once per process (the schemas do not change while it runs). */
export function openApiDocument(): OpenApiDocument {
  cached ??= buildDocument();
  return cached;
}
