/**
 * The typicality sample: a fixed, seeded sample drawn from the fitted mixture itself,
 * small enough to store with a published version, from which the log-density quantiles
 * of any subset's marginal are computed on demand (and cached per subset).
 *
 * Why: typicality of a partial answer must compare its marginal log density with the
 * distribution of the same marginal log density. The published version does not hold
 * the subscriber's rows, so the reference population is the model's own: if X ~ the
 * mixture, then X_O ~ the marginal mixture over O, and the empirical quantiles of
 * log p_O(X_O) over the sample estimate the quantiles of that marginal's log density.
 *
 * Draws: the component counts are the largest-remainder rounding of size·w_k (the
 * sample's proportions are the weights, up to rounding); each draw is μ_k + L_k·ε with
 * L_k the Cholesky factor of Σ_k in the model's scaled space and ε standard normal from
 * the seeded PRNG, mapped back to original units and rounded to float32, so the stored
 * encoding (float32) round-trips to exactly the sample that was generated.
 */
import { MixtureError } from './errors';
import { SeededRandom } from './prng';
import { QUANTILE_LEVELS, type QuantileSummary, quantileSummary, type ScorableModel } from './score';
import { gatherScaled, prepareMaskedScorer, subsetFactors } from './subsets';
import { posteriorPass } from './estep';

export const DEFAULT_SAMPLE_SIZE = 2000;
export const DEFAULT_SAMPLE_SEED = 0;
export const SAMPLE_FORMAT = 'partwise.typicality-sample';
export const SAMPLE_VERSION = 1;
const MIN_SAMPLE_SIZE = 100;
const MAX_SAMPLE_SIZE = 1_000_000;

export interface TypicalitySample {
  size: number;
  /** fields per draw (the model's d) */
  dimensions: number;
  seed: number;
  /** size·dimensions row-major, original units, float32-representable values */
  rows: Float64Array;
}

/** The stored (JSON) form of a typicality sample. */
export interface TypicalitySampleJson {
  format: typeof SAMPLE_FORMAT;
  version: typeof SAMPLE_VERSION;
  size: number;
  dimensions: number;
  seed: number;
  /** rows as little-endian float32, base64 */
  encoding: 'float32le-base64';
  data: string;
}

/**
 * Draw `size` rows from the model (deterministic given model, size and seed).
 * Cost O(size·d²); 2000 draws of a 20-field model take a few milliseconds.
 */
export function typicalitySample(model: ScorableModel, size = DEFAULT_SAMPLE_SIZE, seed = DEFAULT_SAMPLE_SEED): TypicalitySample {
  if (!Number.isInteger(size) || size < MIN_SAMPLE_SIZE || size > MAX_SAMPLE_SIZE) {
    throw new MixtureError('BAD_INPUT', `A typicality sample needs between ${MIN_SAMPLE_SIZE} and ${MAX_SAMPLE_SIZE} draws, got ${size}.`);
  }
  if (!Number.isInteger(seed)) throw new MixtureError('BAD_INPUT', `The sample seed must be an integer, got ${seed}.`);
  const s = prepareMaskedScorer(model);
  const f = subsetFactors(s, s.fullMask); // the full Cholesky factors, scaled space
  const { k, d } = s;
  const counts = componentCounts(s.weights, size);
  const rows = new Float64Array(size * d);
  const eps = new Float64Array(d);
  const rng = new SeededRandom(seed);
  drawRows(rng, k, d, counts, f.means, f.chol, s.center, s.scale, eps, rows);
  return { size, dimensions: d, seed, rows };
}

/** Largest-remainder rounding of size·w_k (ties to the lower component index). */
function componentCounts(weights: Float64Array, size: number): Int32Array {
  const k = weights.length;
  let wsum = 0;
  for (let c = 0; c < k; c++) wsum += weights[c];
  const counts = new Int32Array(k);
  const rest = new Float64Array(k);
  let given = 0;
  for (let c = 0; c < k; c++) {
    const exact = (size * weights[c]) / wsum;
    counts[c] = Math.floor(exact);
    rest[c] = exact - counts[c];
    given += counts[c];
  }
  while (given < size) {
    let b = 0;
    for (let c = 1; c < k; c++) if (rest[c] > rest[b]) b = c;
    counts[b]++;
    rest[b] = -1;
    given++;
  }
  return counts;
}

function drawRows(
  rng: SeededRandom,
  k: number,
  d: number,
  counts: Int32Array,
  means: Float64Array,
  chol: Float64Array,
  center: Float64Array,
  scale: Float64Array,
  eps: Float64Array,
  rows: Float64Array,
): void {
  let r = 0;
  for (let c = 0; c < k; c++) {
    const lo = c * d * d;
    for (let t = 0; t < counts[c]; t++, r++) {
      for (let j = 0; j < d; j++) eps[j] = rng.normal();
      for (let i = 0; i < d; i++) {
        let v = means[c * d + i];
        for (let j = 0; j <= i; j++) v += chol[lo + i * d + j] * eps[j];
        rows[r * d + i] = Math.fround(center[i] + scale[i] * v);
      }
    }
  }
}

const defaults = new WeakMap<object, TypicalitySample>();

/** The model's default sample (DEFAULT_SAMPLE_SIZE draws, DEFAULT_SAMPLE_SEED), cached per model object. */
export function defaultTypicalitySample(model: ScorableModel): TypicalitySample {
  let hit = defaults.get(model);
  if (!hit) {
    hit = typicalitySample(model);
    defaults.set(model, hit);
  }
  return hit;
}

/**
 * Log densities (original units) of the sample's rows under the marginal over `mask`.
 */
export function sampleLogDensities(model: ScorableModel, sample: TypicalitySample, mask: number): Float64Array {
  const s = prepareMaskedScorer(model);
  if (sample.dimensions !== s.d || sample.rows.length !== sample.size * s.d) {
    throw new MixtureError('BAD_INPUT', `The typicality sample has ${sample.dimensions} fields per draw; the model has ${s.d}.`);
  }
  const f = subsetFactors(s, mask);
  const out = new Float64Array(sample.size);
  for (let r = 0; r < sample.size; r++) {
    gatherScaled(sample.rows, r * s.d, f.idx, f.m, s.scaled, s.center, s.scale, s.row);
    posteriorPass(s.row, 0, 1, f.m, s.k, f.diagonal, f.means, f.factors, f.logConst, s.scratch, out, null, r);
    out[r] -= f.jacobian;
  }
  return out;
}

/**
 * Quantiles (at QUANTILE_LEVELS, the levels of the stored training summary) of the
 * marginal log density over `mask`, estimated on the sample; cached per subset and sample.
 */
export function subsetQuantiles(model: ScorableModel, sample: TypicalitySample, mask: number): QuantileSummary {
  const f = subsetFactors(prepareMaskedScorer(model), mask);
  let q = f.quantiles.get(sample);
  if (!q) {
    q = quantileSummary(sampleLogDensities(model, sample, mask), QUANTILE_LEVELS);
    f.quantiles.set(sample, q);
  }
  return q;
}

/** Stored form: float32 little-endian, base64 (4 bytes per value before base64). */
export function encodeTypicalitySample(sample: TypicalitySample): TypicalitySampleJson {
  const bytes = new Uint8Array(sample.rows.length * 4);
  const view = new DataView(bytes.buffer);
  for (let i = 0; i < sample.rows.length; i++) view.setFloat32(i * 4, sample.rows[i], true);
  return {
    format: SAMPLE_FORMAT,
    version: SAMPLE_VERSION,
    size: sample.size,
    dimensions: sample.dimensions,
    seed: sample.seed,
    encoding: 'float32le-base64',
    data: toBase64(bytes),
  };
}

/** Read a stored sample; throws BAD_MODEL naming what is wrong. Pass `dimensions` to check it fits the model. */
export function decodeTypicalitySample(input: unknown, dimensions?: number): TypicalitySample {
  const bad = (what: string): never => {
    throw new MixtureError('BAD_MODEL', `Invalid typicality sample: ${what}.`);
  };
  if (typeof input !== 'object' || input === null) bad('it is not an object');
  const j = input as Partial<TypicalitySampleJson>;
  if (j.format !== SAMPLE_FORMAT) bad(`format must be "${SAMPLE_FORMAT}"`);
  if (j.version !== SAMPLE_VERSION) bad(`version must be ${SAMPLE_VERSION}`);
  if (j.encoding !== 'float32le-base64') bad('encoding must be "float32le-base64"');
  const size = j.size as number;
  const dims = j.dimensions as number;
  if (!Number.isInteger(size) || size < 1) bad('size must be a positive integer');
  if (!Number.isInteger(dims) || dims < 1) bad('dimensions must be a positive integer');
  if (dimensions !== undefined && dims !== dimensions) bad(`it has ${dims} fields per draw but the model has ${dimensions}`);
  if (!Number.isInteger(j.seed)) bad('seed must be an integer');
  if (typeof j.data !== 'string') bad('data must be a base64 string');
  const bytes = fromBase64(j.data as string);
  if (bytes === null) bad('data is not base64');
  if (bytes!.length !== size * dims * 4) bad(`data holds ${bytes!.length} bytes, expected ${size * dims * 4}`);
  const view = new DataView(bytes!.buffer, bytes!.byteOffset, bytes!.length);
  const rows = new Float64Array(size * dims);
  for (let i = 0; i < rows.length; i++) {
    const v = view.getFloat32(i * 4, true);
    if (!Number.isFinite(v)) bad(`value ${i + 1} is not finite`);
    rows[i] = v;
  }
  return { size, dimensions: dims, seed: j.seed as number, rows };
}

const B64 = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/';

function toBase64(b: Uint8Array): string {
  const parts: string[] = [];
  let chunk = '';
  for (let i = 0; i < b.length; i += 3) {
    const n = (b[i] << 16) | ((b[i + 1] ?? 0) << 8) | (b[i + 2] ?? 0);
    chunk += B64[(n >> 18) & 63] + B64[(n >> 12) & 63] + (i + 1 < b.length ? B64[(n >> 6) & 63] : '=') + (i + 2 < b.length ? B64[n & 63] : '=');
    if (chunk.length >= 4096) {
      parts.push(chunk);
      chunk = '';
    }
  }
  parts.push(chunk);
  return parts.join('');
}

function fromBase64(s: string): Uint8Array | null {
  if (s.length % 4 !== 0 || !/^[A-Za-z0-9+/]*={0,2}$/.test(s)) return null;
  const pad = s.endsWith('==') ? 2 : s.endsWith('=') ? 1 : 0;
  const out = new Uint8Array((s.length / 4) * 3 - pad);
  let o = 0;
  for (let i = 0; i < s.length; i += 4) {
    const n =
      (B64.indexOf(s[i]) << 18) |
      (B64.indexOf(s[i + 1]) << 12) |
      ((s[i + 2] === '=' ? 0 : B64.indexOf(s[i + 2])) << 6) |
      (s[i + 3] === '=' ? 0 : B64.indexOf(s[i + 3]));
    if (o < out.length) out[o++] = (n >> 16) & 255;
    if (o < out.length) out[o++] = (n >> 8) & 255;
    if (o < out.length) out[o++] = n & 255;
  }
  return out;
}
