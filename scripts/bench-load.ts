import fs from 'node:fs';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import { spawn, type ChildProcess } from 'node:child_process';
import autocannon from 'autocannon';
import { BENCH_VALUES, benchAppEnv, ensureBuilt, freshDir, seedDemoOnLab, runBench, startBenchServer, stopGroup, type SeededDemo } from './lib/bench-server';
import { startPostgres, type RunningPostgres } from './lib/ensure-postgres';
import { startRedis, type RunningRedis } from './lib/ensure-redis';
import { arg } from './lib/args';

/**
 * Load benchmark: `npm run bench:load [-- --part one|scale|all --duration 20 --connections 32]`
 *
 * Part `one` (SQLite, one server): migrates and seeds a fresh SQLite file, starts the
 * production server, starts a large fit of the demo rides, then drives the public
 * scoring route and the calculator page with autocannon at the same time. Prints
 * throughput, p50/p99 and errors, then checks that the usage counters grew by exactly
 * the 200 answers (within the connection count for the timed phase, exactly for a
 * fixed-count phase). Exits non-zero when they differ.
 *
 * Part `scale` (more than one machine, measured on this one): a throwaway PostgreSQL and
 * Redis (the test stack's Debian binaries), the demo seeded on them, then scoring
 * throughput of one app instance against two behind a small round-robin proxy
 * (node:http, keep-alive), and fits per minute through the pg-boss queue with one worker
 * process, then two (`--worker-slots`, default 1: fits each worker computes at once). The machine's core count is printed beside the figures: on a small
 * machine the instances, the proxy and the load generator share the same cores.
 *
 * `all` (the default) runs both, one after the other. Builds into NEXT_DIST_DIR (default
 * .next-bench) when stale.
 */
const PART = arg('part', 'all');
const DURATION = Number(arg('duration', PART === 'scale' ? '10' : '20'));
const CONNECTIONS = Number(arg('connections', '32'));
const EXACT = Number(arg('exact', '1500'));
// At most the Lab plan's fits waiting or running at once (lib/plans FIT_QUEUE_LIMITS.lab).
const FITS = Number(arg('fits', '10'));
// One fit at a time per worker by default, so one worker uses one core and two use two.
const WORKER_SLOTS = arg('worker-slots', '1');
const PORT = Number(arg('port', process.env.PARTWISE_BENCH_PORT ?? '3275'));
const DIST = process.env.NEXT_DIST_DIR || '.next-bench';
const SCORE_BODY = JSON.stringify({ values: BENCH_VALUES });
const JSON_HEADERS = { 'content-type': 'application/json' };

function cannon(opts: autocannon.Options): Promise<autocannon.Result> {
  return new Promise((resolve, reject) => {
    autocannon(opts, (err, result) => (err ? reject(err) : resolve(result)));
  });
}

const statusCounts = (r: autocannon.Result) => (r as unknown as { statusCodeStats?: Record<string, { count: number }> }).statusCodeStats ?? {};
const okCount = (r: autocannon.Result) => statusCounts(r)['200']?.count ?? 0;

function line(name: string, r: autocannon.Result) {
  const codes = Object.entries(statusCounts(r)).map(([code, s]) => `${code}×${s.count}`).join(' ');
  console.log(
    `${name.padEnd(32)} ${String(Math.round(r.requests.average)).padStart(6)} req/s   p50 ${String(r.latency.p50).padStart(5)} ms   p99 ${String(r.latency.p99).padStart(5)} ms   ` +
      `requests ${r.requests.total}   errors ${r.errors}   timeouts ${r.timeouts}   non-2xx ${r.non2xx}   [${codes}]`,
  );
}

/** The scoring route under load: for DURATION seconds, or for `amount` requests. */
const scoring = (url: string, amount?: number) => cannon({ url, method: 'POST', headers: JSON_HEADERS, body: SCORE_BODY, connections: CONNECTIONS, ...(amount ? { amount } : { duration: DURATION }) });

// ---- part one: one server on SQLite, with a fit running -------------------------------

async function usageCount(env: NodeJS.ProcessEnv, dir: string, embedId: number): Promise<{ month: number; hours: number }> {
  // A separate process reads the file the server wrote, so nothing is cached here.
  const code = `const { sequelize } = await import('@/models'); const [r] = await sequelize.query("SELECT granularity, SUM(count) AS n FROM usage_counters WHERE embed_id = ${embedId} GROUP BY granularity"); console.log(JSON.stringify(r)); await sequelize.close();`;
  const file = path.join(dir, 'usage.mts');
  fs.writeFileSync(file, `${code}\n`);
  const out = await new Promise<string>((resolve, reject) => {
    const child = spawn('npx', ['tsx', file], { env, stdio: ['ignore', 'pipe', 'inherit'] });
    let text = '';
    child.stdout.on('data', (d) => (text += d));
    child.on('exit', (c) => (c === 0 ? resolve(text) : reject(new Error(`usage query exited ${c}`))));
  });
  const rows = JSON.parse(out.trim().split('\n').pop()!) as { granularity: string; n: number }[];
  return { month: Number(rows.find((r) => r.granularity === 'month')?.n ?? 0), hours: Number(rows.find((r) => r.granularity === 'hour')?.n ?? 0) };
}

async function startFit(app: string, seeded: SeededDemo, settings: Record<string, unknown>): Promise<number> {
  const res = await fetch(`${app}/api/fits`, { method: 'POST', headers: { ...JSON_HEADERS, cookie: seeded.cookie }, body: JSON.stringify({ datasetId: seeded.datasetId, features: seeded.features, ...settings }) });
  const body = (await res.json()) as { fit?: { id: number } };
  if (res.status !== 202 || !body.fit) throw new Error(`a fit did not start: ${res.status} ${JSON.stringify(body)}`);
  return body.fit.id;
}

/** Returns false when the usage counters do not equal the answers given. */
async function oneServer(): Promise<boolean> {
  const dir = freshDir(path.resolve(`.tmp/bench-load-${PORT}`));
  const app = `http://127.0.0.1:${PORT}`;
  const env = benchAppEnv({ dist: DIST, dir, url: app });
  const seeded = await seedDemoOnLab(env);
  const server = await startBenchServer(PORT, env, dir);
  let exactOk = false;
  try {
    const before = await usageCount(env, dir, seeded.embedId);
    const fitId = await startFit(app, seeded, { minComponents: 1, maxComponents: 10, covariances: ['full', 'diagonal', 'spherical', 'tied'], restarts: 10, seed: 7, maxIter: 1000, tol: 1e-7 });
    const pageConnections = Math.max(4, CONNECTIONS / 4);
    console.log(`[bench:load] one server on SQLite; fit ${fitId} started (40 candidates × 10 restarts); ${CONNECTIONS}+${pageConnections} connections for ${DURATION} s; ${os.availableParallelism()} cores`);

    // Warm both routes so first-load costs stay out of the figures (the warm-up answer is counted).
    const warm = await fetch(`${app}/api/score/${seeded.token}`, { method: 'POST', headers: JSON_HEADERS, body: SCORE_BODY });
    if (warm.status !== 200) throw new Error(`warm-up scoring answered ${warm.status}: ${await warm.text()}`);
    await fetch(`${app}/embed/${seeded.token}`).then((r) => r.text());

    const [score, page] = await Promise.all([scoring(`${app}/api/score/${seeded.token}`), cannon({ url: `${app}/embed/${seeded.token}`, connections: pageConnections, duration: DURATION })]);
    // Answers are counted in memory and written every 250 ms (lib/usage): let the last flush land.
    await new Promise((r) => setTimeout(r, 1000));
    const fitNow = (await (await fetch(`${app}/api/fits/${fitId}`, { headers: { cookie: seeded.cookie } })).json()) as { fit: { status: string; progress?: { fraction?: number } } };
    const after = await usageCount(env, dir, seeded.embedId);
    const answered = okCount(score) + 1;
    console.log('');
    line('scoring POST', score);
    line('calculator GET', page);
    console.log(`background fit: ${fitNow.fit.status}${fitNow.fit.progress?.fraction !== undefined ? ` (${Math.round(fitNow.fit.progress.fraction * 100)} % done)` : ''}`);
    const month = after.month - before.month;
    const hours = after.hours - before.hours;
    // autocannon drops requests still in flight at its deadline; the server answers (and
    // counts) them, so the timed phase can only be bounded by the connection count.
    const cut = month - answered;
    console.log(`timed phase: usage counters month +${month}, hour buckets +${hours}; 200 answers seen ${answered} (+${cut} in flight at the deadline, at most ${CONNECTIONS})`);
    const timedOk = hours === month && cut >= 0 && cut <= CONNECTIONS;

    // Exact phase: a fixed number of requests, every response awaited, while another fit runs.
    await startFit(app, seeded, { minComponents: 1, maxComponents: 10, covariances: ['full', 'tied'], restarts: 10, seed: 8, maxIter: 1000, tol: 1e-7 });
    const exact = await scoring(`${app}/api/score/${seeded.token}`, EXACT);
    await new Promise((r) => setTimeout(r, 1000));
    const final = await usageCount(env, dir, seeded.embedId);
    line('scoring (exact)', exact);
    const exactMonth = final.month - after.month;
    const exactHours = final.hours - after.hours;
    console.log(`exact phase: ${EXACT} requests, 200 answers ${okCount(exact)}; usage counters month +${exactMonth}, hour buckets +${exactHours}`);
    exactOk = timedOk && exactMonth === okCount(exact) && exactHours === okCount(exact);
    if (exactOk) console.log('[bench:load] usage counters equal the answers given exactly.');
    else console.error('[bench:load] MISMATCH: the usage counters do not equal the answers given.');
    if (score.errors || score.non2xx) console.log(`[bench:load] note: ${score.errors} connection errors and ${score.non2xx} non-2xx scoring answers (see the status list above).`);
  } finally {
    stopGroup(server);
  }
  return exactOk;
}

// ---- part scale: two instances and queue workers on PostgreSQL + Redis ----------------

/** A round-robin proxy over the instances, as a load balancer would be. */
function roundRobin(targets: number[]): Promise<http.Server> {
  const agent = new http.Agent({ keepAlive: true, maxSockets: 256 });
  let next = 0;
  const server = http.createServer((req, res) => {
    const port = targets[next++ % targets.length];
    const upstream = http.request({ host: '127.0.0.1', port, method: req.method, path: req.url, headers: req.headers, agent }, (up) => {
      res.writeHead(up.statusCode ?? 502, up.headers);
      up.pipe(res);
    });
    upstream.on('error', () => {
      if (!res.headersSent) res.writeHead(502);
      res.end();
    });
    req.pipe(upstream);
  });
  return new Promise((resolve) => server.listen(0, '127.0.0.1', () => resolve(server)));
}

/** A fit of a few seconds, so the figure is the workers' computing more than the queue's turns. */
const FIT_SETTINGS = (i: number) => ({ minComponents: 1, maxComponents: 6, covariances: ['full', 'diagonal', 'tied', 'spherical'], restarts: 16, seed: i + 1 });

async function fitsPerMinute(app: string, seeded: SeededDemo, workers: number, env: NodeJS.ProcessEnv, dir: string): Promise<number> {
  const procs: ChildProcess[] = [];
  const log = fs.openSync(path.join(dir, `workers-${workers}.log`), 'w');
  for (let i = 0; i < workers; i++) procs.push(spawn(process.execPath, ['--import', 'tsx', 'scripts/worker.ts'], { env: { ...env, PARTWISE_FIT_SLOTS: WORKER_SLOTS }, stdio: ['ignore', log, log], detached: true }));
  try {
    // Timed from when every worker is taking jobs, so their start-up is not counted.
    const logFile = path.join(dir, `workers-${workers}.log`);
    for (let waited = 0; (fs.readFileSync(logFile, 'utf8').match(/taking fits from pg-boss/g) ?? []).length < workers; waited += 100) {
      if (waited > 60_000) throw new Error(`the workers did not start within a minute (see ${logFile})`);
      await new Promise((r) => setTimeout(r, 100));
    }
    const started = performance.now();
    const ids: number[] = [];
    for (let i = 0; i < FITS; i++) ids.push(await startFit(app, seeded, FIT_SETTINGS(i)));
    for (;;) {
      const states = await Promise.all(ids.map(async (id) => (await (await fetch(`${app}/api/fits/${id}`, { headers: { cookie: seeded.cookie } })).json()).fit.status as string));
      if (states.every((s) => s === 'succeeded' || s === 'failed' || s === 'cancelled')) {
        if (states.some((s) => s !== 'succeeded')) throw new Error(`fits ended ${states.join(', ')}`);
        break;
      }
      if (performance.now() - started > 600_000) throw new Error('fits did not finish within 10 minutes');
      await new Promise((r) => setTimeout(r, 250));
    }
    return FITS / ((performance.now() - started) / 60_000);
  } finally {
    for (const p of procs) stopGroup(p);
    await new Promise((r) => setTimeout(r, 1500));
  }
}

async function scale(): Promise<void> {
  const dir = freshDir(path.resolve('.tmp/bench-load-scale'));
  const [portA, portB] = [PORT + 10, PORT + 11];
  if (!(FITS >= 1 && FITS <= 10)) throw new Error('--fits is 1 to 10 (the Lab plan has at most 10 fits waiting or running)');
  let postgres: RunningPostgres | undefined;
  let redis: RunningRedis | undefined;
  const servers: ChildProcess[] = [];
  let proxy: http.Server | undefined;
  try {
    postgres = startPostgres(50_000 + (PORT % 10_000), dir);
    redis = await startRedis(56_379 + (PORT % 1000), dir);
    const { openSequelize } = await import('@/models/db');
    const admin = openSequelize(postgres.url('postgres'));
    await admin.query('CREATE DATABASE bench');
    await admin.close();
    const env = benchAppEnv({ dist: DIST, dir, url: `http://127.0.0.1:${portA}`, databaseUrl: postgres.url('bench'), extra: { REDIS_URL: redis.url, PARTWISE_FIT_QUEUE: 'pg-boss' } });
    const seeded = await seedDemoOnLab(env);
    servers.push(await startBenchServer(portA, env, dir), await startBenchServer(portB, env, dir));
    proxy = await roundRobin([portA, portB]);
    const proxyPort = (proxy.address() as { port: number }).port;
    const route = `/api/score/${seeded.token}`;
    // Warm both instances (first load, caches).
    for (const port of [portA, portB]) for (let i = 0; i < 50; i++) await fetch(`http://127.0.0.1:${port}${route}`, { method: 'POST', headers: JSON_HEADERS, body: SCORE_BODY });

    console.log(`\n[bench:load] PostgreSQL + Redis: scoring with ${CONNECTIONS} connections, ${DURATION} s each; ${os.availableParallelism()} cores on this machine`);
    const one = await scoring(`http://127.0.0.1:${portA}${route}`);
    const two = await scoring(`http://127.0.0.1:${proxyPort}${route}`);
    console.log(`[bench:load] fits: ${FITS} fits of the demo rides (1–6 components × 4 covariance types, 16 restarts) through pg-boss, ${WORKER_SLOTS} fit slot(s) per worker`);
    const app = `http://127.0.0.1:${portA}`;
    const oneWorker = await fitsPerMinute(app, seeded, 1, env, dir);
    const twoWorkers = await fitsPerMinute(app, seeded, 2, env, dir);

    console.log(`\n== more than one instance, on one ${os.availableParallelism()}-core machine ==`);
    line('scoring, one instance', one);
    line('scoring, two instances + proxy', two);
    console.log(`ratio two / one: ${(two.requests.average / one.requests.average).toFixed(2)}×`);
    console.log(`fits per minute, one worker:  ${oneWorker.toFixed(1)}   (${WORKER_SLOTS} slot(s) per worker)`);
    console.log(`fits per minute, two workers: ${twoWorkers.toFixed(1)}   (${(twoWorkers / oneWorker).toFixed(2)}×)`);
  } finally {
    proxy?.close();
    for (const s of servers) stopGroup(s);
    await new Promise((r) => setTimeout(r, 1500));
    redis?.stop();
    postgres?.stop();
  }
}

/** `all`: each part in a process of its own (each opens the models on its own database). */
function runPart(part: 'one' | 'scale'): Promise<number> {
  const args = process.argv.slice(2).filter((a, i, all) => a !== '--part' && all[i - 1] !== '--part');
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ['--import', 'tsx', 'scripts/bench-load.ts', ...args, '--part', part], { stdio: 'inherit', env: process.env });
    child.on('error', reject);
    child.on('exit', (code) => resolve(code ?? 1));
  });
}

async function main(): Promise<number> {
  if (!['one', 'scale', 'all'].includes(PART)) throw new Error(`--part is one, scale or all (got "${PART}")`);
  await ensureBuilt(DIST, 'bench:load');
  if (PART === 'one') return (await oneServer()) ? 0 : 1;
  if (PART === 'scale') {
    await scale();
    return 0;
  }
  const one = await runPart('one');
  const more = await runPart('scale');
  return one || more;
}

runBench(main, 'bench:load');
