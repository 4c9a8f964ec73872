/**
 * Closed-form and structural properties of EM, on seeded synthetic data invented here.
 */
import { describe, expect, it } from 'vitest';
import { COVARIANCES, fitMixture, scoreRow, scoreRows, buildModel } from '../../../lib/mixture';
import { pooledMoments } from '../../../lib/mixture/init';
import { synthBlobs } from './helpers';

describe('one component = sample mean + biased sample covariance + regularisation', () => {
  const n = 400;
  const d = 3;
  const { x } = synthBlobs(11, n, d, 2);
  const { mean, cov } = pooledMoments(x, n, d);
  // independent two-pass computation for the expectation
  const mu = [0, 1, 2].map((j) => {
    let s = 0;
    for (let r = 0; r < n; r++) s += x[r * d + j];
    return s / n;
  });
  const biased = (i: number, j: number) => {
    let s = 0;
    for (let r = 0; r < n; r++) s += (x[r * d + i] - mu[i]) * (x[r * d + j] - mu[j]);
    return s / n;
  };
  const reg = 0.01;

  it('pooled moments helper agrees with the direct formula', () => {
    for (let j = 0; j < d; j++) expect(mean[j]).toBeCloseTo(mu[j], 12);
    expect(cov[1 * d + 2]).toBeCloseTo(biased(1, 2), 12);
  });

  it.each(COVARIANCES)('%s', (covariance) => {
    const fit = fitMixture(x, n, d, { components: 1, covariance, regCovar: reg, standardize: false, tol: 1e-12 });
    expect(fit.weights[0]).toBeCloseTo(1, 12);
    for (let j = 0; j < d; j++) expect(fit.means[0][j]).toBeCloseTo(mu[j], 10);
    const meanVar = (biased(0, 0) + biased(1, 1) + biased(2, 2)) / 3;
    for (let i = 0; i < d; i++) {
      for (let j = 0; j < d; j++) {
        let want: number;
        if (covariance === 'full' || covariance === 'tied') want = biased(i, j) + (i === j ? reg : 0);
        else if (covariance === 'diagonal') want = i === j ? biased(i, i) + reg : 0;
        else want = i === j ? meanVar + reg : 0;
        expect(fit.covariances[0][i][j]).toBeCloseTo(want, 10);
      }
    }
    // one EM step reaches the optimum; the second only confirms it
    expect(fit.iterations).toBe(2);
    expect(fit.converged).toBe(true);
  });

  it('with standardisation the regularisation is added in z units (reg·scale² in original units)', () => {
    const fit = fitMixture(x, n, d, { components: 1, covariance: 'full', regCovar: reg, standardize: true });
    const s = fit.scaler!;
    for (let i = 0; i < d; i++) {
      expect(fit.covariances[0][i][i]).toBeCloseTo(biased(i, i) + reg * s.scale[i] ** 2, 9);
      expect(fit.covariances[0][i][(i + 1) % d]).toBeCloseTo(biased(i, (i + 1) % d), 9);
    }
  });
});

describe('EM never decreases the likelihood with regularisation 0 (Dempster, Laird & Rubin 1977)', () => {
  const n = 600;
  const d = 3;
  const { x } = synthBlobs(5, n, d, 4, 3);
  for (const covariance of COVARIANCES) {
    for (const init of ['kmeans++', 'points'] as const) {
      it(`${covariance}, ${init}`, () => {
        const fit = fitMixture(x, n, d, { components: 4, covariance, init, regCovar: 0, tol: 0, maxIter: 60, seed: 3, standardize: false });
        expect(fit.trace.length).toBe(60);
        for (let t = 1; t < fit.trace.length; t++) {
          expect(fit.trace[t]).toBeGreaterThanOrEqual(fit.trace[t - 1] - 1e-12 * Math.abs(fit.trace[t - 1]));
        }
        expect(fit.meanLogLikelihood).toBeGreaterThanOrEqual(fit.trace[fit.trace.length - 1] - 1e-12);
        // and it actually moved (the check is not vacuous)
        expect(fit.trace[fit.trace.length - 1]).toBeGreaterThan(fit.trace[0]);
      });
    }
  }
});

describe('membership probabilities sum to 1 per row', () => {
  const n = 500;
  const d = 4;
  const { x } = synthBlobs(8, n, d, 3);
  it.each(COVARIANCES)('%s', (covariance) => {
    const fit = fitMixture(x, n, d, { components: 3, covariance, seed: 2 });
    const model = buildModel(x, n, d, fit);
    const b = scoreRows(model, x, n);
    for (let r = 0; r < n; r++) {
      let s = 0;
      for (let c = 0; c < 3; c++) {
        const p = b.probabilities[r * 3 + c];
        expect(p).toBeGreaterThanOrEqual(0);
        expect(p).toBeLessThanOrEqual(1);
        s += p;
      }
      expect(Math.abs(s - 1)).toBeLessThan(1e-12);
    }
    // a far-away point still gets a proper distribution (log-sum-exp, no NaN)
    const far = scoreRow(model, [1e4, -1e4, 1e4, 1e4]);
    expect(far.probabilities.reduce((a, v) => a + v, 0)).toBeCloseTo(1, 12);
    expect(far.probabilities.every(Number.isFinite)).toBe(true);
    expect(Number.isFinite(far.logDensity)).toBe(true);
  });
});
