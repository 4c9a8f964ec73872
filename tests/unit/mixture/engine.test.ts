import { Matrix, CholeskyDecomposition, inverse } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { fitMixture, freeParameters, MixtureError, selectMixture, SeededRandom } from '../../../lib/mixture';
import { choleskyInto, invertLowerPacked, halfLogDet } from '../../../lib/mixture/linalg';
import { synthBlobs } from './helpers';

function codeOf(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    if (e instanceof MixtureError) return `${e.code}: ${e.message}`;
    throw e;
  }
  return 'no error';
}

describe('SeededRandom', () => {
  it('is reproducible per seed and differs between seeds', () => {
    const a = new SeededRandom(42);
    const b = new SeededRandom(42);
    const c = new SeededRandom(43);
    const va = Array.from({ length: 5 }, () => a.next());
    expect(Array.from({ length: 5 }, () => b.next())).toEqual(va);
    expect(Array.from({ length: 5 }, () => c.next())).not.toEqual(va);
  });
  it('uniform and normal moments look right', () => {
    const r = new SeededRandom(7);
    let s = 0;
    let s2 = 0;
    let u = 0;
    const m = 20000;
    for (let i = 0; i < m; i++) {
      const z = r.normal();
      s += z;
      s2 += z * z;
      u += r.next();
    }
    expect(Math.abs(u / m - 0.5)).toBeLessThan(0.01);
    expect(Math.abs(s / m)).toBeLessThan(0.03);
    expect(Math.abs(s2 / m - 1)).toBeLessThan(0.04);
  });
});

describe('linalg against ml-matrix', () => {
  it('Cholesky, inverse factor and log-determinant', () => {
    const rng = new SeededRandom(1);
    const d = 5;
    const a = Matrix.zeros(d, d);
    for (let i = 0; i < d; i++) for (let j = 0; j < d; j++) a.set(i, j, rng.normal());
    const spd = a.mmul(a.transpose()).add(Matrix.eye(d).mul(0.5));
    const buf = Float64Array.from(spd.to1DArray());
    const l = new Float64Array(d * d);
    expect(choleskyInto(buf, 0, d, l, 0)).toBe(true);
    const ref = new CholeskyDecomposition(spd).lowerTriangularMatrix;
    for (let i = 0; i < d; i++) for (let j = 0; j < d; j++) expect(l[i * d + j]).toBeCloseTo(ref.get(i, j), 10);
    const packed = new Float64Array((d * (d + 1)) / 2);
    invertLowerPacked(l, 0, d, packed, 0);
    const inv = inverse(ref);
    for (let i = 0; i < d; i++) for (let j = 0; j <= i; j++) expect(packed[(i * (i + 1)) / 2 + j]).toBeCloseTo(inv.get(i, j), 9);
    let logdet = 0;
    for (let i = 0; i < d; i++) logdet += 2 * Math.log(ref.get(i, i));
    expect(2 * halfLogDet(l, 0, d)).toBeCloseTo(logdet, 10);
  });
  it('reports a matrix that is not positive definite', () => {
    const m = Float64Array.from([1, 2, 2, 1]);
    expect(choleskyInto(m, 0, 2, new Float64Array(4), 0)).toBe(false);
  });
});

describe('fitMixture behaviour', () => {
  const n = 900;
  const d = 2;
  const { x, labels } = synthBlobs(21, n, d, 3, 8);

  it('is deterministic given a seed', () => {
    const a = fitMixture(x, n, d, { components: 3, covariance: 'full', seed: 9, restarts: 2 });
    const b = fitMixture(x, n, d, { components: 3, covariance: 'full', seed: 9, restarts: 2 });
    expect(b.means).toEqual(a.means);
    expect(b.logLikelihood).toBe(a.logLikelihood);
  });

  it('recovers well separated clusters', () => {
    const fit = fitMixture(x, n, d, { components: 3, covariance: 'full', seed: 1, restarts: 3 });
    expect(fit.converged).toBe(true);
    // each true cluster's mean is close to one fitted mean
    for (let c = 0; c < 3; c++) {
      let sx = 0;
      let sy = 0;
      let m = 0;
      for (let r = 0; r < n; r++) {
        if (labels[r] !== c) continue;
        sx += x[r * 2];
        sy += x[r * 2 + 1];
        m++;
      }
      const dist = Math.min(...fit.means.map((mu) => Math.hypot(mu[0] - sx / m, mu[1] - sy / m)));
      expect(dist).toBeLessThan(0.3);
    }
  });

  it('keeps the restart with the best final log-likelihood', () => {
    const fit = fitMixture(x, n, d, { components: 5, covariance: 'spherical', seed: 4, restarts: 4, init: 'points' });
    const lls = fit.restartSummaries.map((r) => r.logLikelihood ?? -Infinity);
    expect(fit.restartSummaries).toHaveLength(4);
    expect(fit.logLikelihood).toBe(Math.max(...lls));
    expect(fit.restartSummaries[fit.restart].logLikelihood).toBe(fit.logLikelihood);
  });

  it('reports progress every iteration and can be cancelled', () => {
    const seen: number[] = [];
    const fit = fitMixture(x, n, d, { components: 3, covariance: 'diagonal', tol: 1e-10, onProgress: (p) => seen.push(p.iteration) });
    expect(seen).toEqual(Array.from({ length: fit.iterations }, (_, i) => i + 1));
    let calls = 0;
    const msg = codeOf(() => fitMixture(x, n, d, { components: 3, covariance: 'full', tol: 0, maxIter: 1000, shouldStop: () => ++calls > 3 }));
    expect(msg).toMatch(/^CANCELLED/);
    expect(calls).toBe(4);
  });

  it('standardisation does not change a full-covariance optimum (affine invariance)', () => {
    const means = [
      [x[0], x[1]],
      [x[2], x[3]],
      [x[4], x[5]],
    ];
    const a = fitMixture(x, n, d, { components: 3, covariance: 'full', init: { means }, regCovar: 0, tol: 1e-12, maxIter: 500, standardize: false });
    const b = fitMixture(x, n, d, { components: 3, covariance: 'full', init: { means }, regCovar: 0, tol: 1e-12, maxIter: 500, standardize: true });
    expect(b.logLikelihood).toBeCloseTo(a.logLikelihood, 6);
    expect(b.means[1][0]).toBeCloseTo(a.means[1][0], 6);
    expect(b.covariances[2][0][1]).toBeCloseTo(a.covariances[2][0][1], 6);
  });

  it('rejects bad input with clear errors', () => {
    expect(codeOf(() => fitMixture(x, 2, d, { components: 3, covariance: 'full' }))).toMatch(/^TOO_FEW_ROWS: Need at least 3 rows/);
    const constant = Float64Array.from([1, 5, 2, 5, 3, 5, 4, 5]);
    expect(codeOf(() => fitMixture(constant, 4, 2, { components: 1, covariance: 'full' }))).toMatch(/^CONSTANT_COLUMN: Column 2 is constant/);
    const withNaN = x.slice();
    withNaN[7] = NaN;
    expect(codeOf(() => fitMixture(withNaN, n, d, { components: 2, covariance: 'full' }))).toMatch(/^BAD_INPUT: Row 4, column 2/);
    expect(codeOf(() => fitMixture(x, n, d, { components: 2, covariance: 'banana' as never }))).toMatch(/^BAD_INPUT: covariance must be/);
  });

  it('an emptying component gives an actionable error, not NaN', () => {
    // two identical start means on tiny data with no regularisation: the pair cannot split,
    // a third component starting far away gets no rows at all
    const tiny = Float64Array.from([0, 0, 1, 0, 0, 1, 1, 1, 0.5, 0.5]);
    const msg = codeOf(() =>
      fitMixture(tiny, 5, 2, { components: 2, covariance: 'full', init: { means: [[0.5, 0.5], [1e6, 1e6]] }, standardize: false, regCovar: 1e-6 }),
    );
    expect(msg).toMatch(/^EMPTY_COMPONENT: Component 2 lost its rows.*fewer components/);
  });
});

describe('model choice', () => {
  it('free-parameter counts per structure', () => {
    // K=3, d=4: weights 2 + means 12 + covariance
    expect(freeParameters(3, 4, 'full')).toBe(2 + 12 + 30);
    expect(freeParameters(3, 4, 'tied')).toBe(2 + 12 + 10);
    expect(freeParameters(3, 4, 'diagonal')).toBe(2 + 12 + 12);
    expect(freeParameters(3, 4, 'spherical')).toBe(2 + 12 + 3);
  });

  it('keeps failed candidates, with their reason, after the ranked ones', () => {
    // three distinct points, each twice: with no regularisation only K=1 has a proper covariance
    const x = Float64Array.from([0, 0, 1, 0, 0, 1, 0, 0, 1, 0, 0, 1]);
    const sel = selectMixture(x, 6, 2, { components: [1, 2, 3], covariances: ['full'], regCovar: 0, standardize: false, seed: 1, init: 'points' });
    expect(sel.best.components).toBe(1);
    expect(sel.candidates.map((c) => c.rank)).toEqual([1, null, null]);
    expect(sel.candidates[1].error).toMatch(/not positive definite; try fewer components, a larger regularisation/);
    expect(codeOf(() => fitMixture(x, 6, 2, { components: 3, covariance: 'full', regCovar: 0, standardize: false, seed: 1, init: 'points' }))).toMatch(
      /^NOT_POSITIVE_DEFINITE/,
    );
    // the documented remedy works
    const ok = selectMixture(x, 6, 2, { components: [1, 2, 3], covariances: ['full'], regCovar: 0.01, standardize: false, seed: 1, init: 'points' });
    expect(ok.candidates.every((c) => c.error === null)).toBe(true);
  });

  it('ranks candidates by BIC and finds the generating K', () => {
    const n = 1200;
    const { x } = synthBlobs(33, n, 2, 3, 10);
    const progress = new Set<string>();
    const sel = selectMixture(x, n, 2, {
      components: [1, 2, 3, 4, 5],
      covariances: ['full', 'diagonal'],
      seed: 5,
      restarts: 2,
      onProgress: (p) => progress.add(`${p.covariance}:${p.components}`),
    });
    expect(sel.candidates).toHaveLength(10);
    expect(progress.size).toBe(10);
    const bics = sel.candidates.map((c) => c.bic!);
    expect([...bics].sort((a, b) => a - b)).toEqual(bics);
    expect(sel.best.components).toBe(3);
    expect(sel.best.bic).toBe(bics[0]);
    for (const c of sel.candidates) {
      const r = c.result!;
      expect(r.bic).toBeCloseTo(-2 * r.logLikelihood + r.parameters * Math.log(n), 8);
      expect(r.aic).toBeCloseTo(-2 * r.logLikelihood + 2 * r.parameters, 8);
    }
  });
});

describe('pass kernels agree', () => {
  it('quadratic-feature and triangular kernels give the same statistics', async () => {
    const { passFull, passQuadratic, scratchLength, statsLength } = await import('../../../lib/mixture/estep');
    const { allocFactors, prepareFactors } = await import('../../../lib/mixture/mstep');
    const n = 500;
    const d = 4;
    const k = 3;
    const { x } = synthBlobs(12, n, d, k);
    const fit = fitMixture(x, n, d, { components: k, covariance: 'full', standardize: false, maxIter: 3, seed: 1 });
    const g = {
      k,
      d,
      covariance: 'full' as const,
      weights: Float64Array.from(fit.weights),
      means: Float64Array.from(fit.means.flat()),
      covs: Float64Array.from(fit.covariances.flat(2)),
    };
    const f = allocFactors(k, d, false, 0);
    prepareFactors(g, f);
    expect(f.kernel).toBe(1); // well conditioned → quadratic form chosen
    const a = new Float64Array(statsLength(k, d, false));
    const b = new Float64Array(statsLength(k, d, false));
    passFull(x, 0, n, d, k, g.means, f.factors, f.logConst, f.centre, 0, new Float64Array(scratchLength(k, d)), a);
    passQuadratic(x, 0, n, d, k, false, f.quad, f.quadConst, f.centre, 0, new Float64Array(scratchLength(k, d)), b);
    for (let i = 0; i < a.length; i++) expect(Math.abs(a[i] - b[i])).toBeLessThan(1e-9 * Math.max(1, Math.abs(a[i])));
    // scoring form of both kernels: per-row log densities and responsibilities
    const { posteriorPass } = await import('../../../lib/mixture/estep');
    const ldA = new Float64Array(n);
    const ldB = new Float64Array(n);
    const rA = new Float64Array(n * k);
    const rB = new Float64Array(n * k);
    posteriorPass(x, 0, n, d, k, false, g.means, f.factors, f.logConst, new Float64Array(scratchLength(k, d)), ldA, rA, 0);
    const total = passQuadratic(x, 0, n, d, k, false, f.quad, f.quadConst, f.centre, 0, new Float64Array(scratchLength(k, d)), null, ldB, rB);
    expect(total).toBeCloseTo(a[0], 6);
    for (let r = 0; r < n; r++) expect(Math.abs(ldA[r] - ldB[r])).toBeLessThan(1e-10);
    for (let i = 0; i < n * k; i++) expect(Math.abs(rA[i] - rB[i])).toBeLessThan(1e-10);
  });

  it('diagonal quadratic-feature kernel agrees with the 1/σ kernel', async () => {
    const { passDiag, passQuadratic, scratchLength, statsLength } = await import('../../../lib/mixture/estep');
    const { allocFactors, prepareFactors } = await import('../../../lib/mixture/mstep');
    const n = 400;
    const d = 3;
    const k = 4;
    const { x } = synthBlobs(19, n, d, k);
    const fit = fitMixture(x, n, d, { components: k, covariance: 'diagonal', standardize: false, maxIter: 3, seed: 2 });
    const g = {
      k,
      d,
      covariance: 'diagonal' as const,
      weights: Float64Array.from(fit.weights),
      means: Float64Array.from(fit.means.flat()),
      covs: Float64Array.from(fit.covariances.flat(2)),
    };
    const f = allocFactors(k, d, true, 0);
    prepareFactors(g, f);
    expect(f.kernel).toBe(3);
    const a = new Float64Array(statsLength(k, d, true));
    const b = new Float64Array(statsLength(k, d, true));
    passDiag(x, 0, n, d, k, g.means, f.factors, f.logConst, f.centre, 0, new Float64Array(scratchLength(k, d)), a);
    passQuadratic(x, 0, n, d, k, true, f.quad, f.quadConst, f.centre, 0, new Float64Array(scratchLength(k, d)), b);
    for (let i = 0; i < a.length; i++) expect(Math.abs(a[i] - b[i])).toBeLessThan(1e-9 * Math.max(1, Math.abs(a[i])));
  });

  it('falls back to the triangular kernel for nearly collinear features', async () => {
    const { allocFactors, prepareFactors } = await import('../../../lib/mixture/mstep');
    const rho = 1 - 1e-9;
    const g = {
      k: 1,
      d: 2,
      covariance: 'full' as const,
      weights: Float64Array.from([1]),
      means: Float64Array.from([0, 0]),
      covs: Float64Array.from([1, rho, rho, 1]),
    };
    const f = allocFactors(1, 2, false, 0);
    prepareFactors(g, f);
    expect(f.kernel).toBe(0);
  });
});
