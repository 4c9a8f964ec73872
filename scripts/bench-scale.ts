import fs from 'node:fs';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import { randomBytes } from 'node:crypto';
import { spawn, type ChildProcess } from 'node:child_process';
import autocannon from 'autocannon';
import { buildIsStale } from './lib/build-state';
import { spawnAppServer } from './lib/app-process';
import { startPostgres, type RunningPostgres } from './lib/ensure-postgres';
import { startRedis, type RunningRedis } from './lib/ensure-redis';
import { run, waitForHttp } from './lib/run';
import { arg } from './lib/args';

/**
 * More than one machine, measured on this one: `npm run bench:scale [-- --duration 10 --fits 6]`
 *
 * A throwaway PostgreSQL and Redis (the test stack's own Debian binaries), the demo seeded
 * on them, then:
 *   1. scoring throughput of one app instance, and of two instances behind a small
 *      round-robin proxy (node:http, keep-alive), with autocannon for the same time each;
 *   2. fits per minute through the pg-boss queue with one worker process, then two.
 * Prints the machine's core count beside the figures: on a 2-core machine two instances
 * and the load generator share the same cores, so the second instance mostly measures
 * the overhead of the proxy; the setup is what a real deployment runs on more machines.
 */
const DURATION = Number(arg('duration', '10'));
const CONNECTIONS = Number(arg('connections', '32'));
const FITS = Number(arg('fits', '6'));
const BASE_PORT = Number(arg('port', '3292'));
const DIST = process.env.NEXT_DIST_DIR || '.next-bench';
const DIR = path.resolve('.tmp/bench-scale');
const VALUES = { avg_speed_kmh: 24.5, weekly_distance_km: 130, climb_per_ride_m: 420 };

interface Seeded {
  token: string;
  datasetId: number;
  features: string[];
  cookie: string;
}

async function prepare(env: NodeJS.ProcessEnv): Promise<Seeded> {
  await run('npx', ['tsx', 'scripts/migrate.ts', 'up'], { env, stdio: ['ignore', 'ignore', 'inherit'] });
  await run('npx', ['tsx', 'scripts/seed.ts'], { env, stdio: ['ignore', 'ignore', 'inherit'] });
  Object.assign(process.env, env);
  const m = await import('@/models');
  const { DEMO_USERS } = await import('@/lib/demo/accounts');
  const { sessionCookie } = await import('../tests/helpers/auth');
  const embed = await m.Embed.findOne({ where: { status: 'active' }, order: [['id', 'ASC']] });
  if (!embed) throw new Error('the seed published no calculator');
  // The benchmark measures the servers, not the plan.
  await m.Subscription.update({ plan: 'lab' }, { where: { workspaceId: embed.workspaceId } });
  const dataset = await m.Dataset.findOne({ where: { workspaceId: embed.workspaceId }, order: [['id', 'ASC']] });
  if (!dataset) throw new Error('the seed stored no dataset');
  const analyst = await m.User.findOne({ where: { email: DEMO_USERS.member.email } });
  const features = dataset.columns.filter((c) => c.kind === 'numeric').map((c) => c.name).slice(0, 3);
  const seeded = { token: embed.token, datasetId: dataset.id, features, cookie: await sessionCookie(analyst!.id, embed.workspaceId) };
  await m.sequelize.close();
  return seeded;
}

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

async function load(url: string): Promise<{ rps: number; p99: number; non2xx: number; errors: number }> {
  const result = await autocannon({
    url,
    method: 'POST',
    connections: CONNECTIONS,
    duration: DURATION,
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ values: VALUES }),
  });
  return { rps: result.requests.average, p99: result.latency.p99, non2xx: result.non2xx, errors: result.errors };
}

async function fitsPerMinute(app: string, seeded: Seeded, workers: number, env: NodeJS.ProcessEnv): Promise<number> {
  const procs: ChildProcess[] = [];
  const log = fs.openSync(path.join(DIR, `workers-${workers}.log`), 'a');
  for (let i = 0; i < workers; i++) procs.push(spawn(process.execPath, ['--import', 'tsx', 'scripts/worker.ts'], { env, stdio: ['ignore', log, log], detached: true }));
  try {
    const started = performance.now();
    const ids: number[] = [];
    for (let i = 0; i < FITS; i++) {
      const res = await fetch(`${app}/api/fits`, {
        method: 'POST',
        headers: { 'content-type': 'application/json', cookie: seeded.cookie },
        body: JSON.stringify({ datasetId: seeded.datasetId, features: seeded.features, minComponents: 1, maxComponents: 4, covariances: ['full', 'diagonal'], restarts: 2, seed: i + 1 }),
      });
      if (res.status !== 202) throw new Error(`starting a fit answered ${res.status}: ${await res.text()}`);
      ids.push((await res.json()).fit.id);
    }
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
    for (const p of procs) if (p.pid) try { process.kill(-p.pid, 'SIGTERM'); } catch {}
    await new Promise((r) => setTimeout(r, 1500));
  }
}

async function main() {
  const env: NodeJS.ProcessEnv = { ...process.env, NEXT_DIST_DIR: DIST, NEXT_TELEMETRY_DISABLED: '1' };
  if (buildIsStale()) {
    console.log(`[bench] building into ${DIST}…`);
    await run('npm', ['run', 'build'], { env });
  }
  fs.rmSync(DIR, { recursive: true, force: true });
  fs.mkdirSync(DIR, { recursive: true });
  let postgres: RunningPostgres | undefined;
  let redis: RunningRedis | undefined;
  const servers: ChildProcess[] = [];
  let proxy: http.Server | undefined;
  try {
    postgres = startPostgres(50_000 + (BASE_PORT % 10_000), DIR);
    redis = await startRedis(56_379 + (BASE_PORT % 1000), DIR);
    const { openSequelize } = await import('@/models/db');
    const admin = openSequelize(postgres.url('postgres'));
    await admin.query('CREATE DATABASE bench');
    await admin.close();
    const [portA, portB] = [BASE_PORT, BASE_PORT + 1];
    const appEnv: NodeJS.ProcessEnv = {
      ...env,
      NODE_ENV: 'production',
      DATABASE_URL: postgres.url('bench'),
      REDIS_URL: redis.url,
      PARTWISE_FIT_QUEUE: 'pg-boss',
      PARTWISE_DATA_DIR: DIR,
      NEXTAUTH_URL: `http://127.0.0.1:${portA}`,
      NEXTAUTH_SECRET: randomBytes(32).toString('base64url'),
      // One loopback client stands for many visitors: lift the per-address, per-token and burst limits.
      PARTWISE_SCORE_ADDRESS_BURST: '1000000000',
      PARTWISE_SCORE_TOKEN_BURST: '1000000000',
      PARTWISE_SCORE_BURST_SCALE: '1000000',
    };
    const seeded = await prepare(appEnv);
    for (const port of [portA, portB]) {
      const log = fs.openSync(path.join(DIR, `server-${port}.log`), 'a');
      servers.push(spawnAppServer({ port, env: { ...appEnv, PORT: String(port) }, stdio: ['ignore', log, log], detached: true }));
    }
    await waitForHttp(`http://127.0.0.1:${portA}/api/health`, 90_000, servers[0]);
    await waitForHttp(`http://127.0.0.1:${portB}/api/health`, 90_000, servers[1]);
    proxy = await roundRobin([portA, portB]);
    const proxyPort = (proxy.address() as { port: number }).port;
    const path_ = `/api/score/${seeded.token}`;
    // Warm both instances (first compile, caches).
    for (const port of [portA, portB]) for (let i = 0; i < 50; i++) await fetch(`http://127.0.0.1:${port}${path_}`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ values: VALUES }) });

    console.log(`[bench] scoring: ${CONNECTIONS} connections, ${DURATION} s each; ${os.availableParallelism()} cores on this machine`);
    const one = await load(`http://127.0.0.1:${portA}${path_}`);
    const two = await load(`http://127.0.0.1:${proxyPort}${path_}`);
    console.log(`[bench] fits: ${FITS} fits of the demo rides (1–4 components × full, diagonal; 2 restarts) through pg-boss`);
    const app = `http://127.0.0.1:${portA}`;
    const oneWorker = await fitsPerMinute(app, seeded, 1, appEnv);
    const twoWorkers = await fitsPerMinute(app, seeded, 2, appEnv);

    console.log(`\n== more than one instance, on one ${os.availableParallelism()}-core machine ==`);
    const line = (name: string, f: Awaited<ReturnType<typeof load>>) => console.log(`${name.padEnd(34)} ${f.rps.toFixed(0).padStart(7)} answers/s   p99 ${String(f.p99).padStart(4)} ms   non-2xx ${f.non2xx}   errors ${f.errors}`);
    line('scoring, one instance', one);
    line('scoring, two instances + proxy', two);
    console.log(`ratio two / one: ${(two.rps / one.rps).toFixed(2)}×`);
    console.log(`fits per minute, one worker:  ${oneWorker.toFixed(1)}`);
    console.log(`fits per minute, two workers: ${twoWorkers.toFixed(1)}   (${(twoWorkers / oneWorker).toFixed(2)}×)`);
  } finally {
    proxy?.close();
    for (const s of servers) if (s.pid) try { process.kill(-s.pid, 'SIGTERM'); } catch {}
    await new Promise((r) => setTimeout(r, 1500));
    redis?.stop();
    postgres?.stop();
  }
}

main().then(
  () => process.exit(0),
  (e) => {
    console.error('[bench] failed:', e);
    process.exit(1);
  },
);
