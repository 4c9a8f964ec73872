import fs from 'node:fs';
import path from 'node:path';
import { spawn, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import autocannon from 'autocannon';
import { buildIsStale } from './lib/build-state';
import { spawnAppServer } from './lib/app-process';
import { run, waitForHttp } from './lib/run';
import { arg } from './lib/args';

/**
 * Load benchmark: `npm run bench:load [-- --duration 20 --connections 32 --port 3275]`
 *
 * Builds when stale (into NEXT_DIST_DIR, default .next-bench-load), migrates and seeds a
 * fresh SQLite file under .tmp, starts the production server, starts a large fit of the
 * demo rides through the fit route, then drives the public scoring route (the seeded
 * demo calculator) and the calculator page with autocannon at the same time for a fixed
 * duration. Prints throughput, p50/p99 latency and errors for each, and finally checks
 * that the usage counters grew by exactly the number of 200 answers: no answer lost or
 * counted twice under concurrent SQLite writes. Exits non-zero when they differ.
 */
const DURATION = Number(arg('duration', '20'));
const CONNECTIONS = Number(arg('connections', '32'));
const PORT = Number(arg('port', process.env.PARTWISE_BENCH_PORT ?? '3275'));
const DIST = process.env.NEXT_DIST_DIR || '.next-bench-load';
const DIR = path.resolve(`.tmp/bench-load-${PORT}`);
const APP = `http://127.0.0.1:${PORT}`;
const VALUES = { avg_speed_kmh: 24.5, weekly_distance_km: 130, climb_per_ride_m: 420 };

interface Seeded {
  token: string;
  embedId: number;
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
  // The demo workspace is on the free plan (500 answers a month); the benchmark measures
  // the server, not the plan, so it runs on the largest plan.
  await m.Subscription.update({ plan: 'lab' }, { where: { workspaceId: embed.workspaceId } });
  const dataset = await m.Dataset.findOne({ where: { workspaceId: embed.workspaceId }, order: [['id', 'ASC']] });
  if (!dataset) throw new Error('the seed stored no dataset');
  const analyst = await m.User.findOne({ where: { email: DEMO_USERS.member.email } });
  const features = dataset.columns.filter((c) => c.kind === 'numeric').map((c) => c.name).slice(0, 3);
  const seeded = { token: embed.token, embedId: embed.id, datasetId: dataset.id, features, cookie: await sessionCookie(analyst!.id, embed.workspaceId) };
  await m.sequelize.close();
  return seeded;
}

async function usageCount(env: NodeJS.ProcessEnv, embedId: number): Promise<{ month: number; hours: number }> {
  // A separate process reads the file the server wrote, so nothing is cached here.
  const code = `const { sequelize } = await import('@/models'); const [r] = await sequelize.query("SELECT granularity, SUM(count) AS n FROM usage_counters WHERE embed_id = ${embedId} GROUP BY granularity"); console.log(JSON.stringify(r)); await sequelize.close();`;
  const file = path.join(DIR, 'usage.mts');
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

function cannon(opts: autocannon.Options): Promise<autocannon.Result> {
  return new Promise((resolve, reject) => {
    autocannon(opts, (err, result) => (err ? reject(err) : resolve(result)));
  });
}

function line(name: string, r: autocannon.Result) {
  const codes = Object.entries((r as unknown as { statusCodeStats?: Record<string, { count: number }> }).statusCodeStats ?? {})
    .map(([code, s]) => `${code}×${s.count}`)
    .join(' ');
  console.log(
    `${name.padEnd(16)} ${String(Math.round(r.requests.average)).padStart(6)} req/s   p50 ${String(r.latency.p50).padStart(5)} ms   p99 ${String(r.latency.p99).padStart(5)} ms   ` +
      `requests ${r.requests.total}   errors ${r.errors}   timeouts ${r.timeouts}   non-2xx ${r.non2xx}   [${codes}]`,
  );
}

function okCount(r: autocannon.Result): number {
  return (r as unknown as { statusCodeStats?: Record<string, { count: number }> }).statusCodeStats?.['200']?.count ?? 0;
}

async function main() {
  process.env.NEXT_DIST_DIR = DIST;
  if (buildIsStale()) {
    console.log(`[bench:load] building into ${DIST}…`);
    await run('npm', ['run', 'build'], { env: { ...process.env, NEXT_TELEMETRY_DISABLED: '1' } });
  }
  fs.rmSync(DIR, { recursive: true, force: true });
  fs.mkdirSync(DIR, { recursive: true });
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    NODE_ENV: 'production',
    NEXT_DIST_DIR: DIST,
    NEXT_TELEMETRY_DISABLED: '1',
    DATABASE_URL: path.join(DIR, 'partwise.sqlite'),
    PARTWISE_DATA_DIR: DIR,
    NEXTAUTH_URL: APP,
    NEXTAUTH_SECRET: process.env.NEXTAUTH_SECRET || randomBytes(32).toString('base64url'),
    // The rate limits protect calculators from one noisy visitor; one load generator is that visitor.
    PARTWISE_SCORE_ADDRESS_BURST: '100000000',
    PARTWISE_SCORE_TOKEN_BURST: '100000000',
    // and the plan's per-calculator burst limits (fair use), which would otherwise answer most requests with 429.
    PARTWISE_SCORE_BURST_SCALE: '1000000',
    PORT: String(PORT),
  };
  const seeded = await prepare(env);
  const log = fs.openSync(path.join(DIR, 'server.log'), 'a');
  const server: ChildProcess = spawnAppServer({ port: PORT, env, stdio: ['ignore', log, log], detached: true });
  let failed = false;
  try {
    await waitForHttp(`${APP}/api/health`, 90_000, server);
    const before = await usageCount(env, seeded.embedId);

    const fitRes = await fetch(`${APP}/api/fits`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', cookie: seeded.cookie },
      body: JSON.stringify({ datasetId: seeded.datasetId, features: seeded.features, minComponents: 1, maxComponents: 10, covariances: ['full', 'diagonal', 'spherical', 'tied'], restarts: 10, seed: 7, maxIter: 1000, tol: 1e-7 }),
    });
    const fitBody = (await fitRes.json()) as { fit?: { id: number; status: string }; error?: unknown };
    if (fitRes.status !== 202 || !fitBody.fit) throw new Error(`the background fit did not start: ${fitRes.status} ${JSON.stringify(fitBody)}`);
    console.log(`[bench:load] fit ${fitBody.fit.id} started (40 candidates × 10 restarts); driving load for ${DURATION} s with ${CONNECTIONS}+${Math.max(4, CONNECTIONS / 4)} connections…`);

    // warm both routes so compilation/first-load costs stay out of the figures (and count the warm-up answer)
    const warm = await fetch(`${APP}/api/score/${seeded.token}`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ values: VALUES }) });
    if (warm.status !== 200) throw new Error(`warm-up scoring answered ${warm.status}: ${await warm.text()}`);
    await fetch(`${APP}/embed/${seeded.token}`);

    const [scoring, page] = await Promise.all([
      cannon({ url: `${APP}/api/score/${seeded.token}`, method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ values: VALUES }), connections: CONNECTIONS, duration: DURATION }),
      cannon({ url: `${APP}/embed/${seeded.token}`, connections: Math.max(4, CONNECTIONS / 4), duration: DURATION }),
    ]);

    // Answers are counted in memory and written every 250 ms (lib/usage): let the last flush land.
    await new Promise((r) => setTimeout(r, 1000));
    const fitNow = (await (await fetch(`${APP}/api/fits/${fitBody.fit.id}`, { headers: { cookie: seeded.cookie } })).json()) as { fit: { status: string; progress?: { fraction?: number } } };
    const after = await usageCount(env, seeded.embedId);
    const answered = okCount(scoring) + 1; // + the warm-up answer
    console.log('');
    line('scoring POST', scoring);
    line('calculator GET', page);
    console.log(`background fit: ${fitNow.fit.status}${fitNow.fit.progress?.fraction !== undefined ? ` (${Math.round(fitNow.fit.progress.fraction * 100)} % done)` : ''}`);
    const month = after.month - before.month;
    const hours = after.hours - before.hours;
    // autocannon drops requests still in flight at the deadline; the server answers (and
    // counts) them, so the timed phase can only be bounded by the connection count.
    const cut = month - answered;
    console.log(`timed phase: usage counters month +${month}, hour buckets +${hours}; 200 answers seen ${answered} (+${cut} in flight at the deadline, at most ${CONNECTIONS})`);
    if (hours !== month || cut < 0 || cut > CONNECTIONS) failed = true;

    // Exact phase: a fixed number of requests, every response awaited, while another fit runs.
    const EXACT = Number(arg('exact', '1500'));
    await fetch(`${APP}/api/fits`, { method: 'POST', headers: { 'content-type': 'application/json', cookie: seeded.cookie }, body: JSON.stringify({ datasetId: seeded.datasetId, features: seeded.features, minComponents: 1, maxComponents: 10, covariances: ['full', 'tied'], restarts: 10, seed: 8, maxIter: 1000, tol: 1e-7 }) });
    const exact = await cannon({ url: `${APP}/api/score/${seeded.token}`, method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ values: VALUES }), connections: CONNECTIONS, amount: EXACT });
    await new Promise((r) => setTimeout(r, 1000));
    const final = await usageCount(env, seeded.embedId);
    line('scoring (exact)', exact);
    const exactMonth = final.month - after.month;
    const exactHours = final.hours - after.hours;
    console.log(`exact phase: ${EXACT} requests, 200 answers ${okCount(exact)}; usage counters month +${exactMonth}, hour buckets +${exactHours}`);
    if (exactMonth !== okCount(exact) || exactHours !== okCount(exact) || failed) {
      failed = true;
      console.error('[bench:load] MISMATCH: the usage counters do not equal the answers given.');
    } else {
      console.log('[bench:load] usage counters equal the answers given exactly.');
    }
    if (scoring.errors || scoring.non2xx) console.log(`[bench:load] note: ${scoring.errors} connection errors and ${scoring.non2xx} non-2xx scoring answers (see the status list above).`);
  } finally {
    if (server.pid) {
      try {
        process.kill(-server.pid, 'SIGTERM');
      } catch {}
    }
  }
  process.exit(failed ? 1 : 0);
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
