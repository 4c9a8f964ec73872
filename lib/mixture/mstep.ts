/**
 * Between passes: turn Gaussians into the factors the hot loops read (`prepareFactors`),
 * and turn summed sufficient statistics back into Gaussians (`finishMStep`).
 * Both are O(K·d³) — negligible next to the O(N·K·d²) pass.
 */
import { MixtureError } from './errors';
import { LOG_2PI } from './estep';
import { choleskyInto, halfLogDet, invertLowerPacked, packedSize } from './linalg';
import { type Gaussians, isDiagonalStructure } from './types';

/** Same guard as a soft count of exactly zero; added to every n_k as scikit-learn does. */
export const COUNT_EPS = 10 * Number.EPSILON;

export interface Factors {
  diagonal: boolean;
  /** packed lower inverse Cholesky (K·d(d+1)/2) or 1/σ (K·d) */
  factors: Float64Array;
  logConst: Float64Array; // K
  /** dense Cholesky scratch (d·d) */
  chol: Float64Array;
}

export function allocFactors(k: number, d: number, diagonal: boolean): Factors {
  return {
    diagonal,
    factors: new Float64Array(k * (diagonal ? d : packedSize(d))),
    logConst: new Float64Array(k),
    chol: new Float64Array(d * d),
  };
}

const HINT =
  'try fewer components, a larger regularisation (regCovar / --reg), or standardised features';

/** Fill `out` from `g`. Throws NOT_POSITIVE_DEFINITE naming the component. */
export function prepareFactors(g: Gaussians, out: Factors): void {
  const { k, d } = g;
  const m = packedSize(d);
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
}

/**
 * M-step from statistics summed over all rows (layout in estep.ts), centred on
 * `prev.means`. Writes the new parameters into `next` (may not alias `prev`).
 *
 *  weights  w_k = n_k / N
 *  means    μ_k = μ_k(old) + s1_k / n_k
 *  full     Σ_k = s2_k / n_k − a aᵀ + reg·I,           a = s1_k / n_k
 *  tied     Σ   = Σ_k (s2_k − n_k a aᵀ) / Σ_k n_k + reg·I
 *  diagonal σ²_kj = s2_kj / n_k − a_j² + reg
 *  spherical σ²_k = mean_j(σ²_kj as in diagonal)
 *
 * A component whose soft count is below `minCount` raises EMPTY_COMPONENT.
 */
export function finishMStep(
  stats: Float64Array,
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
      next.means[c * d + i] = prev.means[c * d + i] + stats[oS1 + c * d + i] / nk;
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
