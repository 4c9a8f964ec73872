/**
 * Between passes: turn Gaussians into the factors the hot loops read (`prepareFactors`),
 * and turn summed sufficient statistics back into Gaussians (`finishMStep`).
 * Both are O(K·d³) — negligible next to the O(N·K·d²) pass.
 */
import { MixtureError } from './errors';
import { KERNEL_DIAGONAL, KERNEL_QUADRATIC, KERNEL_QUADRATIC_DIAGONAL, KERNEL_TRIANGULAR, LOG_2PI } from './estep';
import { choleskyInto, halfLogDet, invertLowerPacked, packedSize } from './linalg';
import { type Gaussians, isDiagonalStructure } from './types';

/** Same guard as a soft count of exactly zero; added to every n_k as scikit-learn does. */
export const COUNT_EPS = 10 * Number.EPSILON;

export interface Factors {
  diagonal: boolean;
  /** packed lower inverse Cholesky (K·d(d+1)/2) or 1/σ (K·d) */
  factors: Float64Array;
  logConst: Float64Array; // K
  /** which pass kernel the engine should run (KERNEL_* in estep.ts) */
  kernel: number;
  /** quadratic-feature coefficients (K·(d + d(d+1)/2)) and constants (K), full/tied only */
  quad: Float64Array;
  quadConst: Float64Array;
  /** shared centre of the statistics (d): Σ_k w_k μ_k */
  centre: Float64Array;
  /** responsibilities below this add nothing to the statistics (see estep.ts) */
  prune: number;
  /** dense Cholesky and precision scratch (d·d) */
  chol: Float64Array;
  prec: Float64Array;
}

export function allocFactors(k: number, d: number, diagonal: boolean, prune = 0): Factors {
  return {
    diagonal,
    factors: new Float64Array(k * (diagonal ? d : packedSize(d))),
    logConst: new Float64Array(k),
    kernel: diagonal ? KERNEL_DIAGONAL : KERNEL_TRIANGULAR,
    quad: new Float64Array(k * (diagonal ? 2 * d : d + packedSize(d))),
    quadConst: new Float64Array(k),
    centre: new Float64Array(d),
    prune,
    chol: new Float64Array(d * d),
    prec: new Float64Array(d * d),
  };
}

/**
 * Conditioning bound above which the quadratic-feature kernel is not used:
 * max_ij |P_ij|·√(Σ_ii Σ_jj), invariant to feature units (for two features with
 * correlation ρ it is 1/(1−ρ²)). At 1e6 the extra cancellation costs ~1e-10 in a log density.
 */
export const QUADRATIC_CONDITION_LIMIT = 1e6;

/** The array pair the engine hands to runKernel for these factors. */
export function kernelArrays(f: Factors): { factors: Float64Array; consts: Float64Array } {
  return f.kernel === KERNEL_QUADRATIC || f.kernel === KERNEL_QUADRATIC_DIAGONAL
    ? { factors: f.quad, consts: f.quadConst }
    : { factors: f.factors, consts: f.logConst };
}

const HINT =
  'try fewer components, a larger regularisation (regCovar / --reg), or standardised features';

/** Fill `out` from `g`. Throws NOT_POSITIVE_DEFINITE naming the component. */
export function prepareFactors(g: Gaussians, out: Factors): void {
  const { k, d } = g;
  const m = packedSize(d);
  out.centre.fill(0);
  let wsum = 0;
  for (let c = 0; c < k; c++) {
    wsum += g.weights[c];
    for (let i = 0; i < d; i++) out.centre[i] += g.weights[c] * g.means[c * d + i];
  }
  for (let i = 0; i < d; i++) out.centre[i] /= wsum;
  for (let c = 0; c < k; c++) {
    const w = g.weights[c];
    let halfLog = 0;
    if (out.diagonal) {
      for (let i = 0; i < d; i++) {
        const v = g.covs[c * d * d + i * d + i];
        if (!(v > 0) || !Number.isFinite(v)) {
          throw new MixtureError(
            'NOT_POSITIVE_DEFINITE',
            `Component ${c + 1}'s variance of feature ${i + 1} is not positive (${v}); ${HINT}.`,
          );
        }
        const s = Math.sqrt(v);
        out.factors[c * d + i] = 1 / s;
        halfLog += Math.log(s);
      }
    } else {
      if (!choleskyInto(g.covs, c * d * d, d, out.chol, 0)) {
        throw new MixtureError(
          'NOT_POSITIVE_DEFINITE',
          `Component ${c + 1}'s covariance is not positive definite; ${HINT}.`,
        );
      }
      invertLowerPacked(out.chol, 0, d, out.factors, c * m);
      halfLog = halfLogDet(out.chol, 0, d);
    }
    out.logConst[c] = Math.log(w) - 0.5 * d * LOG_2PI - halfLog;
  }
  if (out.diagonal) {
    diagonalQuadraticForm(g, out);
    out.kernel = KERNEL_QUADRATIC_DIAGONAL;
  } else {
    out.kernel = quadraticForm(g, out) ? KERNEL_QUADRATIC : KERNEL_TRIANGULAR;
  }
}

/**
 * Diagonal structures: a_k = [(μ_k − o)/σ², −½/σ²], c_k = log w_k − ½d·log2π − ½log|Σ_k| − ½Σ_j (μ_kj − o_j)²/σ²_kj.
 * (Always well conditioned in the scale-free sense: there are no correlations.)
 */
function diagonalQuadraticForm(g: Gaussians, out: Factors): void {
  const { k, d } = g;
  for (let c = 0; c < k; c++) {
    const a = c * 2 * d;
    let mPm = 0;
    for (let i = 0; i < d; i++) {
      const inv = out.factors[c * d + i] * out.factors[c * d + i];
      const v = g.means[c * d + i] - out.centre[i];
      out.quad[a + i] = inv * v;
      out.quad[a + d + i] = -0.5 * inv;
      mPm += inv * v * v;
    }
    out.quadConst[c] = out.logConst[c] - 0.5 * mPm;
  }
}

/** Fill out.quad / out.quadConst from the packed inverse factors; false if ill-conditioned. */
function quadraticForm(g: Gaussians, out: Factors): boolean {
  const { k, d } = g;
  const m = packedSize(d);
  const t = d + m;
  const P = out.prec;
  let worst = 0;
  for (let c = 0; c < k; c++) {
    const f = c * m;
    // P = FᵀF with F packed lower: P_ij = Σ_{l ≥ max(i,j)} F_li F_lj
    for (let i = 0; i < d; i++) {
      for (let j = 0; j <= i; j++) {
        let s = 0;
        for (let l = i; l < d; l++) s += out.factors[f + (l * (l + 1)) / 2 + i] * out.factors[f + (l * (l + 1)) / 2 + j];
        P[i * d + j] = s;
        P[j * d + i] = s;
      }
    }
    // scale-free conditioning measure: max_ij |P_ij|·√(Σ_ii Σ_jj) (1 for uncorrelated features)
    const co = c * d * d;
    for (let i = 0; i < d; i++) {
      for (let j = 0; j <= i; j++) {
        const v = Math.abs(P[i * d + j]) * Math.sqrt(g.covs[co + i * d + i] * g.covs[co + j * d + j]);
        if (!(v <= worst)) worst = v;
      }
    }
    const a = c * t;
    let mPm = 0;
    for (let i = 0; i < d; i++) {
      let s = 0;
      for (let j = 0; j < d; j++) s += P[i * d + j] * (g.means[c * d + j] - out.centre[j]);
      out.quad[a + i] = s;
      mPm += s * (g.means[c * d + i] - out.centre[i]);
    }
    let p = a + d;
    for (let i = 0; i < d; i++) {
      for (let j = 0; j < i; j++) out.quad[p++] = -P[i * d + j];
      out.quad[p++] = -0.5 * P[i * d + i];
    }
    out.quadConst[c] = out.logConst[c] - 0.5 * mPm;
  }
  return worst <= QUADRATIC_CONDITION_LIMIT;
}

/**
 * M-step from statistics summed over all rows (layout in estep.ts), centred on
 * `centre` (o). Writes the new parameters into `next` (may not alias `prev`).
 *
 *  weights  w_k = n_k / N
 *  means    μ_k = o + s1_k / n_k
 *  full     Σ_k = s2_k / n_k − a aᵀ + reg·I,           a = s1_k / n_k
 *  tied     Σ   = Σ_k (s2_k − n_k a aᵀ) / Σ_k n_k + reg·I
 *  diagonal σ²_kj = s2_kj / n_k − a_j² + reg
 *  spherical σ²_k = mean_j(σ²_kj as in diagonal)
 *
 * A component whose soft count is below `minCount` raises EMPTY_COMPONENT.
 */
export function finishMStep(
  stats: Float64Array,
  centre: Float64Array,
  prev: Gaussians,
  next: Gaussians,
  n: number,
  regCovar: number,
  minCount: number,
  iteration: number,
): void {
  const { k, d, covariance } = prev;
  const diag = isDiagonalStructure(covariance);
  const m = diag ? d : packedSize(d);
  const oS1 = 1 + k;
  const oS2 = 1 + k + k * d;
  const dd = d * d;
  let total = 0;
  for (let c = 0; c < k; c++) {
    const raw = stats[1 + c];
    if (!(raw >= minCount)) {
      throw new MixtureError(
        'EMPTY_COMPONENT',
        `Component ${c + 1} lost its rows at iteration ${iteration} (soft count ${raw.toPrecision(3)}); ${HINT}.`,
      );
    }
    total += raw + COUNT_EPS;
  }
  next.covs.fill(0);
  for (let c = 0; c < k; c++) {
    const nk = stats[1 + c] + COUNT_EPS;
    next.weights[c] = nk / n;
    for (let i = 0; i < d; i++) {
      next.means[c * d + i] = centre[i] + stats[oS1 + c * d + i] / nk;
    }
    const co = c * dd;
    if (diag) {
      for (let i = 0; i < d; i++) {
        const a = stats[oS1 + c * d + i] / nk;
        next.covs[co + i * d + i] = stats[oS2 + c * m + i] / nk - a * a;
      }
    } else {
      let p = oS2 + c * m;
      for (let i = 0; i < d; i++) {
        const ai = stats[oS1 + c * d + i] / nk;
        for (let j = 0; j <= i; j++) {
          const aj = stats[oS1 + c * d + j] / nk;
          next.covs[co + i * d + j] = stats[p + j] / nk - ai * aj;
        }
        p += i + 1;
      }
    }
  }
  if (covariance === 'tied') {
    // pool: Σ = Σ_k n_k Σ_k / Σ_k n_k (lower triangle), into component 0, then copy
    for (let i = 0; i < d; i++) {
      for (let j = 0; j <= i; j++) {
        let s = 0;
        for (let c = 0; c < k; c++) s += (stats[1 + c] + COUNT_EPS) * next.covs[c * dd + i * d + j];
        next.covs[i * d + j] = s / total;
      }
    }
  } else if (covariance === 'spherical') {
    for (let c = 0; c < k; c++) {
      let s = 0;
      for (let i = 0; i < d; i++) s += next.covs[c * dd + i * d + i];
      for (let i = 0; i < d; i++) next.covs[c * dd + i * d + i] = s / d;
    }
  }
  const last = covariance === 'tied' ? 1 : k;
  for (let c = 0; c < last; c++) {
    const co = c * dd;
    for (let i = 0; i < d; i++) {
      next.covs[co + i * d + i] += regCovar;
      for (let j = 0; j < i; j++) next.covs[co + j * d + i] = next.covs[co + i * d + j];
    }
  }
  if (covariance === 'tied') for (let c = 1; c < k; c++) next.covs.copyWithin(c * dd, 0, dd);
  for (let c = 0; c < k * dd; c++) {
    if (!Number.isFinite(next.covs[c])) {
      throw new MixtureError('NOT_POSITIVE_DEFINITE', `A covariance became non-finite at iteration ${iteration}; ${HINT}.`);
    }
  }
}

export function cloneGaussians(g: Gaussians): Gaussians {
  return {
    k: g.k,
    d: g.d,
    covariance: g.covariance,
    weights: g.weights.slice(),
    means: g.means.slice(),
    covs: g.covs.slice(),
  };
}

export function allocGaussians(k: number, d: number, covariance: Gaussians['covariance']): Gaussians {
  return {
    k,
    d,
    covariance,
    weights: new Float64Array(k),
    means: new Float64Array(k * d),
    covs: new Float64Array(k * d * d),
  };
}
