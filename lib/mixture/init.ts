/**
 * Starting parameters for EM.
 *  - 'kmeans++': k-means++ seeding + Lloyd, then weights, means and covariances of the
 *    hard clusters (each with the regularisation added).
 *  - 'points':   K distinct random rows as means, uniform weights, pooled covariance.
 *  - { means }:  the given means, uniform weights, pooled covariance.
 * "Pooled covariance" = biased (÷N) covariance of all rows + reg·I, projected onto the
 * structure: full/tied use it whole, diagonal keeps its diagonal, spherical the mean of
 * its diagonal.
 */
import { MixtureError } from './errors';
import { statsLength } from './estep';
import { kmeansPlusPlus } from './kmeans';
import { packedSize } from './linalg';
import { allocGaussians, finishMStep } from './mstep';
import type { SeededRandom } from './prng';
import { type Covariance, type Gaussians, isDiagonalStructure } from './types';

export type InitMethod = 'kmeans++' | 'points' | { means: number[][] };

/** Biased covariance of all rows (d·d) and their mean (d). */
export function pooledMoments(x: Float64Array, n: number, d: number): { mean: Float64Array; cov: Float64Array } {
  const mean = new Float64Array(d);
  for (let r = 0; r < n; r++) for (let j = 0; j < d; j++) mean[j] += x[r * d + j];
  for (let j = 0; j < d; j++) mean[j] /= n;
  const cov = new Float64Array(d * d);
  for (let r = 0; r < n; r++) {
    for (let i = 0; i < d; i++) {
      const di = x[r * d + i] - mean[i];
      for (let j = 0; j <= i; j++) cov[i * d + j] += di * (x[r * d + j] - mean[j]);
    }
  }
  for (let i = 0; i < d; i++) {
    for (let j = 0; j <= i; j++) {
      cov[i * d + j] /= n;
      cov[j * d + i] = cov[i * d + j];
    }
  }
  return { mean, cov };
}

/** Pooled covariance + reg projected on a structure, as one d·d matrix. */
export function pooledCovariance(x: Float64Array, n: number, d: number, covariance: Covariance, reg: number): Float64Array {
  const { cov } = pooledMoments(x, n, d);
  if (covariance === 'diagonal' || covariance === 'spherical') {
    let mean = 0;
    for (let i = 0; i < d; i++) mean += cov[i * d + i];
    mean /= d;
    for (let i = 0; i < d; i++) {
      for (let j = 0; j < d; j++) {
        if (i !== j) cov[i * d + j] = 0;
        else if (covariance === 'spherical') cov[i * d + i] = mean;
      }
    }
  }
  for (let i = 0; i < d; i++) cov[i * d + i] += reg;
  return cov;
}

export function initialGaussians(
  x: Float64Array,
  n: number,
  d: number,
  k: number,
  covariance: Covariance,
  init: InitMethod,
  reg: number,
  rng: SeededRandom,
): Gaussians {
  const g = allocGaussians(k, d, covariance);
  if (init === 'kmeans++') {
    const { centers, labels } = kmeansPlusPlus(x, n, d, k, rng);
    const diag = isDiagonalStructure(covariance);
    const stats = new Float64Array(statsLength(k, d, diag));
    const m = diag ? d : packedSize(d);
    const oS1 = 1 + k;
    const oS2 = 1 + k + k * d;
    // hard-label statistics, centred on the data mean (same layout as the EM pass)
    const { mean: centre } = pooledMoments(x, n, d);
    for (let r = 0; r < n; r++) {
      const c = labels[r];
      stats[1 + c] += 1;
      let p = oS2 + c * m;
      for (let i = 0; i < d; i++) {
        const ui = x[r * d + i] - centre[i];
        stats[oS1 + c * d + i] += ui;
        if (diag) stats[p + i] += ui * ui;
        else {
          for (let j = 0; j <= i; j++) stats[p + j] += ui * (x[r * d + j] - centre[j]);
          p += i + 1;
        }
      }
    }
    const prev = allocGaussians(k, d, covariance);
    prev.means.set(centers);
    finishMStep(stats, centre, prev, g, n, reg, 0.5, 0);
    return g;
  }
  const cov = pooledCovariance(x, n, d, covariance, reg);
  g.weights.fill(1 / k);
  for (let c = 0; c < k; c++) g.covs.set(cov, c * d * d);
  if (init === 'points') {
    if (n < k) throw new MixtureError('TOO_FEW_ROWS', `Need at least ${k} rows for ${k} components, got ${n}.`);
    // partial Fisher–Yates over row indices: K distinct rows
    const idx = new Int32Array(n);
    for (let i = 0; i < n; i++) idx[i] = i;
    for (let c = 0; c < k; c++) {
      const j = c + rng.int(n - c);
      const t = idx[c];
      idx[c] = idx[j];
      idx[j] = t;
      for (let i = 0; i < d; i++) g.means[c * d + i] = x[idx[c] * d + i];
    }
    return g;
  }
  const means = init.means;
  if (!Array.isArray(means) || means.length !== k || means.some((r) => !Array.isArray(r) || r.length !== d)) {
    throw new MixtureError('BAD_INPUT', `Given initial means must be ${k} rows of ${d} numbers.`);
  }
  for (let c = 0; c < k; c++) {
    for (let i = 0; i < d; i++) {
      const v = means[c][i];
      if (!Number.isFinite(v)) throw new MixtureError('BAD_INPUT', `Initial mean ${c + 1} has a non-finite value.`);
      g.means[c * d + i] = v;
    }
  }
  return g;
}
