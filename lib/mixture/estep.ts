/**
 * The hot loops: E-step fused with the M-step's sufficient statistics.
 *
 * One pass over rows [start, end) computes, for each row, the log of
 * w_k·N(x | μ_k, Σ_k) through the inverse Cholesky factor of Σ_k (triangular form,
 * δ = x − μ_k), the log-sum-exp over components (added to the log-likelihood) and the
 * responsibilities r_k, then accumulates, per component,
 *   n_k = Σ r,   s1_k = Σ r·u,   s2_k = Σ r·uuᵀ   with u = x − o,
 * where o is one shared centre per pass (the weighted mean of the current means).
 * The products uuᵀ are formed once per row and shared by all components, which is
 * what makes the statistics cheap; centring on o keeps the one-pass second moment
 * accurate (o is the data mean after the first M-step).
 *
 * Pruning: a responsibility below `prune` (default 1e-15, see em.ts) adds nothing to
 * the statistics. The neglected mass per row is < K·prune, below the rounding error of
 * summing N terms in double precision, and the log-likelihood is always exact.
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

/** Scratch buffer length needed by the kernels: δ (K·d) | log p (K) | u (d) | uuᵀ (m). */
export function scratchLength(k: number, d: number): number {
  return k * (d + 1) + d + packedSize(d);
}

/**
 * Full (or tied) structure pass. `factors` holds, per component, the packed lower
 * inverse Cholesky factor of Σ_k (K·d(d+1)/2); `logConst[k]` = log w_k − ½d·log2π − ½log|Σ_k|;
 * `centre` (d) is the shared centre o of the statistics.
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
  centre: Float64Array,
  prune: number,
  scratch: Float64Array,
  stats: Float64Array,
): void {
  const m = (d * (d + 1)) >> 1;
  const kd = k * d;
  const oU = kd + k;
  const oUU = oU + d;
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
    // shared centred products u and uuᵀ (packed lower)
    let p = oUU;
    for (let i = 0; i < d; i++) {
      const ui = x[xo + i] - centre[i];
      scratch[oU + i] = ui;
      for (let j = 0; j < i; j++) scratch[p++] = ui * scratch[oU + j];
      scratch[p++] = ui * ui;
    }
    const inv = 1 / sum;
    for (let c = 0; c < k; c++) {
      const w = scratch[kd + c] * inv;
      if (w < prune || w === 0) continue;
      stats[1 + c] += w;
      const s1 = oS1 + c * d;
      for (let i = 0; i < d; i++) stats[s1 + i] += w * scratch[oU + i];
      const s2 = oS2 + c * m;
      for (let q = 0; q < m; q++) stats[s2 + q] += w * scratch[oUU + q];
    }
  }
  stats[0] += ll;
}

/**
 * Full (or tied) structure pass in quadratic-feature form, the fast path. With u = x − o
 * and φ = [u, packed uuᵀ] (shared by all components, and needed for the statistics
 * anyway), log w_k·N(x | k) = c_k + a_k·φ, a single dot product of length d + d(d+1)/2:
 *   a_k = [P_k(μ_k − o), −½·P_k packed with doubled off-diagonals],  P_k = Σ_k⁻¹,
 *   c_k = log w_k − ½d·log2π − ½log|Σ_k| − ½(μ_k − o)ᵀP_k(μ_k − o).
 * It cancels more than the triangular form, so prepareFactors only selects it when the
 * precision matrices are well conditioned (see mstep.ts); otherwise passFull runs.
 * Components more than 40 nats below the row's best are not exponentiated
 * (e⁻⁴⁰ ≈ 4·10⁻¹⁸ is below double resolution next to the best term's 1).
 */
export function passQuadratic(
  x: Float64Array,
  start: number,
  end: number,
  d: number,
  k: number,
  coef: Float64Array,
  quadConst: Float64Array,
  centre: Float64Array,
  prune: number,
  scratch: Float64Array,
  stats: Float64Array,
): void {
  const m = (d * (d + 1)) >> 1;
  const t = d + m;
  const kd = k * d;
  const oU = kd + k;
  const oUU = oU + d;
  const oS1 = 1 + k;
  const oS2 = 1 + k + kd;
  let ll = 0;
  for (let r = start; r < end; r++) {
    const xo = r * d;
    let p = oUU;
    for (let i = 0; i < d; i++) {
      const ui = x[xo + i] - centre[i];
      scratch[oU + i] = ui;
      for (let j = 0; j < i; j++) scratch[p++] = ui * scratch[oU + j];
      scratch[p++] = ui * ui;
    }
    let maxLp = -Infinity;
    for (let c = 0; c < k; c++) {
      const a = c * t;
      let lp = quadConst[c];
      for (let q = 0; q < t; q++) lp += coef[a + q] * scratch[oU + q];
      scratch[kd + c] = lp;
      if (lp > maxLp) maxLp = lp;
    }
    let sum = 0;
    const floor = maxLp - 40;
    for (let c = 0; c < k; c++) {
      const lp = scratch[kd + c];
      if (lp < floor) {
        scratch[kd + c] = 0;
        continue;
      }
      const e = Math.exp(lp - maxLp);
      scratch[kd + c] = e;
      sum += e;
    }
    ll += maxLp + Math.log(sum);
    const inv = 1 / sum;
    for (let c = 0; c < k; c++) {
      const w = scratch[kd + c] * inv;
      if (w < prune || w === 0) continue;
      stats[1 + c] += w;
      const s1 = oS1 + c * d;
      for (let i = 0; i < d; i++) stats[s1 + i] += w * scratch[oU + i];
      const s2 = oS2 + c * m;
      for (let q = 0; q < m; q++) stats[s2 + q] += w * scratch[oUU + q];
    }
  }
  stats[0] += ll;
}

export const KERNEL_TRIANGULAR = 0;
export const KERNEL_QUADRATIC = 1;
export const KERNEL_DIAGONAL = 2;

/**
 * Dispatch to one kernel. `factors`/`consts` are the kernel's own arrays: triangular
 * factors + logConst, quadratic coefficients + quadConst, or 1/σ + logConst.
 */
export function runKernel(
  kernel: number,
  x: Float64Array,
  start: number,
  end: number,
  d: number,
  k: number,
  means: Float64Array,
  factors: Float64Array,
  consts: Float64Array,
  centre: Float64Array,
  prune: number,
  scratch: Float64Array,
  stats: Float64Array,
): void {
  if (kernel === KERNEL_QUADRATIC) passQuadratic(x, start, end, d, k, factors, consts, centre, prune, scratch, stats);
  else if (kernel === KERNEL_DIAGONAL) passDiag(x, start, end, d, k, means, factors, consts, centre, prune, scratch, stats);
  else passFull(x, start, end, d, k, means, factors, consts, centre, prune, scratch, stats);
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
  centre: Float64Array,
  prune: number,
  scratch: Float64Array,
  stats: Float64Array,
): void {
  const kd = k * d;
  const oU = kd + k;
  const oUU = oU + d;
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
        const s = (x[xo + i] - means[mo + i]) * factors[mo + i];
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
    for (let i = 0; i < d; i++) {
      const ui = x[xo + i] - centre[i];
      scratch[oU + i] = ui;
      scratch[oUU + i] = ui * ui;
    }
    const inv = 1 / sum;
    for (let c = 0; c < k; c++) {
      const w = scratch[kd + c] * inv;
      if (w < prune || w === 0) continue;
      stats[1 + c] += w;
      const s1 = oS1 + c * d;
      const s2 = oS2 + c * d;
      for (let i = 0; i < d; i++) {
        stats[s1 + i] += w * scratch[oU + i];
        stats[s2 + i] += w * scratch[oUU + i];
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
