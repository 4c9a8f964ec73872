/**
 * Scoring a fitted model: posterior membership probabilities, log density (original
 * units) and typicality — the percentile of the row's log density among the training
 * rows' log densities, read off the model's stored quantile summary by linear
 * interpolation. Low typicality (default < 1) flags a row that fits no cluster well.
 */
import { MixtureError } from './errors';
import { KERNEL_QUADRATIC, KERNEL_QUADRATIC_DIAGONAL, passQuadratic, posteriorPass, scratchLength } from './estep';
import { allocFactors, type Factors, prepareFactors } from './mstep';
import { covToScaled, logJacobian, meanToScaled, type ScalerParams } from './scaler';
import { type Covariance, type Gaussians, isDiagonalStructure } from './types';

/** Probability levels of the stored log-density quantiles (denser in the lower tail). */
export const QUANTILE_LEVELS: readonly number[] = [
  0, 0.001, 0.0025, 0.005, 0.01, 0.02, 0.03, 0.05, 0.075, 0.1, 0.15, 0.2, 0.25, 0.3, 0.35, 0.4, 0.45, 0.5, 0.55,
  0.6, 0.65, 0.7, 0.75, 0.8, 0.85, 0.9, 0.95, 0.975, 0.99, 1,
];

export const DEFAULT_UNUSUAL_BELOW = 1;

export interface QuantileSummary {
  levels: number[];
  values: number[];
}

/** Parameters the scorer needs (a subset of MixtureModel). */
export interface ScorableModel {
  structure: Covariance;
  weights: number[];
  means: number[][];
  covariances: number[][][];
  scaler: ScalerParams | null;
  training: { logDensityQuantiles: QuantileSummary };
}

export interface RowScore {
  probabilities: number[];
  logDensity: number;
  typicality: number; // percentile 0..100
  best: number; // index of the most probable component
  unusual: boolean; // typicality below the threshold
}

export interface Scorer {
  k: number;
  d: number;
  diagonal: boolean;
  scaler: ScalerParams | null;
  jacobian: number;
  factors: Factors;
  means: Float64Array;
  quantiles: QuantileSummary;
  /** single-row buffers reused by scoreRow (scaled row, scratch, log density, responsibilities) */
  row: Float64Array;
  rowScratch: Float64Array;
  rowDensity: Float64Array;
  rowResp: Float64Array;
}

const cache = new WeakMap<object, Scorer>();

/**
 * Factorise a model for scoring (done once per model object and cached; treat a model
 * object as immutable once scored — build a new object to change parameters).
 */
export function prepareScorer(model: ScorableModel): Scorer {
  const hit = cache.get(model);
  if (hit) return hit;
  const k = model.weights.length;
  const d = model.means[0]?.length ?? 0;
  const diagonal = isDiagonalStructure(model.structure);
  const g: Gaussians = {
    k,
    d,
    covariance: model.structure,
    weights: Float64Array.from(model.weights),
    means: new Float64Array(k * d),
    covs: new Float64Array(k * d * d),
  };
  for (let c = 0; c < k; c++) {
    g.means.set(meanToScaled(model.means[c], model.scaler), c * d);
    const cov = covToScaled(model.covariances[c], model.scaler);
    for (let i = 0; i < d; i++) for (let j = 0; j < d; j++) g.covs[c * d * d + i * d + j] = cov[i][j];
  }
  const factors = allocFactors(k, d, diagonal);
  prepareFactors(g, factors);
  const s: Scorer = {
    k,
    d,
    diagonal,
    scaler: model.scaler,
    jacobian: logJacobian(model.scaler),
    factors,
    means: g.means,
    quantiles: model.training.logDensityQuantiles,
    row: new Float64Array(d),
    rowScratch: new Float64Array(scratchLength(k, d)),
    rowDensity: new Float64Array(1),
    rowResp: new Float64Array(k),
  };
  cache.set(model, s);
  return s;
}

/** Percentile (0..100) of a log density against the stored summary. */
export function typicalityOf(q: QuantileSummary, logDensity: number): number {
  const v = q.values;
  const p = q.levels;
  const last = v.length - 1;
  if (!(logDensity > v[0])) return logDensity === v[0] ? 100 * p[0] : 0;
  if (logDensity >= v[last]) return 100 * p[last];
  let lo = 0;
  let hi = last;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (v[mid] <= logDensity) lo = mid;
    else hi = mid;
  }
  const span = v[hi] - v[lo];
  const t = span > 0 ? (logDensity - v[lo]) / span : 1;
  return 100 * (p[lo] + t * (p[hi] - p[lo]));
}

/** Type-7 (linear) empirical quantiles of `values` at `levels`. Sorts a copy. */
export function quantileSummary(values: Float64Array, levels: readonly number[] = QUANTILE_LEVELS): QuantileSummary {
  const s = Float64Array.from(values).sort();
  const n = s.length;
  const out: number[] = [];
  for (const p of levels) {
    const h = (n - 1) * p;
    const lo = Math.floor(h);
    const hi = Math.min(n - 1, lo + 1);
    out.push(s[lo] + (h - lo) * (s[hi] - s[lo]));
  }
  return { levels: levels.slice(), values: out };
}

function toScaled(s: Scorer, rows: Float64Array, n: number): Float64Array {
  if (s.scaler === null) return rows;
  const out = new Float64Array(n * s.d);
  const { center, scale } = s.scaler;
  for (let r = 0; r < n; r++) for (let j = 0; j < s.d; j++) out[r * s.d + j] = (rows[r * s.d + j] - center[j]) / scale[j];
  return out;
}

/** Log densities (original units) of n rows (n·d row-major, original units). */
export function logDensities(model: ScorableModel, rows: Float64Array, n: number, resp: Float64Array | null = null): Float64Array {
  const s = prepareScorer(model);
  const z = toScaled(s, rows, n);
  const out = new Float64Array(n);
  const scratch = new Float64Array(scratchLength(s.k, s.d));
  const f = s.factors;
  if (f.kernel === KERNEL_QUADRATIC || f.kernel === KERNEL_QUADRATIC_DIAGONAL) {
    passQuadratic(z, 0, n, s.d, s.k, f.kernel === KERNEL_QUADRATIC_DIAGONAL, f.quad, f.quadConst, f.centre, 0, scratch, null, out, resp);
  }
  else posteriorPass(z, 0, n, s.d, s.k, s.diagonal, s.means, f.factors, f.logConst, scratch, out, resp, 0);
  for (let r = 0; r < n; r++) out[r] -= s.jacobian;
  return out;
}

export interface BatchScores {
  probabilities: Float64Array; // n·K
  logDensity: Float64Array; // n
  typicality: Float64Array; // n
  best: Int32Array; // n
}

/** Score many rows at once (the fast path; n·d row-major, original units). */
export function scoreRows(model: ScorableModel, rows: Float64Array, n: number): BatchScores {
  const s = prepareScorer(model);
  if (rows.length < n * s.d) throw new MixtureError('BAD_INPUT', `Expected ${n * s.d} values, got ${rows.length}.`);
  const probabilities = new Float64Array(n * s.k);
  const logDensity = logDensities(model, rows, n, probabilities);
  const typicality = new Float64Array(n);
  const best = new Int32Array(n);
  for (let r = 0; r < n; r++) {
    typicality[r] = typicalityOf(model.training.logDensityQuantiles, logDensity[r]);
    let b = 0;
    for (let c = 1; c < s.k; c++) if (probabilities[r * s.k + c] > probabilities[r * s.k + b]) b = c;
    best[r] = b;
  }
  return { probabilities, logDensity, typicality, best };
}

/** Score one row given as numbers in original units, in feature order. */
export function scoreRow(model: ScorableModel, values: number[], opts: { unusualBelow?: number } = {}): RowScore {
  const s = prepareScorer(model);
  if (!Array.isArray(values) || values.length !== s.d) {
    throw new MixtureError('BAD_INPUT', `Expected ${s.d} values, got ${Array.isArray(values) ? values.length : 'none'}.`);
  }
  values.forEach((v, j) => {
    if (typeof v !== 'number' || !Number.isFinite(v)) throw new MixtureError('BAD_INPUT', `Value ${j + 1} is not a finite number.`);
  });
  // one row: the per-row kernel on reused buffers (the blocked kernel pays off for batches)
  for (let j = 0; j < s.d; j++) s.row[j] = s.scaler ? (values[j] - s.scaler.center[j]) / s.scaler.scale[j] : values[j];
  const f = s.factors;
  posteriorPass(s.row, 0, 1, s.d, s.k, s.diagonal, s.means, f.factors, f.logConst, s.rowScratch, s.rowDensity, s.rowResp, 0);
  const logDensity = s.rowDensity[0] - s.jacobian;
  const typicality = typicalityOf(model.training.logDensityQuantiles, logDensity);
  let best = 0;
  for (let c = 1; c < s.k; c++) if (s.rowResp[c] > s.rowResp[best]) best = c;
  return {
    probabilities: Array.from(s.rowResp),
    logDensity,
    typicality,
    best,
    unusual: typicality < (opts.unusualBelow ?? DEFAULT_UNUSUAL_BELOW),
  };
}
