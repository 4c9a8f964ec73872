/**
 * npm run bench:fit [-- --rows 200000 --iterations 100 --big-rows 1000000 --big-iterations 100 --no-sklearn]
 *
 * Deterministic data (seeded; N=200 000, d=5, K=6 by default), exactly 100 EM iterations
 * with full covariance from a fixed start (K chosen rows as means, uniform weights,
 * pooled covariance; tol = 0 so no early stop). Prints seconds per iteration for the
 * single-thread engine and the worker-thread engine (all cores), peak memory, the same
 * fit at 1 000 000 rows, posterior scoring throughput, and — when /usr/bin/python3 has
 * scikit-learn — scikit-learn's time on the same data and start, and the ratio.
 */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { buildModel, type FitOptions, fitMixture, fitMixtureWith, type FitResult, scoreRow, scoreRows, SeededRandom } from '../lib/mixture';
import { createWorkerEngine } from '../lib/mixture-parallel';

const { values: o } = parseArgs({
  options: {
    rows: { type: 'string', default: '200000' },
    'big-rows': { type: 'string', default: '1000000' },
    'big-iterations': { type: 'string' },
    iterations: { type: 'string', default: '100' },
    dims: { type: 'string', default: '5' },
    components: { type: 'string', default: '6' },
    'no-sklearn': { type: 'boolean', default: false },
    seed: { type: 'string', default: '2024' },
  },
});
const N = Number(o.rows);
const BIG = Number(o['big-rows']);
const ITER = Number(o.iterations);
const BIG_ITER = Number(o['big-iterations'] ?? o.iterations);
const D = Number(o.dims);
const K = Number(o.components);
const SEED = Number(o.seed);
const threads = Math.max(1, os.availableParallelism?.() ?? os.cpus().length);

/** K seeded blobs with random correlated covariances (invented for this benchmark). */
function makeData(n: number, seed: number): Float64Array {
  const rng = new SeededRandom(seed);
  const centres = Array.from({ length: K }, () => Array.from({ length: D }, () => 4 * rng.normal()));
  const mix = Array.from({ length: K }, () =>
    Array.from({ length: D }, (_, i) => Array.from({ length: D }, (_, j) => (j < i ? 0.5 * rng.normal() : j === i ? 0.5 + rng.next() : 0))),
  );
  const data = new SeededRandom(seed + 1);
  const x = new Float64Array(n * D);
  const z = new Float64Array(D);
  for (let r = 0; r < n; r++) {
    const c = data.int(K);
    for (let j = 0; j < D; j++) z[j] = data.normal();
    for (let i = 0; i < D; i++) {
      let s = centres[c][i];
      for (let j = 0; j <= i; j++) s += mix[c][i][j] * z[j];
      x[r * D + i] = s;
    }
  }
  return x;
}

function startRows(n: number): number[] {
  const rng = new SeededRandom(SEED + 7);
  const rows = new Set<number>();
  while (rows.size < K) rows.add(rng.int(n));
  return [...rows];
}

function fixedStart(x: Float64Array, n: number): FitOptions {
  const rows = startRows(n);
  return {
    components: K,
    covariance: 'full',
    init: { means: rows.map((r) => Array.from(x.subarray(r * D, (r + 1) * D))) },
    tol: 0,
    maxIter: ITER,
    regCovar: 1e-6,
    standardize: false,
  };
}

function time<T>(f: () => T): { value: T; seconds: number } {
  const t0 = process.hrtime.bigint();
  const value = f();
  return { value, seconds: Number(process.hrtime.bigint() - t0) / 1e9 };
}

const fmt = (s: number) => `${s.toFixed(4)} s`;
const mib = (b: number) => `${(b / 1048576).toFixed(0)} MiB`;

const PY = `
import sys, time, json, resource, warnings
import numpy as np
from sklearn.mixture import GaussianMixture
from sklearn.exceptions import ConvergenceWarning
path, n, d, k, iters = sys.argv[1], int(sys.argv[2]), int(sys.argv[3]), int(sys.argv[4]), int(sys.argv[5])
rows = [int(v) for v in sys.argv[6].split(',')]
X = np.fromfile(path, dtype='<f8').reshape(n, d)
cov = np.cov(X, rowvar=False, bias=True) + 1e-6 * np.eye(d)
prec = np.repeat(np.linalg.inv(cov)[None], k, axis=0)
gm = GaussianMixture(n_components=k, covariance_type='full', tol=0.0, reg_covar=1e-6, max_iter=iters,
                     weights_init=np.full(k, 1.0 / k), means_init=X[rows], precisions_init=prec,
                     init_params='random_from_data', random_state=0)
with warnings.catch_warnings():
    warnings.simplefilter('ignore', ConvergenceWarning)
    t0 = time.perf_counter(); gm.fit(X); t = time.perf_counter() - t0
ll = float(gm.score(X) * n)
print(json.dumps({"seconds": t, "iterations": int(gm.n_iter_), "logLikelihood": ll,
                  "peakKiB": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss}))
`;

function sklearn(x: Float64Array, n: number, rows: number[]): { seconds: number; iterations: number; logLikelihood: number; peakKiB: number } | string {
  const py = '/usr/bin/python3';
  if (!fs.existsSync(py)) return 'no /usr/bin/python3';
  const probe = spawnSync(py, ['-c', 'import sklearn; print(sklearn.__version__)'], { encoding: 'utf8' });
  if (probe.status !== 0) return 'scikit-learn not importable by /usr/bin/python3';
  const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'partwise-bench-')), 'rows.f64');
  fs.writeFileSync(file, Buffer.from(x.buffer, x.byteOffset, n * D * 8));
  try {
    const r = spawnSync(py, ['-c', PY, file, String(n), String(D), String(K), String(ITER), rows.join(',')], { encoding: 'utf8', maxBuffer: 1 << 20 });
    if (r.status !== 0) return `scikit-learn run failed: ${r.stderr.trim().split('\n').pop()}`;
    return { ...JSON.parse(r.stdout.trim().split('\n').pop()!), version: probe.stdout.trim() };
  } finally {
    fs.rmSync(path.dirname(file), { recursive: true, force: true });
  }
}

async function main(): Promise<void> {
  console.log(`Partwise EM benchmark — N=${N}, d=${D}, K=${K}, full covariance, ${ITER} iterations, fixed start, seed ${SEED}`);
  console.log(`machine: ${os.cpus().length} logical cores (${os.cpus()[0]?.model ?? '?'}), node ${process.version}`);
  const x = makeData(N, SEED);
  const opts = fixedStart(x, N);
  const rssBefore = process.memoryUsage().rss;

  // warm-up (JIT) on a slice, not timed
  fitMixture(x.subarray(0, 20000 * D), 20000, D, { ...opts, maxIter: 5, init: opts.init });

  const single = time(() => fitMixture(x, N, D, opts));
  const perSingle = single.seconds / single.value.iterations;
  console.log(`\nPartwise, 1 thread:       ${fmt(perSingle)} / iteration  (${single.seconds.toFixed(2)} s total, ${single.value.iterations} iterations)`);

  const engine = await createWorkerEngine(threads - 1);
  let par: { value: FitResult; seconds: number };
  let bigSeconds = NaN;
  let bigIters = 0;
  let peak200k = 0;
  try {
    fitMixtureWith(x.subarray(0, 20000 * D), 20000, D, { ...opts, maxIter: 5 }, engine);
    par = time(() => fitMixtureWith(x, N, D, opts, engine));
    peak200k = process.resourceUsage().maxRSS * 1024;
    const big = makeData(BIG, SEED);
    const bigRun = time(() => fitMixtureWith(big, BIG, D, { ...fixedStart(big, BIG), maxIter: BIG_ITER }, engine));
    bigSeconds = bigRun.seconds;
    bigIters = bigRun.value.iterations;
  } finally {
    await engine.close();
  }
  const perPar = par.seconds / par.value.iterations;
  console.log(`Partwise, ${threads} threads:      ${fmt(perPar)} / iteration  (${par.seconds.toFixed(2)} s total)`);
  const relDiff = Math.abs(par.value.logLikelihood - single.value.logLikelihood) / Math.abs(single.value.logLikelihood);
  console.log(`  same result across thread counts: log-likelihood ${single.value.logLikelihood.toFixed(6)} (relative difference ${relDiff.toExponential(1)})`);
  const perBig = bigSeconds / bigIters;
  console.log(
    `Partwise, ${threads} threads, ${BIG} rows: ${bigSeconds.toFixed(2)} s for ${bigIters} iterations = ${fmt(perBig)} / iteration` +
      `  (${(perBig / perPar).toFixed(2)}× the ${N}-row time for ${(BIG / N).toFixed(1)}× the rows)`,
  );

  // scoring throughput
  const model = buildModel(x, N, D, single.value);
  scoreRows(model, x.subarray(0, 10000 * D), 10000);
  const batch = time(() => scoreRows(model, x, N));
  console.log(`\nscoring (batch scoreRows): ${(N / batch.seconds / 1e6).toFixed(2)} M rows/s  (${N} rows in ${fmt(batch.seconds)})`);
  const one = Array.from(x.subarray(0, D));
  const m = 50000;
  for (let i = 0; i < 1000; i++) scoreRow(model, one);
  const single1 = time(() => {
    for (let i = 0; i < m; i++) scoreRow(model, one);
  });
  console.log(`scoring (one row per call, scoreRow): ${(m / single1.seconds / 1e3).toFixed(0)} k rows/s`);

  const usage = process.resourceUsage();
  console.log(`\npeak memory (Node RSS, incl. runtime and worker): ${mib(peak200k)} after the ${N}-row fits (data ${mib(N * D * 8)}, RSS before fitting ${mib(rssBefore)}); ${mib(usage.maxRSS * 1024)} at the end (adds ${BIG}-row data ${mib(BIG * D * 8)} + its shared copy)`);

  if (o['no-sklearn']) return;
  const sk = sklearn(x, N, startRows(N));
  if (typeof sk === 'string') {
    console.log(`\nscikit-learn comparison skipped: ${sk}`);
    return;
  }
  const perSk = sk.seconds / sk.iterations;
  const llDiff = Math.abs(sk.logLikelihood - single.value.logLikelihood) / Math.abs(sk.logLikelihood);
  console.log(`\nscikit-learn ${(sk as { version?: string }).version ?? ''} (same data, same start, ${sk.iterations} iterations): ${fmt(perSk)} / iteration  (${sk.seconds.toFixed(2)} s), peak RSS ${mib(sk.peakKiB * 1024)}`);
  console.log(`  final log-likelihood ${sk.logLikelihood.toFixed(6)} vs Partwise ${single.value.logLikelihood.toFixed(6)} (relative difference ${llDiff.toExponential(1)})`);
  console.log(`\nratio Partwise / scikit-learn time per iteration:`);
  console.log(`  1 thread:  ${(perSingle / perSk).toFixed(3)}×`);
  console.log(`  ${threads} threads: ${(perPar / perSk).toFixed(3)}×   (target ≤ 0.4×: ${perPar / perSk <= 0.4 ? 'met' : 'NOT met'})`);
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
