/**
 * Marginals of a fitted mixture over a subset of its fields, the shared core of partial
 * scoring (partial.ts), the typicality sample (sample.ts) and the log-odds breakdown
 * (breakdown.ts).
 *
 * A subset is a bit mask over the model's feature order (bit j set = field j observed).
 * The marginal of a Gaussian over the observed fields O is N(μ_O, Σ_OO): the sub-vector
 * of the mean and the sub-matrix of the covariance, so nothing is imputed. Everything
 * is computed in the model's scaled space (z-scores when the model was standardised)
 * and mapped back with the log-Jacobian of the observed fields only, Σ_{j∈O} log scale_j.
 *
 * Per subset we keep the factors the row kernels read; they are built once, with the
 * same arithmetic as prepareScorer / prepareFactors, so the full mask reproduces
 * scoreRow to the last bit. The cache lives in a WeakMap on the model object (treat a
 * model as immutable once scored, as for prepareScorer) and holds at most
 * SUBSET_CACHE_SIZE subsets, least recently used first out.
 */
import { MixtureError } from './errors';
import { LOG_2PI, scratchLength } from './estep';
import { choleskyInto, halfLogDet, invertLowerPacked, packedSize } from './linalg';
import type { QuantileSummary, ScorableModel } from './score';
import { isDiagonalStructure } from './types';

/** Masks are unsigned 32-bit integers, so a partial score can name at most 32 fields. */
export const MAX_MASK_FIELDS = 32;
/** Subsets whose factors are kept per model (2^d subsets exist; a calculator sees few). */
export const SUBSET_CACHE_SIZE = 64;

export interface SubsetFactors {
  mask: number;
  /** number of observed fields */
  m: number;
  /** observed field indices in feature order (m) */
  idx: Int32Array;
  diagonal: boolean;
  /** scaled sub-means, K·m */
  means: Float64Array;
  /** posteriorPass layout: packed lower inverse Cholesky of Σ_OO (K·m(m+1)/2) or 1/σ (K·m) */
  factors: Float64Array;
  /** log w_k − ½m·log2π − ½log|Σ_k,OO| (K) */
  logConst: Float64Array;
  /** dense lower Cholesky factor L_k of Σ_k,OO (K·m·m; diagonal structures: σ on the diagonal) */
  chol: Float64Array;
  /** log L_k,ii (K·m): log of the conditional standard deviations */
  logDiag: Float64Array;
  /** Σ_{j∈O} log scale_j, subtracted from scaled-space log densities */
  jacobian: number;
  /** typicality quantiles of this subset, per typicality sample object */
  quantiles: WeakMap<object, QuantileSummary>;
}

/** A model prepared for masked scoring: scaled parameters, the subset cache and row buffers. */
export interface MaskedScorer {
  k: number;
  d: number;
  diagonal: boolean;
  fullMask: number;
  scaled: boolean;
  /** scaler centre and scale (0 and 1 when the model has no scaler) */
  center: Float64Array;
  scale: Float64Array;
  weights: Float64Array;
  /** scaled means K·d and covariances K·d·d */
  means: Float64Array;
  covs: Float64Array;
  /** marginal standard deviations per component and field in original units (K·d) */
  sd: Float64Array;
  /** original-units means (K·d) */
  meansOriginal: Float64Array;
  subsets: Map<number, SubsetFactors>;
  /** the most recently used subset (already the newest in the LRU order) */
  last: SubsetFactors | null;
  /** reused single-row buffers: gathered scaled row, kernel scratch, density, posteriors, log joints, two solves */
  row: Float64Array;
  scratch: Float64Array;
  density: Float64Array;
  resp: Float64Array;
  joint: Float64Array;
  solveA: Float64Array;
  solveB: Float64Array;
}

const cache = new WeakMap<object, MaskedScorer>();

export function prepareMaskedScorer(model: ScorableModel): MaskedScorer {
  const hit = cache.get(model);
  if (hit) return hit;
  const k = model.weights.length;
  const d = model.means[0]?.length ?? 0;
  if (d < 1) throw new MixtureError('BAD_MODEL', 'The model has no fields.');
  if (d > MAX_MASK_FIELDS) {
    throw new MixtureError('BAD_INPUT', `Blank fields are supported for models of up to ${MAX_MASK_FIELDS} fields; this one has ${d}.`);
  }
  const sc = model.scaler;
  const center = new Float64Array(d);
  const scale = new Float64Array(d).fill(1);
  if (sc) {
    center.set(sc.center);
    scale.set(sc.scale);
  }
  const means = new Float64Array(k * d);
  const covs = new Float64Array(k * d * d);
  const sd = new Float64Array(k * d);
  const meansOriginal = new Float64Array(k * d);
  for (let c = 0; c < k; c++) {
    // the same expressions as meanToScaled / covToScaled, so the full mask matches scoreRow bit for bit
    for (let i = 0; i < d; i++) {
      const mu = model.means[c][i];
      meansOriginal[c * d + i] = mu;
      means[c * d + i] = sc ? (mu - sc.center[i]) / sc.scale[i] : mu;
      sd[c * d + i] = Math.sqrt(model.covariances[c][i][i]);
      for (let j = 0; j < d; j++) {
        const v = model.covariances[c][i][j];
        covs[c * d * d + i * d + j] = sc ? v / (sc.scale[i] * sc.scale[j]) : v;
      }
    }
  }
  const s: MaskedScorer = {
    k,
    d,
    diagonal: isDiagonalStructure(model.structure),
    fullMask: fullMaskOf(d),
    scaled: sc !== null,
    center,
    scale,
    weights: Float64Array.from(model.weights),
    means,
    covs,
    sd,
    meansOriginal,
    subsets: new Map(),
    last: null,
    row: new Float64Array(d),
    scratch: new Float64Array(scratchLength(k, d)),
    density: new Float64Array(1),
    resp: new Float64Array(k),
    joint: new Float64Array(k),
    solveA: new Float64Array(d),
    solveB: new Float64Array(d),
  };
  cache.set(model, s);
  return s;
}

/** The mask with all d fields observed. */
export function fullMaskOf(d: number): number {
  return d >= 32 ? 0xffffffff : 2 ** d - 1;
}

/** Number of set bits of a 32-bit mask. */
export function maskSize(mask: number): number {
  let v = mask >>> 0;
  let n = 0;
  while (v !== 0) {
    v &= v - 1;
    n++;
  }
  return n;
}

/** Cached factors of one subset (LRU refresh on every hit). Throws NO_FIELDS for the empty mask. */
export function subsetFactors(s: MaskedScorer, mask: number): SubsetFactors {
  const key = mask >>> 0;
  if (s.last !== null && s.last.mask === key) return s.last;
  const hit = s.subsets.get(key);
  if (hit) {
    s.subsets.delete(key);
    s.subsets.set(key, hit);
    s.last = hit;
    return hit;
  }
  if (key === 0) throw new MixtureError('NO_FIELDS', 'No field has a value; enter at least one field to get an answer.');
  if ((key & ~s.fullMask) >>> 0 !== 0) {
    throw new MixtureError('BAD_INPUT', `The mask ${key} names fields beyond the model's ${s.d}.`);
  }
  const f = buildSubset(s, key);
  s.subsets.set(key, f);
  s.last = f;
  if (s.subsets.size > SUBSET_CACHE_SIZE) s.subsets.delete(s.subsets.keys().next().value as number);
  return f;
}

function buildSubset(s: MaskedScorer, mask: number): SubsetFactors {
  const { k, d, diagonal } = s;
  const m = maskSize(mask);
  const idx = new Int32Array(m);
  for (let j = 0, p = 0; j < d; j++) if ((mask >>> j) & 1) idx[p++] = j;
  const pm = packedSize(m);
  const means = new Float64Array(k * m);
  const factors = new Float64Array(k * (diagonal ? m : pm));
  const logConst = new Float64Array(k);
  const chol = new Float64Array(k * m * m);
  const logDiag = new Float64Array(k * m);
  const sub = new Float64Array(m * m);
  for (let c = 0; c < k; c++) {
    for (let a = 0; a < m; a++) {
      means[c * m + a] = s.means[c * d + idx[a]];
      for (let b = 0; b < m; b++) sub[a * m + b] = s.covs[c * d * d + idx[a] * d + idx[b]];
    }
    let halfLog = 0;
    if (diagonal) {
      for (let a = 0; a < m; a++) {
        const v = sub[a * m + a];
        if (!(v > 0) || !Number.isFinite(v)) {
          throw new MixtureError('NOT_POSITIVE_DEFINITE', `Component ${c + 1}'s variance of field ${idx[a] + 1} is not positive.`);
        }
        const sdv = Math.sqrt(v);
        factors[c * m + a] = 1 / sdv;
        chol[c * m * m + a * m + a] = sdv;
        logDiag[c * m + a] = Math.log(sdv);
        halfLog += Math.log(sdv);
      }
    } else {
      if (!choleskyInto(sub, 0, m, chol, c * m * m)) {
        throw new MixtureError('NOT_POSITIVE_DEFINITE', `Component ${c + 1}'s covariance over the given fields is not positive definite.`);
      }
      invertLowerPacked(chol, c * m * m, m, factors, c * pm);
      halfLog = halfLogDet(chol, c * m * m, m);
      for (let a = 0; a < m; a++) logDiag[c * m + a] = Math.log(chol[c * m * m + a * m + a]);
    }
    logConst[c] = Math.log(s.weights[c]) - 0.5 * m * LOG_2PI - halfLog;
  }
  let jacobian = 0;
  if (s.scaled) for (let a = 0; a < m; a++) jacobian += Math.log(s.scale[idx[a]]);
  return { mask, m, idx, diagonal, means, factors, logConst, chol, logDiag, jacobian, quantiles: new WeakMap() };
}

/**
 * Gather the observed fields of the row at `x[off..off+d)` (original units) into `out`
 * (scaled, length ≥ m). Unobserved entries of x are never read.
 */
export function gatherScaled(
  x: ArrayLike<number>,
  off: number,
  idx: Int32Array,
  m: number,
  scaled: boolean,
  center: Float64Array,
  scale: Float64Array,
  out: Float64Array,
): void {
  if (scaled) for (let a = 0; a < m; a++) out[a] = (x[off + idx[a]] - center[idx[a]]) / scale[idx[a]];
  else for (let a = 0; a < m; a++) out[a] = x[off + idx[a]];
}

/**
 * Log joint log(w_k·N(z | μ_k,O, Σ_k,OO)) of a gathered scaled row z (m) for every
 * component, scaled space, into out (K). Same inverse-factor arithmetic as posteriorPass.
 */
export function logJointsInto(
  z: Float64Array,
  m: number,
  k: number,
  diagonal: boolean,
  means: Float64Array,
  factors: Float64Array,
  logConst: Float64Array,
  work: Float64Array,
  out: Float64Array,
): void {
  const pm = (m * (m + 1)) >> 1;
  for (let c = 0; c < k; c++) {
    const mo = c * m;
    let q = 0;
    if (diagonal) {
      for (let i = 0; i < m; i++) {
        const t = (z[i] - means[mo + i]) * factors[mo + i];
        q += t * t;
      }
    } else {
      let f = c * pm;
      for (let i = 0; i < m; i++) {
        work[i] = z[i] - means[mo + i];
        let t = 0;
        for (let j = 0; j <= i; j++) t += factors[f + j] * work[j];
        f += i + 1;
        q += t * t;
      }
    }
    out[c] = logConst[c] - 0.5 * q;
  }
}

/**
 * Forward substitution y = L_c⁻¹(z − μ_c) with the dense lower factor of component c
 * (m×m at c·m·m). y_i·L_ii is the residual of z_i given z_<i under component c, so
 * −log L_ii − ½y_i² − ½log2π is log p_c(z_i | z_<i): the chain-rule terms of the breakdown.
 */
export function forwardSolve(z: Float64Array, m: number, c: number, means: Float64Array, chol: Float64Array, y: Float64Array): void {
  const lo = c * m * m;
  const mo = c * m;
  for (let i = 0; i < m; i++) {
    let t = z[i] - means[mo + i];
    for (let p = 0; p < i; p++) t -= chol[lo + i * m + p] * y[p];
    y[i] = t / chol[lo + i * m + i];
  }
}

/** "2 (name)" when the model carries feature names, else "2": for error messages. */
export function fieldLabel(model: ScorableModel, j: number): string {
  const names = (model as { features?: { name?: unknown }[] }).features;
  const n = names?.[j]?.name;
  return typeof n === 'string' && n ? `${j + 1} (${n})` : `${j + 1}`;
}

/**
 * Mask of a row given as values in feature order with null/undefined for blanks;
 * validates length and numbers. Throws BAD_INPUT, or NO_FIELDS when nothing is given.
 */
export function rowMask(model: ScorableModel, s: MaskedScorer, values: readonly (number | null | undefined)[]): number {
  if (!Array.isArray(values) || values.length !== s.d) {
    throw new MixtureError('BAD_INPUT', `Expected ${s.d} values (null for a blank), got ${Array.isArray(values) ? values.length : 'none'}.`);
  }
  let mask = 0;
  for (let j = 0; j < s.d; j++) {
    const v = values[j];
    if (v === null || v === undefined) continue;
    if (typeof v !== 'number' || !Number.isFinite(v)) {
      throw new MixtureError('BAD_INPUT', `Value ${fieldLabel(model, j)} is not a finite number (leave it null for a blank).`);
    }
    mask = (mask | (2 ** j)) >>> 0;
  }
  if (mask === 0) throw new MixtureError('NO_FIELDS', 'No field has a value; enter at least one field to get an answer.');
  return mask;
}
