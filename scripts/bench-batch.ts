import os from 'node:os';
import path from 'node:path';
import { BENCH_FEATURES, benchAppEnv, ensureBuilt, freshDir, publishBenchCalculator, runBench, startBenchServer, stopGroup } from './lib/bench-server';
import { arg } from './lib/args';

/**
 * Batch-scoring benchmark: `npm run bench:batch [-- --rows 100000 --runs 3 --port 3291]`
 *
 * On one model (four groups, full covariances, three fields, fitted on the demo's ride
 * logs) and the same 100 000 rows:
 *   1. the engine's batch scorer alone (lib/mixture scoreRows on a Float64Array);
 *   2. the same job as the command line's scorer does it in one process (CSV text read
 *      with the upload parser, scoreRows, CSV written with papaparse: scripts/score.ts);
 *   3. POST /api/v1/calculators/{id}/scores through the app server with a score key,
 *      CSV in and CSV out, and JSON in and JSON out, body read to the end.
 * Prints rows per second for each, the route against both engine figures, and the time
 * to the answer's first byte. Builds into NEXT_DIST_DIR (default .next-bench) when stale;
 * uses a fresh SQLite file; the Lab plan's 250 000 answers a month bound the runs.
 */
const ROWS = Number(arg('rows', '100000'));
const RUNS = Number(arg('runs', '3'));
const PORT = Number(arg('port', '3291'));
const DIST = process.env.NEXT_DIST_DIR || '.next-bench';
const DIR = path.resolve('.tmp/bench-batch');
const APP = `http://127.0.0.1:${PORT}`;
const FEATURES = BENCH_FEATURES;

/** Rows spread over the calculator's ranges, one decimal like a spreadsheet export (seeded). */
function benchRows(n: number): Float64Array {
  let s = 20261203;
  const next = () => (s = (s * 16807) % 2147483647) / 2147483647;
  const x = new Float64Array(n * 3);
  for (let r = 0; r < n; r++) {
    x[r * 3] = Math.round((12 + next() * 30) * 10) / 10;
    x[r * 3 + 1] = Math.round(next() * 4000) / 10;
    x[r * 3 + 2] = Math.round(next() * 20000) / 10;
  }
  return x;
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const rate = (seconds: number) => ROWS / seconds;
const fmt = (rowsPerSecond: number) => `${Math.round(rowsPerSecond).toLocaleString('en').padStart(11)} rows/s`;

async function timeIt(fn: () => unknown | Promise<unknown>, runs = RUNS): Promise<number> {
  await fn(); // warm-up, discarded
  const times: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t = performance.now();
    await fn();
    times.push((performance.now() - t) / 1000);
  }
  return median(times);
}

async function main() {
  await ensureBuilt(DIST, 'bench');
  freshDir(DIR);
  const appEnv = benchAppEnv({ dist: DIST, dir: DIR, url: APP });
  const prepared = await publishBenchCalculator(appEnv, { title: 'Batch bench', keyScopes: ['score'] });
  const { parseModelJson, scoreRows } = await import('@/lib/mixture');
  const { parseCsvText } = await import('@/lib/datasets/parse');
  const { featureMatrix } = await import('@/lib/datasets/matrix');
  const Papa = (await import('papaparse')).default;
  const engine = parseModelJson(prepared.model);

  const x = benchRows(ROWS);
  const lines = [FEATURES.join(',')];
  for (let r = 0; r < ROWS; r++) lines.push(`${x[r * 3]},${x[r * 3 + 1]},${x[r * 3 + 2]}`);
  const csv = lines.join('\n') + '\n';
  const json = JSON.stringify({ rows: Array.from({ length: ROWS }, (_, r) => [x[r * 3], x[r * 3 + 1], x[r * 3 + 2]]) });

  console.log(`[bench] ${ROWS.toLocaleString('en')} rows, ${(csv.length / 1e6).toFixed(2)} MB as CSV, ${(json.length / 1e6).toFixed(2)} MB as JSON; median of ${RUNS} runs after one warm-up; ${os.availableParallelism()} cores`);
  const kernel = await timeIt(() => scoreRows(engine, x, ROWS), Math.max(RUNS, 7));
  const pipeline = await timeIt(() => {
    const table = parseCsvText(csv, { minCompleteRows: 0 });
    const m = featureMatrix(table, FEATURES);
    const s = scoreRows(engine, m.rows, m.n);
    const out: (string | number)[][] = [];
    for (let i = 0; i < m.n; i++) out.push([i + 2, s.probabilities[i * 4], s.probabilities[i * 4 + 1], s.probabilities[i * 4 + 2], s.probabilities[i * 4 + 3], s.best[i] + 1, s.logDensity[i], s.typicality[i], s.typicality[i] < 1 ? 1 : 0]);
    return Papa.unparse({ fields: ['row', 'p_1', 'p_2', 'p_3', 'p_4', 'best', 'log_density', 'typicality', 'unusual'], data: out });
  });

  const server = await startBenchServer(PORT, appEnv, DIR);
  try {
    const url = `${APP}/api/v1/calculators/${prepared.embedId}/scores`;
    const auth = { authorization: `Bearer ${prepared.apiKey}` };
    let firstByte: number[] = [];
    const post = async (body: string, contentType: string, accept: string) => {
      const t = performance.now();
      const res = await fetch(url, { method: 'POST', headers: { ...auth, 'content-type': contentType, accept }, body });
      const reader = res.body!.getReader();
      let first = true;
      let bytes = 0;
      for (;;) {
        const { done, value } = await reader.read();
        if (done) break;
        if (first) firstByte.push(performance.now() - t);
        first = false;
        bytes += value.length;
      }
      if (res.status !== 200) throw new Error(`the batch route answered ${res.status}`);
      return bytes;
    };
    // Warm the route (first compile, version cache) on a small batch.
    await post(lines.slice(0, 1001).join('\n'), 'text/csv', 'text/csv');
    // The Lab plan answers 250,000 a month (and 5 % more before pausing): one timed run per format.
    firstByte = [];
    const t1 = performance.now();
    const csvBytes = await post(csv, 'text/csv', 'text/csv');
    const routeCsv = (performance.now() - t1) / 1000;
    const csvFirstByte = firstByte[0];
    firstByte = [];
    const t2 = performance.now();
    const jsonBytes = await post(json, 'application/json', 'application/json');
    const routeJson = (performance.now() - t2) / 1000;

    console.log('\n== batch scoring, same model, same rows ==');
    console.log(`engine batch scorer (scoreRows)           ${fmt(rate(kernel))}   ${(kernel * 1000).toFixed(1)} ms`);
    console.log(`engine as the score CLI does it (CSV→CSV)  ${fmt(rate(pipeline))}   ${(pipeline * 1000).toFixed(1)} ms`);
    console.log(`route, CSV in, CSV out                     ${fmt(rate(routeCsv))}   ${(routeCsv * 1000).toFixed(1)} ms, first byte after ${csvFirstByte.toFixed(0)} ms, ${(csvBytes / 1e6).toFixed(2)} MB`);
    console.log(`route, JSON in, JSON out                   ${fmt(rate(routeJson))}   ${(routeJson * 1000).toFixed(1)} ms, first byte after ${firstByte[0].toFixed(0)} ms, ${(jsonBytes / 1e6).toFixed(2)} MB`);
    console.log(`\nroute (CSV) / engine as the CLI does it: ${(rate(routeCsv) / rate(pipeline)).toFixed(2)}×   (target ≥ 0.5×)`);
    console.log(`route (JSON) / engine as the CLI does it: ${(rate(routeJson) / rate(pipeline)).toFixed(2)}×`);
    console.log(`route (CSV) / engine's scoreRows alone:  ${(rate(routeCsv) / rate(kernel)).toFixed(2)}×   (the route reads and writes ${((csv.length + csvBytes) / 1e6).toFixed(1)} MB of text the kernel never sees)`);
  } finally {
    stopGroup(server);
  }
}

runBench(main, 'bench');
