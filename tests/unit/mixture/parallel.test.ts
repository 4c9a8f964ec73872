/**
 * The worker-thread PassEngine gives the same fit as the single-thread one, to the last
 * bit: both sum the E-step in the same blocks of rows and add the blocks in row order.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fitMixture, fitMixtureWith, PASS_BLOCK_ROWS } from '../../../lib/mixture';
import { createWorkerEngine, type WorkerEngine } from '../../../lib/mixture-parallel';
import { synthBlobs } from './helpers';

let two: WorkerEngine;
let four: WorkerEngine;
beforeAll(async () => {
  [two, four] = await Promise.all([createWorkerEngine(1), createWorkerEngine(3)]);
}, 30000);
afterAll(async () => {
  await Promise.all([two?.close(), four?.close()]);
});

describe('worker-thread engine', () => {
  // Several blocks, the last one short, and more threads than some passes have blocks for.
  const n = 4 * PASS_BLOCK_ROWS + 777;
  const d = 3;
  const { x } = synthBlobs(3, n, d, 3);
  it.each(['full', 'diagonal', 'tied', 'spherical'] as const)('%s: 1, 2 and 4 threads give the same fit to the last bit', (covariance) => {
    const opts = { components: 3, covariance, seed: 7, tol: 1e-9, maxIter: 200 };
    const one = fitMixture(x, n, d, opts);
    expect(two.threads).toBe(2);
    expect(four.threads).toBe(4);
    for (const engine of [two, four]) {
      const other = fitMixtureWith(x, n, d, opts, engine);
      expect(other.iterations).toBe(one.iterations);
      expect(other.logLikelihood).toBe(one.logLikelihood);
      expect(other.weights).toEqual(one.weights);
      expect(other.means).toEqual(one.means);
      expect(other.covariances).toEqual(one.covariances);
    }
  });

  it('fits fewer rows than threads have blocks for', () => {
    const small = synthBlobs(2, 500, 2, 11);
    const opts = { components: 2, covariance: 'full' as const, seed: 3 };
    expect(fitMixtureWith(small.x, 500, 2, opts, four).logLikelihood).toBe(fitMixture(small.x, 500, 2, opts).logLikelihood);
  });
});
