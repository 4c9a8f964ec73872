/**
 * npm run bench:partial [-- --rows 200000 --dims 6 --components 4 --seed 2024]
 *
 * Speed of scoring with blank fields and of the log-odds breakdown, next to today's
 * complete-row scorer, on deterministic data (seeded blobs, invented for this benchmark)
 * and models fitted to it (full and diagonal covariance, standardised). Prints rows per
 * second for: the batch paths (scoreRows; scoreRowsMasked with the full mask, one partial
 * mask, and a different random mask on every row), the one-row paths (scoreRow,
 * scoreRowPartial complete and partial, explainRow, and scoreRowPartial with `explain`,
 * the breakdown a scoring answer carries), and the one-off costs (typicality sample, one subset's quantiles).
 */
import os from 'node:os';
import { parseArgs } from 'node:util';
import {
  buildModel,
  type Covariance,
  explainRow,
  fitMixture,
  type MixtureModel,
  scoreRow,
  scoreRowPartial,
  scoreRows,
  scoreRowsMasked,
  SeededRandom,
  subsetQuantiles,
  typicalitySample,
} from '../lib/mixture';

const { values: o } = parseArgs({
  options: {
    rows: { type: 'string', default: '200000' },
    dims: { type: 'string', default: '6' },
    components: { type: 'string', default: '4' },
    seed: { type: 'string', default: '2024' },
  },
});
const N = Number(o.rows);
const D = Number(o.dims);
const K = Number(o.components);
const SEED = Number(o.seed);

/** K seeded blobs with random correlated covariances. */
function makeData(n: number, seed: number): Float64Array {
  const rng = new SeededRandom(seed);
  const centres = Array.from({ length: K }, () => Array.from({ length: D }, () => 4 * rng.normal()));
  const mix = Array.from({ length: K }, () =>
    Array.from({ length: D }, (_, i) => Array.from({ length: D }, (_, j) => (j < i ? 0.5 * rng.normal() : j === i ? 0.5 + rng.next() : 0))),
  );
  const x = new Float64Array(n * D);
  const z = new Float64Array(D);
  for (let r = 0; r < n; r++) {
    const c = rng.int(K);
    for (let j = 0; j < D; j++) z[j] = rng.normal();
    for (let i = 0; i < D; i++) {
      let s = 20 + centres[c][i];
      for (let j = 0; j <= i; j++) s += mix[c][i][j] * z[j];
      x[r * D + i] = s;
    }
  }
  return x;
}

function seconds(f: () => unknown): number {
  const t0 = process.hrtime.bigint();
  f();
  return Number(process.hrtime.bigint() - t0) / 1e9;
}

/** Best of three timed runs after one warm-up. */
function rate(count: number, f: () => unknown): number {
  f();
  let best = Infinity;
  for (let i = 0; i < 3; i++) best = Math.min(best, seconds(f));
  return count / best;
}

const fmt = (r: number) => (r >= 1e6 ? `${(r / 1e6).toFixed(2)} M rows/s` : `${(r / 1e3).toFixed(0)} k rows/s`);

function benchModel(x: Float64Array, covariance: Covariance): void {
  const fit = fitMixture(x.subarray(0, 20000 * D), 20000, D, { components: K, covariance, seed: SEED, maxIter: 50 });
  const model: MixtureModel = buildModel(x.subarray(0, 20000 * D), 20000, D, fit);
  const half = 2 ** Math.ceil(D / 2) - 1; // the first ⌈d/2⌉ fields
  const full = 2 ** D - 1;
  const rng = new SeededRandom(SEED + 1);
  const randomMasks = Uint32Array.from({ length: N }, () => 1 + rng.int(full));
  console.log(`\n${covariance} covariance, K=${K}, d=${D} (standardised model)`);
  console.log('  batch, per row of a batch of', N);
  console.log(`    scoreRows (complete rows, today's path):          ${fmt(rate(N, () => scoreRows(model, x, N)))}`);
  console.log(`    scoreRowsMasked, full mask:                       ${fmt(rate(N, () => scoreRowsMasked(model, x, N, full)))}`);
  console.log(`    scoreRowsMasked, one partial mask (${Math.ceil(D / 2)} of ${D} fields): ${fmt(rate(N, () => scoreRowsMasked(model, x, N, half)))}`);
  console.log(`    scoreRowsMasked, random mask per row (${full} subsets): ${fmt(rate(N, () => scoreRowsMasked(model, x, N, randomMasks)))}`);

  const M = Math.min(N, 50000);
  const complete = Array.from({ length: M }, (_, r) => Array.from(x.subarray(r * D, (r + 1) * D)));
  const partial = complete.map((v, r) => v.map((val, j) => ((randomMasks[r] >>> j) & 1 ? val : null)));
  console.log('  one row per call');
  console.log(`    scoreRow (complete):                              ${fmt(rate(M, () => complete.forEach((v) => scoreRow(model, v))))}`);
  console.log(`    scoreRowPartial, complete:                        ${fmt(rate(M, () => complete.forEach((v) => scoreRowPartial(model, v))))}`);
  console.log(`    scoreRowPartial, random blanks:                   ${fmt(rate(M, () => partial.forEach((v) => scoreRowPartial(model, v))))}`);
  console.log(`    explainRow, complete:                             ${fmt(rate(M, () => complete.forEach((v) => explainRow(model, v))))}`);
  console.log(`    explainRow, random blanks:                        ${fmt(rate(M, () => partial.forEach((v) => explainRow(model, v))))}`);
  console.log(`    scoreRowPartial with explain, complete:           ${fmt(rate(M, () => complete.forEach((v) => scoreRowPartial(model, v, { explain: true }))))}`);
  console.log(`    scoreRowPartial with explain, random blanks:      ${fmt(rate(M, () => partial.forEach((v) => scoreRowPartial(model, v, { explain: true }))))}`);
  typicalitySample(model, 2000, 1); // warm-up
  const sampleSeconds = seconds(() => typicalitySample(model, 2000, 1));
  const sample = typicalitySample(model, 2000, 2);
  const quantileSeconds = seconds(() => subsetQuantiles(model, sample, half));
  console.log('  one-off');
  console.log(`    typicality sample, 2000 draws:                    ${(sampleSeconds * 1e3).toFixed(2)} ms`);
  console.log(`    one subset's quantiles from it (cold):            ${(quantileSeconds * 1e3).toFixed(2)} ms`);
}

function main(): void {
  console.log(`Partwise partial-scoring benchmark — N=${N}, d=${D}, K=${K}, seed ${SEED}`);
  console.log(`machine: ${os.cpus().length} logical cores (${os.cpus()[0]?.model ?? '?'}), node ${process.version}`);
  const x = makeData(N, SEED);
  for (const c of ['full', 'diagonal'] as Covariance[]) benchModel(x, c);
}

main();
