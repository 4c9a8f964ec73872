/**
 * What the /api/v1 routes answer, as zod schemas for the OpenAPI document only (the
 * request schemas are the routes' own, imported from the lib modules). Field lists
 * follow the lib views they describe: datasetSummary, fitView, rankingView, modelView,
 * describeEmbed, describeVersion, usageReport.
 */
import { z } from 'zod';
import { API_KEY_SCOPES } from '@/models/api-key-scopes';
import { FIT_STATUSES } from '@/models/Fit';

const when = z.string().meta({ format: 'date-time', description: 'ISO 8601, UTC.' });

export const errorResponse = z
  .object({
    error: z.object({
      code: z.string().meta({ description: 'bad_request, invalid_input, unauthenticated, forbidden, not_found, conflict, plan_limit, …' }),
      message: z.string().meta({ description: 'What went wrong, in words a person reads.' }),
      issues: z.array(z.object({ field: z.string().meta({ description: 'Dotted path of the field, e.g. clusters.0.color.' }), message: z.string(), suggestion: z.string().optional() })).optional(),
    }),
  })
  .meta({ id: 'Error' });

const column = z.object({ name: z.string(), kind: z.enum(['numeric', 'text']), displayName: z.string().optional(), unit: z.string().optional(), inputMin: z.number().optional(), inputMax: z.number().optional() }).passthrough();

export const datasetListItem = z
  .object({ id: z.number().int(), number: z.number().int(), name: z.string(), originalFilename: z.string(), rowCount: z.number().int(), numericColumns: z.number().int(), columns: z.number().int(), createdAt: when })
  .meta({ id: 'DatasetListItem' });

export const dataset = z
  .object({
    id: z.number().int(),
    number: z.number().int(),
    name: z.string(),
    originalFilename: z.string(),
    rowCount: z.number().int(),
    bytes: z.number().int().nullable(),
    columns: z.array(column),
    preview: z.array(z.array(z.union([z.string(), z.number(), z.null()]))).meta({ description: 'The first rows, cell by cell.' }),
    createdAt: when,
    updatedAt: when,
  })
  .meta({ id: 'Dataset' });

export const fit = z
  .object({
    id: z.number().int(),
    number: z.number().int(),
    datasetId: z.number().int(),
    status: z.enum(FIT_STATUSES),
    params: z.record(z.string(), z.unknown()).meta({ description: 'The settings as stored, with rows used and dropped.' }),
    progress: z.record(z.string(), z.unknown()).nullable().meta({ description: 'phase, fraction (0–1), candidate, iteration, …' }),
    error: z.string().nullable(),
    cancelRequested: z.boolean(),
    queuePosition: z.number().int().nullable().meta({ description: 'Fits expected to start before this waiting one; null unless queued.' }),
    startedAt: when.nullable(),
    finishedAt: when.nullable(),
    createdAt: when,
    result: z.record(z.string(), z.unknown()).nullable().meta({ description: 'Once succeeded: the ranked candidates with their traces. GET …/ranking is the compact form.' }),
  })
  .meta({ id: 'Fit' });

export const ranking = z
  .object({
    fitId: z.number().int(),
    criterion: z.literal('bic'),
    rows: z.number().int(),
    features: z.array(z.string()),
    candidates: z.array(
      z.object({
        index: z.number().int().meta({ description: 'Send this as `candidate` to POST /api/v1/models.' }),
        rank: z.number().int().nullable().meta({ description: '1 = lowest BIC; null for a candidate that could not be fitted.' }),
        components: z.number().int(),
        covariance: z.enum(['full', 'diagonal', 'spherical', 'tied']),
        bic: z.number().nullable(),
        aic: z.number().nullable(),
        logLikelihood: z.number().nullable(),
        parameters: z.number().int().nullable(),
        iterations: z.number().int().nullable(),
        converged: z.boolean().nullable(),
        error: z.string().nullable(),
      }),
    ),
  })
  .meta({ id: 'Ranking' });

export const model = z
  .object({
    id: z.number().int(),
    name: z.string(),
    fitId: z.number().int().nullable(),
    datasetId: z.number().int().nullable(),
    clusters: z.array(z.object({ label: z.string(), description: z.string(), color: z.string() })),
    fields: z.array(z.object({ feature: z.string(), label: z.string(), unit: z.string(), min: z.number(), max: z.number(), help: z.string(), optional: z.boolean().optional() })),
    caution: z.string().nullable(),
    selectionNote: z.string(),
    model: z.record(z.string(), z.unknown()).meta({ description: 'The engine model JSON (v1): weights, means, covariances, scaler, features.' }),
    createdAt: when,
    updatedAt: when,
  })
  .meta({ id: 'Model' });

export const calculator = z
  .object({
    id: z.number().int(),
    token: z.string().meta({ description: 'The public address part: /embed/{token} and POST /api/score/{token}.' }),
    title: z.string(),
    status: z.string().meta({ description: 'live, disabled or retired.' }),
    mixtureModelId: z.number().int().nullable(),
    activeVersionId: z.number().int().nullable().meta({ description: 'The version served.' }),
    allowedOrigins: z.array(z.string()),
    theme: z.enum(['light', 'dark']),
    accentColor: z.string(),
    typicalityThreshold: z.number(),
    language: z.string(),
    disabledReason: z.string().nullable(),
    createdAt: when,
    updatedAt: when,
  })
  .meta({ id: 'Calculator' });

export const version = z.object({ id: z.number().int(), number: z.number().int(), mixtureModelId: z.number().int().nullable(), checksum: z.string(), createdAt: when }).meta({ id: 'Version' });

export const usage = z
  .object({
    period: z.string().meta({ description: 'The month, YYYY-MM (UTC).' }),
    plan: z.object({ id: z.string(), name: z.string() }),
    answers: z.object({ used: z.number().int(), allowance: z.number().int(), state: z.string(), pauseAt: z.number().int() }),
    calculators: z.array(z.object({ calculatorId: z.number().int(), title: z.string(), status: z.string(), answers: z.number().int() })),
    meters: z.array(z.object({ key: z.string(), label: z.string(), used: z.number(), limit: z.number(), unit: z.enum(['count', 'bytes']), note: z.string() })),
  })
  .meta({ id: 'Usage' });

export const scoreAnswer = z
  .object({
    version: z.number().int(),
    probabilities: z.array(z.object({ index: z.number().int(), label: z.string(), color: z.string(), probability: z.number() })),
    best: z.object({ index: z.number().int(), label: z.string(), description: z.string(), probability: z.number() }),
    logDensity: z.number(),
    typicality: z.number().meta({ description: 'Percentile (0–100) of these values’ log density among the model’s own sample: low means unlike the data.' }),
    unusual: z.boolean(),
    threshold: z.number(),
    used: z.array(z.string()),
    unused: z.array(z.string()),
    reason: z.record(z.string(), z.unknown()).nullable(),
  })
  .meta({ id: 'ScoreAnswer' });

/** A batch's rows as JSON. */
export const batchRows = z
  .object({
    rows: z
      .array(z.union([z.array(z.number().nullable()), z.record(z.string(), z.number().nullable())]))
      .meta({ description: 'Each row an array in the model’s field order, or an object keyed by field name; null leaves an optional field blank.', example: [[27.5, 140, 420], { avg_speed_kmh: 19, weekly_distance_km: 60, climb_per_ride_m: null }] }),
  })
  .strict()
  .meta({ id: 'BatchRows' });

export const batchAnswer = z
  .object({
    version: z.number().int().meta({ description: 'The version that scored the rows.' }),
    groups: z.array(z.object({ index: z.number().int(), label: z.string() })),
    count: z.number().int(),
    rows: z.array(
      z.object({
        row: z.number().int().meta({ description: 'The row’s place in the batch, from 1.' }),
        probabilities: z.array(z.number()).meta({ description: 'Membership probability per group, in group order, to 6 decimals.' }),
        best: z.number().int().meta({ description: 'Index of the most likely group.' }),
        logDensity: z.number(),
        typicality: z.number().meta({ description: 'Percentile (0–100) among the model’s own sample.' }),
        unusual: z.boolean().meta({ description: 'Typicality below the calculator’s threshold.' }),
      }),
    ),
  })
  .meta({ id: 'BatchAnswer' });

export const scopeList = z.array(z.enum(API_KEY_SCOPES));
