/**
 * The versioned JSON form of a fitted model (documented in README.md) and its loader.
 */
import { z } from 'zod';
import type { FitResult } from './em';
import { MixtureError } from './errors';
import { choleskyInto } from './linalg';
import { type Candidate } from './select';
import { logDensities, quantileSummary } from './score';
import { covToScaled } from './scaler';
import { COVARIANCES } from './types';

export const MODEL_FORMAT = 'partwise.mixture-model';
export const MODEL_VERSION = 1;

const finite = z.number().refine(Number.isFinite, 'must be a finite number');

const featureSchema = z.object({
  name: z.string().min(1, 'must not be empty'),
  unit: z.string().nullable(),
  min: finite,
  max: finite,
});

const modelSchema = z.object({
  format: z.literal(MODEL_FORMAT),
  version: z.literal(MODEL_VERSION),
  features: z.array(featureSchema).min(1, 'must list at least one feature'),
  scaler: z.object({ center: z.array(finite), scale: z.array(finite) }).nullable(),
  structure: z.enum(COVARIANCES as [string, ...string[]]),
  weights: z.array(finite).min(1, 'must have at least one component'),
  means: z.array(z.array(finite)),
  covariances: z.array(z.array(z.array(finite))),
  logLikelihood: finite,
  meanLogLikelihood: finite,
  bic: finite,
  aic: finite,
  parameters: z.number().int().positive(),
  iterations: z.number().int().nonnegative(),
  converged: z.boolean(),
  settings: z.object({
    standardized: z.boolean(),
    regCovar: finite,
    tol: finite,
    maxIter: z.number().int().positive(),
    seed: z.number().int(),
    restarts: z.number().int().positive(),
    init: z.string(),
  }),
  training: z.object({
    rows: z.number().int().positive(),
    logDensityQuantiles: z.object({ levels: z.array(finite).min(2), values: z.array(finite).min(2) }),
  }),
  /** Optional names per component, in component order (a studio download carries the analyst's labels). */
  clusters: z
    .array(z.object({ label: z.string().min(1, 'must not be empty'), description: z.string().optional(), color: z.string().optional() }))
    .optional(),
  ranking: z
    .array(
      z.object({
        rank: z.number().int().positive().nullable(),
        components: z.number().int().positive(),
        covariance: z.enum(COVARIANCES as [string, ...string[]]),
        bic: finite.nullable(),
        aic: finite.nullable(),
        logLikelihood: finite.nullable(),
        parameters: z.number().int().nullable(),
        iterations: z.number().int().nullable(),
        converged: z.boolean().nullable(),
        error: z.string().nullable(),
      }),
    )
    .optional(),
});

type RawModel = z.infer<typeof modelSchema>;
export type MixtureModel = Omit<RawModel, 'structure' | 'ranking'> & {
  structure: (typeof COVARIANCES)[number];
  ranking?: SelectionEntry[];
};
export type SelectionEntry = Omit<Candidate, 'result'>;

export interface FeatureInfo {
  name: string;
  unit?: string | null;
}

/**
 * Build the model document from a fit and the rows it was fitted on (n·d, original
 * units); computes feature ranges and the training log-density quantiles.
 */
export function buildModel(
  rows: Float64Array,
  n: number,
  d: number,
  fit: FitResult,
  opts: { features?: FeatureInfo[]; selection?: Candidate[] } = {},
): MixtureModel {
  if (fit.dimensions !== d || fit.rows !== n) {
    throw new MixtureError('BAD_INPUT', `The fit was made on ${fit.rows}×${fit.dimensions} rows, not ${n}×${d}.`);
  }
  const features = Array.from({ length: d }, (_, j) => {
    let min = Infinity;
    let max = -Infinity;
    for (let r = 0; r < n; r++) {
      const v = rows[r * d + j];
      if (v < min) min = v;
      if (v > max) max = v;
    }
    const info = opts.features?.[j];
    return { name: info?.name ?? `x${j + 1}`, unit: info?.unit ?? null, min, max };
  });
  const model: MixtureModel = {
    format: MODEL_FORMAT,
    version: MODEL_VERSION,
    features,
    scaler: fit.scaler ? { center: fit.scaler.center.slice(), scale: fit.scaler.scale.slice() } : null,
    structure: fit.covariance,
    weights: fit.weights.slice(),
    means: fit.means.map((m) => m.slice()),
    covariances: fit.covariances.map((c) => c.map((r) => r.slice())),
    logLikelihood: fit.logLikelihood,
    meanLogLikelihood: fit.meanLogLikelihood,
    bic: fit.bic,
    aic: fit.aic,
    parameters: fit.parameters,
    iterations: fit.iterations,
    converged: fit.converged,
    settings: {
      standardized: fit.standardized,
      regCovar: fit.settings.regCovar,
      tol: fit.settings.tol,
      maxIter: fit.settings.maxIter,
      seed: fit.settings.seed,
      restarts: fit.settings.restarts,
      init: fit.settings.init,
    },
    training: { rows: n, logDensityQuantiles: { levels: [0, 1], values: [0, 0] } },
  };
  if (opts.selection) model.ranking = opts.selection.map(({ result: _r, ...rest }) => rest);
  // score through a throw-away copy so the scorer cache never sees the placeholder summary
  model.training.logDensityQuantiles = quantileSummary(logDensities({ ...model }, rows, n));
  return model;
}

export function toModelJson(model: MixtureModel): string {
  return JSON.stringify(model, null, 2);
}

function fail(where: string, what: string): never {
  throw new MixtureError('BAD_MODEL', `Invalid model JSON: ${where} ${what}.`);
}

/** Parse (string or already-parsed object) and validate a model; throws MixtureError('BAD_MODEL'). */
export function parseModelJson(input: unknown): MixtureModel {
  let value = input;
  if (typeof input === 'string') {
    try {
      value = JSON.parse(input);
    } catch (e) {
      fail('the text', `is not JSON (${(e as Error).message})`);
    }
  }
  const parsed = modelSchema.safeParse(value);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const path = issue.path.length ? issue.path.map(String).join('.') : 'the document';
    fail(path, issue.message.replace(/\.$/, ''));
  }
  const m = parsed.data as MixtureModel;
  const k = m.weights.length;
  const d = m.features.length;
  if (m.clusters && m.clusters.length !== k) fail('clusters', `has ${m.clusters.length} names but there are ${k} weights`);
  if (m.means.length !== k) fail('means', `has ${m.means.length} rows but there are ${k} weights`);
  if (m.covariances.length !== k) fail('covariances', `has ${m.covariances.length} matrices but there are ${k} weights`);
  let wsum = 0;
  m.weights.forEach((w, c) => {
    if (!(w > 0)) fail(`weights.${c}`, 'must be positive');
    wsum += w;
  });
  if (Math.abs(wsum - 1) > 1e-6) fail('weights', `must sum to 1 (they sum to ${wsum})`);
  if (m.scaler) {
    if (m.scaler.center.length !== d || m.scaler.scale.length !== d) fail('scaler', `must have ${d} centers and scales`);
    m.scaler.scale.forEach((s, j) => {
      if (!(s > 0)) fail(`scaler.scale.${j}`, 'must be positive');
    });
  }
  m.features.forEach((f, j) => {
    if (f.min > f.max) fail(`features.${j}`, 'has min greater than max');
  });
  const chol = new Float64Array(d * d);
  const buf = new Float64Array(d * d);
  for (let c = 0; c < k; c++) {
    if (m.means[c].length !== d) fail(`means.${c}`, `must have ${d} values`);
    const cov = m.covariances[c];
    if (cov.length !== d || cov.some((r) => r.length !== d)) fail(`covariances.${c}`, `must be a ${d}×${d} matrix`);
    for (let i = 0; i < d; i++) {
      for (let j = 0; j < i; j++) {
        const a = cov[i][j];
        const b = cov[j][i];
        if (Math.abs(a - b) > 1e-9 * Math.sqrt(Math.abs(cov[i][i] * cov[j][j]))) fail(`covariances.${c}`, 'is not symmetric');
        if (m.structure !== 'full' && m.structure !== 'tied' && a !== 0) {
          fail(`covariances.${c}`, `must be diagonal for the ${m.structure} structure`);
        }
      }
    }
    const scaled = covToScaled(cov, m.scaler);
    for (let i = 0; i < d; i++) for (let j = 0; j < d; j++) buf[i * d + j] = scaled[i][j];
    if (!choleskyInto(buf, 0, d, chol, 0)) fail(`covariances.${c}`, 'is not positive definite');
  }
  const q = m.training.logDensityQuantiles;
  if (q.levels.length !== q.values.length) fail('training.logDensityQuantiles', 'must have as many values as levels');
  for (let i = 0; i < q.levels.length; i++) {
    if (q.levels[i] < 0 || q.levels[i] > 1) fail('training.logDensityQuantiles.levels', 'must lie in [0, 1]');
    if (i > 0 && !(q.levels[i] > q.levels[i - 1])) fail('training.logDensityQuantiles.levels', 'must increase');
    if (i > 0 && q.values[i] < q.values[i - 1]) fail('training.logDensityQuantiles.values', 'must not decrease');
  }
  return m;
}
