import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { randomBytes } from 'node:crypto';
import type { ChildProcess } from 'node:child_process';
import { buildIsStale } from './lib/build-state';
import { spawnAppServer } from './lib/app-process';
import { run, waitForHttp } from './lib/run';
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
const FEATURES = ['avg_speed_kmh', 'weekly_distance_km', 'climb_per_ride_m'];

interface Prepared {
  embedId: number;
  secret: string;
  model: Record<string, unknown>;
}

async function prepareDatabase(env: NodeJS.ProcessEnv): Promise<Prepared> {
  await run('npx', ['tsx', 'scripts/migrate.ts', 'up'], { env, stdio: ['ignore', 'ignore', 'inherit'] });
  Object.assign(process.env, env);
  const m = await import('@/models');
  const { buildModel, parseNumericTable, selectMixture, toModelJson } = await import('@/lib/mixture');
  const { demoRidesCsv } = await import('@/lib/demo/cycling');
  const { publishNew } = await import('@/lib/embeds/service');
  const { createApiKey } = await import('@/lib/auth/api-keys');
  const owner = await m.User.create({ email: 'bench@partwise.test', name: 'Bench', passwordHash: 'x', emailVerifiedAt: new Date() });
  const workspace = await m.Workspace.create({ name: 'Bench', slug: 'bench' });
  await m.Membership.create({ userId: owner.id, workspaceId: workspace.id, role: 'owner' });
  await m.Subscription.create({ workspaceId: workspace.id, plan: 'lab', status: 'active' });
  const table = parseNumericTable(demoRidesCsv(5), FEATURES);
  const selection = selectMixture(table.rows, table.n, table.d, { components: [4], covariances: ['full'], seed: 1 });
  const engine = buildModel(table.rows, table.n, table.d, selection.best, { features: FEATURES.map((name) => ({ name })) });
  const modelJson = JSON.parse(toModelJson(engine));
  const model = await m.MixtureModel.create({
    workspaceId: workspace.id,
    createdById: owner.id,
    name: 'Ride groups',
    model: modelJson,
    clusters: ['Easy social', 'Steady club', 'Hill lovers', 'Fast group'].map((label, i) => ({ label, description: `Group ${i + 1} of the club.`, color: ['#3a8a74', '#e0a526', '#b8432f', '#4a5366'][i] })),
    fields: [
      { feature: 'avg_speed_kmh', label: 'Average speed', unit: 'km/h', min: 10, max: 45, help: '' },
      { feature: 'weekly_distance_km', label: 'Weekly distance', unit: 'km', min: 0, max: 500, help: '' },
      { feature: 'climb_per_ride_m', label: 'Climbing per ride', unit: 'm', min: 0, max: 3000, help: '' },
    ],
    caution: 'Benchmark calculator.',
  });
  const { embed } = await publishNew({ user: owner, workspace }, { mixtureModelId: model.id, title: 'Batch bench' });
  const { secret } = await createApiKey({ user: owner, isStaff: false, workspace, role: 'owner' }, { name: 'Bench', scopes: ['score'] });
  await m.sequelize.close();
  return { embedId: embed.id, secret, model: modelJson };
}

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
  const env: NodeJS.ProcessEnv = { ...process.env, NEXT_DIST_DIR: DIST, NEXT_TELEMETRY_DISABLED: '1' };
  if (buildIsStale()) {
    console.log(`[bench] building into ${DIST}…`);
    await run('npm', ['run', 'build'], { env });
  }
  fs.rmSync(DIR, { recursive: true, force: true });
  fs.mkdirSync(DIR, { recursive: true });
  const appEnv: NodeJS.ProcessEnv = {
    ...env,
    NODE_ENV: 'production',
    DATABASE_URL: path.join(DIR, 'bench.sqlite'),
    PARTWISE_DATA_DIR: DIR,
    NEXTAUTH_URL: APP,
    NEXTAUTH_SECRET: randomBytes(32).toString('base64url'),
    PORT: String(PORT),
  };
  const prepared = await prepareDatabase(appEnv);
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

  const log = fs.openSync(path.join(DIR, 'server.log'), 'a');
  const server: ChildProcess = spawnAppServer({ port: PORT, env: appEnv, stdio: ['ignore', log, log], detached: true });
  try {
    await waitForHttp(`${APP}/api/health`, 90_000, server);
    const url = `${APP}/api/v1/calculators/${prepared.embedId}/scores`;
    const auth = { authorization: `Bearer ${prepared.secret}` };
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
    if (server.pid) {
      try {
        process.kill(-server.pid, 'SIGTERM');
      } catch {}
    }
  }
}

main().then(
  () => process.exit(0),
  (e) => {
    console.error('[bench] failed:', e);
    process.exit(1);
  },
);
