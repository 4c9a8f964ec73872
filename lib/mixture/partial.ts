/**
 * Scoring rows with blank fields, exactly: each component's marginal over the observed
 * fields (sub-vector of the mean, sub-matrix of the covariance) gives the posterior and
 * the log density over those fields; nothing is imputed. See subsets.ts for the factors
 * and README.md ("Scoring with blank fields") for the contract.
 *
 * Typicality: a complete row is read against the training rows' quantiles (exactly as
 * scoreRow does); a partial row against the quantiles of the same marginal on the
 * model's typicality sample (sample.ts), so both sides of the comparison are the same
 * density.
 */
import { MixtureError } from './errors';
import { posteriorPass } from './estep';
import { DEFAULT_UNUSUAL_BELOW, type QuantileSummary, type ScorableModel, typicalityOf } from './score';
import { defaultTypicalitySample, subsetQuantiles, type TypicalitySample } from './sample';
import { explainWith, type RowReason } from './breakdown';
import { fieldLabel, gatherScaled, type MaskedScorer, prepareMaskedScorer, rowMask, type SubsetFactors, subsetFactors } from './subsets';

/** A field's value: a finite number, or null/undefined for "left blank". */
export type FieldValue = number | null | undefined;

/** Which quantile table a typicality was read from. */
export type TypicalityReference = 'training' | 'sample';

export interface PartialScoreOptions {
  /** typicality below this (percent) flags the row as unusual [1] */
  unusualBelow?: number;
  /** the version's stored typicality sample; default: the model's own default sample (sample.ts) */
  sample?: TypicalitySample;
  /** also return the log-odds breakdown (`reason`, see breakdown.ts) */
  explain?: boolean;
}

export interface PartialRowScore {
  /** posterior membership probabilities over the observed fields (sum to 1) */
  probabilities: number[];
  /** log density of the observed fields' marginal, original units */
  logDensity: number;
  /** percentile 0..100 of logDensity under the same marginal */
  typicality: number;
  typicalityReference: TypicalityReference;
  best: number;
  unusual: boolean;
  /** per field in feature order: was it observed (used) */
  used: boolean[];
  /** bit j set = field j used */
  mask: number;
  /** all fields observed (then every number equals scoreRow's) */
  complete: boolean;
  /** with `explain: true`: why best and not the runner-up (explainRow's answer) */
  reason?: RowReason;
}

/** Mask of a row given as values with null/undefined for blanks; validates the numbers. */
export function maskOfValues(model: ScorableModel, values: readonly FieldValue[]): number {
  return rowMask(model, prepareMaskedScorer(model), values);
}

/** Which fields a mask uses, as booleans in feature order. */
export function usedFields(mask: number, d: number): boolean[] {
  const out: boolean[] = [];
  for (let j = 0; j < d; j++) out.push(((mask >>> j) & 1) === 1);
  return out;
}

/** The quantile table a row with this mask is compared with. */
export function typicalityQuantiles(
  model: ScorableModel,
  mask: number,
  sample?: TypicalitySample,
): { quantiles: QuantileSummary; reference: TypicalityReference } {
  const s = prepareMaskedScorer(model);
  if (mask >>> 0 === s.fullMask) return { quantiles: model.training.logDensityQuantiles, reference: 'training' };
  return { quantiles: subsetQuantiles(model, sample ?? defaultTypicalitySample(model), mask), reference: 'sample' };
}

function quantilesFor(model: ScorableModel, s: MaskedScorer, f: SubsetFactors, sample: TypicalitySample | undefined): QuantileSummary {
  if (f.mask === s.fullMask) return model.training.logDensityQuantiles;
  const from = sample ?? defaultTypicalitySample(model);
  return f.quantiles.get(from) ?? subsetQuantiles(model, from, f.mask);
}

/**
 * Score row `r` of `x` (original units, row-major with `d` per row; unobserved entries
 * are not read) under subset `f`: posteriors to resp[outRow·K..], log density (original
 * units) to density[outRow]. Allocates nothing.
 */
export function scoreMaskedInto(
  s: MaskedScorer,
  f: SubsetFactors,
  x: ArrayLike<number>,
  r: number,
  density: Float64Array,
  resp: Float64Array | null,
  outRow: number,
): void {
  gatherScaled(x, r * s.d, f.idx, f.m, s.scaled, s.center, s.scale, s.row);
  posteriorPass(s.row, 0, 1, f.m, s.k, f.diagonal, f.means, f.factors, f.logConst, s.scratch, density, resp, outRow);
  density[outRow] -= f.jacobian;
}

/**
 * Score one row with blank fields. `values` in feature order, original units; null (or
 * undefined) = not observed. Throws NO_FIELDS when nothing is observed, BAD_INPUT for a
 * wrong length or a non-finite number. With every field given, probabilities, log
 * density, typicality and best are exactly scoreRow's.
 */
export function scoreRowPartial(model: ScorableModel, values: readonly FieldValue[], opts: PartialScoreOptions = {}): PartialRowScore {
  const s = prepareMaskedScorer(model);
  const mask = rowMask(model, s, values);
  const f = subsetFactors(s, mask);
  scoreMaskedInto(s, f, values as ArrayLike<number>, 0, s.density, s.resp, 0);
  const logDensity = s.density[0];
  let best = 0;
  for (let c = 1; c < s.k; c++) if (s.resp[c] > s.resp[best]) best = c;
  const probabilities = Array.from(s.resp);
  const typicality = typicalityOf(quantilesFor(model, s, f, opts.sample), logDensity);
  const score: PartialRowScore = {
    probabilities,
    logDensity,
    typicality,
    typicalityReference: mask === s.fullMask ? 'training' : 'sample',
    best,
    unusual: typicality < (opts.unusualBelow ?? DEFAULT_UNUSUAL_BELOW),
    used: usedFields(mask, s.d),
    mask,
    complete: mask === s.fullMask,
  };
  if (opts.explain) score.reason = explainWith(s, f, values);
  return score;
}

export interface MaskedBatchScores {
  probabilities: Float64Array; // n·K
  logDensity: Float64Array; // n, marginal over each row's observed fields, original units
  typicality: Float64Array; // n, percent
  best: Int32Array; // n
  masks: Uint32Array; // n, bit j = field j used
}

/**
 * Score n rows (n·d row-major, original units) with blank fields. `masks`: one mask per
 * row (Uint32Array, bit j = field j observed), one mask for the whole batch, or omitted
 * = a field is observed when its value is not NaN. Unobserved entries are never read.
 * Rows are validated in order first (the first bad row is the one named); then, when the
 * masks vary, they are scored grouped by mask (a counting sort), so each distinct subset
 * is looked up and factorised once per batch even when there are more than the cache
 * holds. No allocation per row.
 */
export function scoreRowsMasked(
  model: ScorableModel,
  rows: Float64Array,
  n: number,
  masks?: Uint32Array | number,
  opts: { sample?: TypicalitySample } = {},
): MaskedBatchScores {
  const s = prepareMaskedScorer(model);
  const { k, d } = s;
  if (!Number.isInteger(n) || n < 0) throw new MixtureError('BAD_INPUT', `Row count must be a non-negative integer, got ${n}.`);
  if (rows.length < n * d) throw new MixtureError('BAD_INPUT', `Expected ${n * d} values, got ${rows.length}.`);
  if (masks instanceof Uint32Array && masks.length < n) throw new MixtureError('BAD_INPUT', `Expected ${n} masks, got ${masks.length}.`);
  const out: MaskedBatchScores = {
    probabilities: new Float64Array(n * k),
    logDensity: new Float64Array(n),
    typicality: new Float64Array(n),
    best: new Int32Array(n),
    masks: new Uint32Array(n),
  };
  // pass 1, in row order: masks, validation, distinct subsets
  const ids = new Map<number, number>();
  const groupOf = new Uint32Array(n);
  for (let r = 0; r < n; r++) {
    const mask = masks === undefined ? nanMask(rows, r * d, d) : typeof masks === 'number' ? masks >>> 0 : masks[r];
    if (mask === 0) throw new MixtureError('NO_FIELDS', `Row ${r + 1} has no field with a value; enter at least one.`);
    if ((mask & ~s.fullMask) >>> 0 !== 0) throw new MixtureError('BAD_INPUT', `Row ${r + 1}'s mask ${mask} names fields beyond the model's ${d}.`);
    for (let j = 0; j < d; j++) {
      if ((mask >>> j) & 1 && !Number.isFinite(rows[r * d + j])) {
        throw new MixtureError('BAD_INPUT', `Row ${r + 1}, value ${fieldLabel(model, j)} is not a finite number.`);
      }
    }
    out.masks[r] = mask;
    let id = ids.get(mask);
    if (id === undefined) {
      id = ids.size;
      ids.set(mask, id);
    }
    groupOf[r] = id;
  }
  const order = ids.size > 1 ? groupOrder(groupOf, ids.size, n) : null;
  let lastMask = -1;
  let f: SubsetFactors | null = null;
  let q: QuantileSummary | null = null;
  for (let t = 0; t < n; t++) {
    const r = order === null ? t : order[t];
    const mask = out.masks[r];
    if (mask !== lastMask) {
      f = subsetFactors(s, mask);
      q = quantilesFor(model, s, f, opts.sample);
      lastMask = mask;
    }
    scoreMaskedInto(s, f!, rows, r, out.logDensity, out.probabilities, r);
    out.typicality[r] = typicalityOf(q!, out.logDensity[r]);
    let b = 0;
    for (let c = 1; c < k; c++) if (out.probabilities[r * k + c] > out.probabilities[r * k + b]) b = c;
    out.best[r] = b;
  }
  return out;
}

/** Row indices grouped by group id (stable counting sort). */
function groupOrder(groupOf: Uint32Array, groups: number, n: number): Uint32Array {
  const start = new Uint32Array(groups + 1);
  for (let r = 0; r < n; r++) start[groupOf[r] + 1]++;
  for (let g = 0; g < groups; g++) start[g + 1] += start[g];
  const order = new Uint32Array(n);
  for (let r = 0; r < n; r++) order[start[groupOf[r]]++] = r;
  return order;
}

function nanMask(x: Float64Array, off: number, d: number): number {
  let mask = 0;
  for (let j = 0; j < d; j++) if (!Number.isNaN(x[off + j])) mask = (mask | (2 ** j)) >>> 0;
  return mask;
}
