/**
 * The hot loops: E-step fused with the M-step's sufficient statistics.
 *
 * One pass over rows [start, end) computes, for each row, the log of
 * w_k·N(x | μ_k, Σ_k) through the inverse Cholesky factor of Σ_k, the
 * log-sum-exp over components (adding it to the log-likelihood) and the
 * responsibilities r_k, then accumulates, per component,
 *   n_k = Σ r,   s1_k = Σ r·δ,   s2_k = Σ r·δδᵀ   with δ = x − μ_k(old).
 * Centering on the old means keeps the one-pass second moment accurate.
 *
 * All functions here are top-level, take flat Float64Array buffers and
 * allocate nothing, so that worker threads can call them on slices of shared memory.
 *
 * Stats layout (see statsLength): [logLikSum, n_0..n_{K-1}, s1 (K·d), s2 (K·m)]
 * with m = d(d+1)/2 (packed lower) for full/tied and m = d for diagonal/spherical.
 */
import { packedSize } from './linalg';

const LOG_2PI = Math.log(2 * Math.PI);

export function statsLength(k: number, d: number, diagonal: boolean): number {
  return 1 + k + k * d + k * (diagonal ? d : packedSize(d));
}

/** Scratch buffer length needed by the kernels. */
export function scratchLength(k: number, d: number): number {
  return k * (d + 1);
}

/**
 * Full (or tied) structure pass. `factors` holds, per component, the packed lower
 * inverse Cholesky factor of Σ_k (K·d(d+1)/2); `logConst[k]` = log w_k − ½d·log2π − ½log|Σ_k|.
 */
export function passFull(
  x: Float64Array,
  start: number,
  end: number,
  d: number,
  k: number,
  means: Float64Array,
  factors: Float64Array,
  logConst: Float64Array,
  scratch: Float64Array,
  stats: Float64Array,
): void {
  const m = (d * (d + 1)) >> 1;
  const kd = k * d;
  const oN = 1;
  const oS1 = 1 + k;
  const oS2 = 1 + k + kd;
  let ll = 0;
  for (let r = start; r < end; r++) {
    const xo = r * d;
    let maxLp = -Infinity;
    for (let c = 0; c < k; c++) {
      const mo = c * d;
      let f = c * m;
      let q = 0;
      for (let i = 0; i < d; i++) {
        const di = x[xo + i] - means[mo + i];
        scratch[mo + i] = di;
        let s = 0;
        for (let j = 0; j <= i; j++) s += factors[f + j] * scratch[mo + j];
        f += i + 1;
        q += s * s;
      }
      const lp = logConst[c] - 0.5 * q;
      scratch[kd + c] = lp;
      if (lp > maxLp) maxLp = lp;
    }
    let sum = 0;
    for (let c = 0; c < k; c++) {
      const e = Math.exp(scratch[kd + c] - maxLp);
      scratch[kd + c] = e;
      sum += e;
    }
    ll += maxLp + Math.log(sum);
    const inv = 1 / sum;
    for (let c = 0; c < k; c++) {
      const w = scratch[kd + c] * inv;
      if (w === 0) continue;
      stats[oN + c] += w;
      const mo = c * d;
      let s2 = oS2 + c * m;
      for (let i = 0; i < d; i++) {
        const wi = w * scratch[mo + i];
        stats[oS1 + mo + i] += wi;
        for (let j = 0; j <= i; j++) stats[s2 + j] += wi * scratch[mo + j];
        s2 += i + 1;
      }
    }
  }
  stats[0] += ll;
}

/**
 * Diagonal (or spherical) structure pass. `factors` holds 1/σ_kj (K·d).
 */
export function passDiag(
  x: Float64Array,
  start: number,
  end: number,
  d: number,
  k: number,
  means: Float64Array,
  factors: Float64Array,
  logConst: Float64Array,
  scratch: Float64Array,
  stats: Float64Array,
): void {
  const kd = k * d;
  const oN = 1;
  const oS1 = 1 + k;
  const oS2 = 1 + k + kd;
  let ll = 0;
  for (let r = start; r < end; r++) {
    const xo = r * d;
    let maxLp = -Infinity;
    for (let c = 0; c < k; c++) {
      const mo = c * d;
      let q = 0;
      for (let i = 0; i < d; i++) {
        const di = x[xo + i] - means[mo + i];
        scratch[mo + i] = di;
        const s = di * factors[mo + i];
        q += s * s;
      }
      const lp = logConst[c] - 0.5 * q;
      scratch[kd + c] = lp;
      if (lp > maxLp) maxLp = lp;
    }
    let sum = 0;
    for (let c = 0; c < k; c++) {
      const e = Math.exp(scratch[kd + c] - maxLp);
      scratch[kd + c] = e;
      sum += e;
    }
    ll += maxLp + Math.log(sum);
    const inv = 1 / sum;
    for (let c = 0; c < k; c++) {
      const w = scratch[kd + c] * inv;
      if (w === 0) continue;
      stats[oN + c] += w;
      const mo = c * d;
      for (let i = 0; i < d; i++) {
        const di = scratch[mo + i];
        const wi = w * di;
        stats[oS1 + mo + i] += wi;
        stats[oS2 + mo + i] += wi * di;
      }
    }
  }
  stats[0] += ll;
}

/**
 * Posterior pass without statistics: writes log density (log Σ_k w_k N(x|k)) of each
 * row to `logDensity[r - start + outOff]` and, if `resp` is non-null, the K
 * responsibilities to `resp[(r - start + outOff)·K + c]`. Returns the sum of log densities.
 * `diagonal` selects the factor layout (see passFull / passDiag).
 */
export function posteriorPass(
  x: Float64Array,
  start: number,
  end: number,
  d: number,
  k: number,
  diagonal: boolean,
  means: Float64Array,
  factors: Float64Array,
  logConst: Float64Array,
  scratch: Float64Array,
  logDensity: Float64Array | null,
  resp: Float64Array | null,
  outOff: number,
): number {
  const m = (d * (d + 1)) >> 1;
  const kd = k * d;
  let total = 0;
  for (let r = start; r < end; r++) {
    const xo = r * d;
    let maxLp = -Infinity;
    for (let c = 0; c < k; c++) {
      const mo = c * d;
      let q = 0;
      if (diagonal) {
        for (let i = 0; i < d; i++) {
          const s = (x[xo + i] - means[mo + i]) * factors[mo + i];
          q += s * s;
        }
      } else {
        let f = c * m;
        for (let i = 0; i < d; i++) {
          scratch[mo + i] = x[xo + i] - means[mo + i];
          let s = 0;
          for (let j = 0; j <= i; j++) s += factors[f + j] * scratch[mo + j];
          f += i + 1;
          q += s * s;
        }
      }
      const lp = logConst[c] - 0.5 * q;
      scratch[kd + c] = lp;
      if (lp > maxLp) maxLp = lp;
    }
    let sum = 0;
    for (let c = 0; c < k; c++) {
      const e = Math.exp(scratch[kd + c] - maxLp);
      scratch[kd + c] = e;
      sum += e;
    }
    const lse = maxLp + Math.log(sum);
    total += lse;
    const o = r - start + outOff;
    if (logDensity !== null) logDensity[o] = lse;
    if (resp !== null) {
      const inv = 1 / sum;
      for (let c = 0; c < k; c++) resp[o * k + c] = scratch[kd + c] * inv;
    }
  }
  return total;
}

export { LOG_2PI };
