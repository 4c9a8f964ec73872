/** The worker-thread PassEngine gives the same fit as the single-thread one. */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fitMixture, fitMixtureWith } from '../../../lib/mixture';
import { createWorkerEngine, type WorkerEngine } from '../../../lib/mixture-parallel';
import { synthBlobs } from './helpers';

let engine: WorkerEngine;
beforeAll(async () => {
  engine = await createWorkerEngine(1);
}, 20000);
afterAll(async () => {
  await engine?.close();
});

describe('worker-thread engine', () => {
  const n = 3001;
  const d = 3;
  const { x } = synthBlobs(3, n, d, 3);
  it.each(['full', 'diagonal', 'tied', 'spherical'] as const)('%s matches the single-thread fit', (covariance) => {
    const opts = { components: 3, covariance, seed: 7, tol: 1e-9, maxIter: 200 };
    const a = fitMixture(x, n, d, opts);
    const b = fitMixtureWith(x, n, d, opts, engine);
    expect(engine.threads).toBe(2);
    expect(b.iterations).toBe(a.iterations);
    expect(Math.abs(b.logLikelihood - a.logLikelihood)).toBeLessThan(1e-8 * Math.abs(a.logLikelihood));
    for (let c = 0; c < 3; c++) for (let j = 0; j < d; j++) expect(b.means[c][j]).toBeCloseTo(a.means[c][j], 8);
  });
});
