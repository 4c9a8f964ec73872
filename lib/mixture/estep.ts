/**
 * The hot loops: E-step fused with the M-step's sufficient statistics.
 *
 * One pass over rows [start, end) computes, for each row, the log of
 * w_k·N(x | μ_k, Σ_k) — by default in quadratic-feature form (passQuadratic), or through
 * the inverse Cholesky factor of Σ_k (passFull, triangular form, δ = x − μ_k) when the
 * covariances are ill-conditioned — the log-sum-exp over components (added to the
 * log-likelihood) and the responsibilities r_k, then accumulates, per component,
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

/** Scratch length that fits every kernel's layout (see each kernel). */
export function scratchLength(k: number, d: number): number {
  return Math.max(k * (d + 1) + d + packedSize(d), QUAD_BLOCK * (d + packedSize(d) + k));
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

/** Rows per block in passQuadratic. */
export const QUAD_BLOCK = 64;

/**
 * Quadratic-feature pass, the fast path for every structure. With u = x − o
 * and φ = [u, packed uuᵀ] (shared by all components, and needed for the statistics
 * anyway), log w_k·N(x | k) = c_k + a_k·φ, a single dot product of length d + d(d+1)/2:
 *   a_k = [P_k(μ_k − o), −½·P_k packed with doubled off-diagonals],  P_k = Σ_k⁻¹,
 *   c_k = log w_k − ½d·log2π − ½log|Σ_k| − ½(μ_k − o)ᵀP_k(μ_k − o).
 * For diagonal and spherical structures (`diagonal` true) φ = [u, u²] and the statistics
 * are the diagonal ones.
 * It cancels more than the triangular form, so prepareFactors only selects it when the
 * precision matrices are well conditioned (see mstep.ts); otherwise passFull runs.
 * Components more than 40 nats below the row's best are not exponentiated
 * (e⁻⁴⁰ ≈ 4·10⁻¹⁸ is below double resolution next to the best term's 1).
 *
 * Rows go in blocks of QUAD_BLOCK: the block's features Φ (B×t) are formed once, the log
 * densities are the small product Φ·Aᵀ and the statistics the product Wᵀ·Φ (W the B×K
 * responsibilities), both tiled so that every value loaded feeds several sums.
 * Scratch layout: Φ (B·t, row-major) | W (B·K, row-major).
 *
 * Scoring use: with `stats` null the statistics are skipped; `logDensity[r − start]` and
 * `resp[(r − start)·K + c]` receive each row's log density and responsibilities when given.
 * Returns the sum of the rows' log densities.
 */
export function passQuadratic(
  x: Float64Array,
  start: number,
  end: number,
  d: number,
  k: number,
  diagonal: boolean,
  coef: Float64Array,
  quadConst: Float64Array,
  centre: Float64Array,
  prune: number,
  scratch: Float64Array,
  stats: Float64Array | null,
  logDensity: Float64Array | null = null,
  resp: Float64Array | null = null,
): number {
  const B = QUAD_BLOCK;
  const m = diagonal ? d : (d * (d + 1)) >> 1;
  const t = d + m;
  const t4 = t & ~3;
  const oW = B * t;
  // Φ block (B·t, row-major) | W block (B·k, row-major)
  const oS1 = 1 + k;
  const oS2 = 1 + k + k * d;
  let ll = 0;
  for (let r0 = start; r0 < end; r0 += B) {
    const b = Math.min(B, end - r0);
    // features φ_r = [u, packed uuᵀ] (diagonal structures: [u, u²]), u = x_r − o
    for (let r = 0; r < b; r++) {
      const xo = (r0 + r) * d;
      const fo = r * t;
      if (diagonal) {
        for (let i = 0; i < d; i++) {
          const ui = x[xo + i] - centre[i];
          scratch[fo + i] = ui;
          scratch[fo + d + i] = ui * ui;
        }
        continue;
      }
      let p = fo + d;
      for (let i = 0; i < d; i++) {
        const ui = x[xo + i] - centre[i];
        scratch[fo + i] = ui;
        for (let j = 0; j < i; j++) scratch[p++] = ui * scratch[fo + j];
        scratch[p++] = ui * ui;
      }
    }
    // log w_k N(x_r | k) = c_k + a_k·φ_r for the block: Φ Aᵀ, tiled 2 rows × 2 components
    let r = 0;
    // 4 rows × 2 components: 6 loads feed 8 multiply-adds
    for (; r + 3 < b; r += 4) {
      const f0 = r * t;
      const f1 = f0 + t;
      const f2 = f1 + t;
      const f3 = f2 + t;
      let c = 0;
      for (; c + 1 < k; c += 2) {
        const a0 = c * t;
        const a1 = a0 + t;
        const ka = quadConst[c];
        const kb = quadConst[c + 1];
        let s0a = ka;
        let s0b = kb;
        let s1a = ka;
        let s1b = kb;
        let s2a = ka;
        let s2b = kb;
        let s3a = ka;
        let s3b = kb;
        for (let q = 0; q < t; q++) {
          const ca = coef[a0 + q];
          const cb = coef[a1 + q];
          const p0 = scratch[f0 + q];
          const p1 = scratch[f1 + q];
          const p2 = scratch[f2 + q];
          const p3 = scratch[f3 + q];
          s0a += ca * p0;
          s0b += cb * p0;
          s1a += ca * p1;
          s1b += cb * p1;
          s2a += ca * p2;
          s2b += cb * p2;
          s3a += ca * p3;
          s3b += cb * p3;
        }
        const w0 = oW + r * k + c;
        scratch[w0] = s0a;
        scratch[w0 + 1] = s0b;
        scratch[w0 + k] = s1a;
        scratch[w0 + k + 1] = s1b;
        scratch[w0 + 2 * k] = s2a;
        scratch[w0 + 2 * k + 1] = s2b;
        scratch[w0 + 3 * k] = s3a;
        scratch[w0 + 3 * k + 1] = s3b;
      }
      for (; c < k; c++) {
        const a0 = c * t;
        let s0 = quadConst[c];
        let s1 = s0;
        let s2 = s0;
        let s3 = s0;
        for (let q = 0; q < t; q++) {
          const ca = coef[a0 + q];
          s0 += ca * scratch[f0 + q];
          s1 += ca * scratch[f1 + q];
          s2 += ca * scratch[f2 + q];
          s3 += ca * scratch[f3 + q];
        }
        scratch[oW + r * k + c] = s0;
        scratch[oW + (r + 1) * k + c] = s1;
        scratch[oW + (r + 2) * k + c] = s2;
        scratch[oW + (r + 3) * k + c] = s3;
      }
    }
    for (; r + 1 < b; r += 2) {
      const f0 = r * t;
      const f1 = f0 + t;
      let c = 0;
      for (; c + 1 < k; c += 2) {
        const a0 = c * t;
        const a1 = a0 + t;
        let s00 = quadConst[c];
        let s01 = quadConst[c + 1];
        let s10 = s00;
        let s11 = s01;
        for (let q = 0; q < t; q++) {
          const p0 = scratch[f0 + q];
          const p1 = scratch[f1 + q];
          const ca = coef[a0 + q];
          const cb = coef[a1 + q];
          s00 += ca * p0;
          s01 += cb * p0;
          s10 += ca * p1;
          s11 += cb * p1;
        }
        scratch[oW + r * k + c] = s00;
        scratch[oW + r * k + c + 1] = s01;
        scratch[oW + (r + 1) * k + c] = s10;
        scratch[oW + (r + 1) * k + c + 1] = s11;
      }
      for (; c < k; c++) {
        const a0 = c * t;
        let s0 = quadConst[c];
        let s1 = s0;
        for (let q = 0; q < t; q++) {
          s0 += coef[a0 + q] * scratch[f0 + q];
          s1 += coef[a0 + q] * scratch[f1 + q];
        }
        scratch[oW + r * k + c] = s0;
        scratch[oW + (r + 1) * k + c] = s1;
      }
    }
    for (; r < b; r++) {
      for (let c = 0; c < k; c++) {
        let s0 = quadConst[c];
        for (let q = 0; q < t; q++) s0 += coef[c * t + q] * scratch[r * t + q];
        scratch[oW + r * k + c] = s0;
      }
    }
    // per row: log-sum-exp, responsibilities (terms 40 nats below the best are 0)
    for (let r = 0; r < b; r++) {
      const wo = oW + r * k;
      let maxLp = -Infinity;
      for (let c = 0; c < k; c++) if (scratch[wo + c] > maxLp) maxLp = scratch[wo + c];
      let sum = 0;
      const floor = maxLp - 40;
      for (let c = 0; c < k; c++) {
        const lp = scratch[wo + c];
        const e = lp < floor ? 0 : Math.exp(lp - maxLp);
        scratch[wo + c] = e;
        sum += e;
      }
      const lse = maxLp + Math.log(sum);
      ll += lse;
      const inv = 1 / sum;
      for (let c = 0; c < k; c++) {
        const w = scratch[wo + c] * inv;
        scratch[wo + c] = w < prune ? 0 : w;
      }
      const o = r0 + r - start;
      if (logDensity !== null) logDensity[o] = lse;
      if (resp !== null) for (let c = 0; c < k; c++) resp[o * k + c] = scratch[wo + c];
    }
    if (stats === null) continue;
    // statistics: n_k = Σ_r W_rk;  [s1_k, s2_k] = Σ_r W_rk φ_r — a small Wᵀ Φ product,
    // tiled 2 components × 4 features so each loaded value feeds several sums
    for (let c = 0; c < k; c++) {
      let s = 0;
      for (let r = 0; r < b; r++) s += scratch[oW + r * k + c];
      stats[1 + c] += s;
    }
    let c = 0;
    for (; c + 1 < k; c += 2) {
      let q = 0;
      for (; q < t4; q += 4) {
        let a0 = 0, a1 = 0, a2 = 0, a3 = 0, b0 = 0, b1 = 0, b2 = 0, b3 = 0;
        for (let r = 0; r < b; r++) {
          const w0 = scratch[oW + r * k + c];
          const w1 = scratch[oW + r * k + c + 1];
          const fo = r * t + q;
          const f0 = scratch[fo];
          const f1 = scratch[fo + 1];
          const f2 = scratch[fo + 2];
          const f3 = scratch[fo + 3];
          a0 += w0 * f0;
          a1 += w0 * f1;
          a2 += w0 * f2;
          a3 += w0 * f3;
          b0 += w1 * f0;
          b1 += w1 * f1;
          b2 += w1 * f2;
          b3 += w1 * f3;
        }
        addStat(stats, c, q, a0, d, m, oS1, oS2);
        addStat(stats, c, q + 1, a1, d, m, oS1, oS2);
        addStat(stats, c, q + 2, a2, d, m, oS1, oS2);
        addStat(stats, c, q + 3, a3, d, m, oS1, oS2);
        addStat(stats, c + 1, q, b0, d, m, oS1, oS2);
        addStat(stats, c + 1, q + 1, b1, d, m, oS1, oS2);
        addStat(stats, c + 1, q + 2, b2, d, m, oS1, oS2);
        addStat(stats, c + 1, q + 3, b3, d, m, oS1, oS2);
      }
      for (; q < t; q++) {
        let a0 = 0;
        let b0 = 0;
        for (let r = 0; r < b; r++) {
          const f = scratch[r * t + q];
          a0 += scratch[oW + r * k + c] * f;
          b0 += scratch[oW + r * k + c + 1] * f;
        }
        addStat(stats, c, q, a0, d, m, oS1, oS2);
        addStat(stats, c + 1, q, b0, d, m, oS1, oS2);
      }
    }
    for (; c < k; c++) {
      for (let q = 0; q < t; q++) {
        let a0 = 0;
        for (let r = 0; r < b; r++) a0 += scratch[oW + r * k + c] * scratch[r * t + q];
        addStat(stats, c, q, a0, d, m, oS1, oS2);
      }
    }
  }
  if (stats !== null) stats[0] += ll;
  return ll;
}

/** Feature q of φ: q < d is s1[c][q], otherwise s2[c][q − d]. */
function addStat(stats: Float64Array, c: number, q: number, v: number, d: number, m: number, oS1: number, oS2: number): void {
  if (q < d) stats[oS1 + c * d + q] += v;
  else stats[oS2 + c * m + q - d] += v;
}

export const KERNEL_TRIANGULAR = 0;
export const KERNEL_QUADRATIC = 1;
export const KERNEL_DIAGONAL = 2;
/** quadratic-feature kernel with φ = [u, u²] for diagonal and spherical structures */
export const KERNEL_QUADRATIC_DIAGONAL = 3;

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
  if (kernel === KERNEL_QUADRATIC || kernel === KERNEL_QUADRATIC_DIAGONAL) {
    passQuadratic(x, start, end, d, k, kernel === KERNEL_QUADRATIC_DIAGONAL, factors, consts, centre, prune, scratch, stats);
  }
  else if (kernel === KERNEL_DIAGONAL) passDiag(x, start, end, d, k, means, factors, consts, centre, prune, scratch, stats);
  else passFull(x, start, end, d, k, means, factors, consts, centre, prune, scratch, stats);
}

/**
 * Rows per block of the E-step sums. Every engine sums each block on its own and adds the
 * blocks in row order, so a fit is the same to the last bit whatever the thread count:
 * threads only decide who computes which blocks, never how the sums are grouped.
 */
export const PASS_BLOCK_ROWS = 2048;

export function passBlocks(n: number): number {
  return Math.max(1, Math.ceil(n / PASS_BLOCK_ROWS));
}

/** runKernel over blocks [firstBlock, endBlock), each into its own slot of `blockStats` (blocks × sl). */
export function runKernelBlocks(
  kernel: number,
  x: Float64Array,
  firstBlock: number,
  endBlock: number,
  n: number,
  d: number,
  k: number,
  means: Float64Array,
  factors: Float64Array,
  consts: Float64Array,
  centre: Float64Array,
  prune: number,
  scratch: Float64Array,
  blockStats: Float64Array,
  sl: number,
): void {
  for (let b = firstBlock; b < endBlock; b++) {
    const stats = blockStats.subarray(b * sl, (b + 1) * sl);
    stats.fill(0);
    const start = b * PASS_BLOCK_ROWS;
    runKernel(kernel, x, start, Math.min(n, start + PASS_BLOCK_ROWS), d, k, means, factors, consts, centre, prune, scratch, stats);
  }
}

/** out[0..sl) = Σ over blocks in order (the one grouping of the sums every engine uses). */
export function sumBlocks(blockStats: Float64Array, blocks: number, sl: number, out: Float64Array): void {
  out.fill(0);
  for (let b = 0; b < blocks; b++) {
    const o = b * sl;
    for (let i = 0; i < sl; i++) out[i] += blockStats[o + i];
  }
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
