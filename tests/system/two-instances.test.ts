/**
 * Two app server processes on one PostgreSQL database and one Redis, as "Running on more
 * than one machine" in the README describes (without the load balancer: the test talks
 * to each instance directly). PostgreSQL and Redis are the test stack's (npm test passes
 * PARTWISE_TEST_PG_URL and PARTWISE_TEST_REDIS_URL) or throwaway ones of this test's; if
 * either cannot start the test fails, it does not skip.
 *
 *   - a calculator disabled through A is refused by B within one second, although B's
 *     embed cache would keep it for a minute (PARTWISE_EMBED_CACHE_MS): the invalidation
 *     travels over Redis;
 *   - the per-address scoring limit holds across both: one address, requests split
 *     between A and B, exactly the limit served;
 *   - the usage count is exact across both after they flush (on SIGTERM);
 *   - a session signed in on A is accepted by B (the same NEXTAUTH_SECRET);
 *   - with the fit queue on, a fit started through A runs on a worker process (npm run
 *     worker) and its progress and result show through B.
 */
import { randomUUID } from 'node:crypto';
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import { openSequelize } from '@/models/db';
import { DEMO_USERS } from '@/lib/demo/accounts';
import { startPostgres, type RunningPostgres } from '../../scripts/lib/ensure-postgres';
import { startRedis, type RunningRedis } from '../../scripts/lib/ensure-redis';
import { run } from '../../scripts/lib/run';
import { SYSTEM_SECRET, startApp, type AppProcess } from '../helpers/app-process';

const ADDRESS_LIMIT = 12;
const good = { avg_speed_kmh: 24.5, weekly_distance_km: 130, climb_per_ride_m: 420 };

let pg: RunningPostgres | undefined;
let redis: RunningRedis | undefined;
let databaseUrl = '';
let dir = '';
let a: AppProcess | undefined;
let b: AppProcess | undefined;
let embeds: { id: number; token: string }[] = [];
let appEnv = {} as NodeJS.ProcessEnv;
let worker: ChildProcess | undefined;

async function query<T extends object>(sql: string, replacements: unknown[] = []): Promise<T[]> {
  const db = openSequelize(databaseUrl);
  try {
    return await db.query<T>(sql, { type: QueryTypes.SELECT, replacements });
  } finally {
    await db.close();
  }
}

beforeAll(async () => {
  // A database of this test's own on the stack's PostgreSQL (or a throwaway server).
  let server = process.env.PARTWISE_TEST_PG_URL?.replace(/\/+$/, '');
  if (!server) {
    pg = startPostgres(Number(process.env.PARTWISE_TEST_PG_PORT ?? 51_000 + (process.pid % 1000)));
    server = pg.url('').replace(/\/+$/, '');
  }
  const name = `two_instances_${randomUUID().replace(/-/g, '')}`;
  const admin = openSequelize(`${server}/postgres`);
  try {
    await admin.query(`CREATE DATABASE ${name}`);
  } finally {
    await admin.close();
  }
  databaseUrl = `${server}/${name}`;
  let redisUrl = process.env.PARTWISE_TEST_REDIS_URL;
  if (!redisUrl) {
    redis = await startRedis(58_000 + (process.pid % 1000));
    redisUrl = redis.url;
  }

  dir = path.resolve(`.tmp/system-two-instances-${process.pid}`);
  fs.rmSync(dir, { recursive: true, force: true });
  fs.mkdirSync(dir, { recursive: true });
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    NODE_ENV: 'production',
    DATABASE_URL: databaseUrl,
    REDIS_URL: redisUrl,
    PARTWISE_DATA_DIR: dir,
    NEXTAUTH_SECRET: SYSTEM_SECRET,
    // The address comes from X-Forwarded-For, as behind the load balancer.
    PARTWISE_TRUST_PROXY: '1',
    PARTWISE_SCORE_ADDRESS_BURST: String(ADDRESS_LIMIT),
    PARTWISE_SCORE_ADDRESS_WINDOW_MS: '600000',
    // Only the per-address limit is under test; the calculator's own burst windows are raised out of the way.
    PARTWISE_SCORE_BURST_SCALE: '1000',
    // A minute: only the broadcast can make B forget a calculator within a second.
    PARTWISE_EMBED_CACHE_MS: '60000',
    // Fits go to the queue: the instances compute none, a worker process does.
    PARTWISE_FIT_QUEUE: 'pg-boss',
  };
  appEnv = env;
  delete env.NEXTAUTH_URL;
  await run('npx', ['tsx', 'scripts/migrate.ts', 'up'], { env, stdio: ['ignore', 'ignore', 'inherit'] });
  await run('npx', ['tsx', 'scripts/seed.ts'], { env, stdio: ['ignore', 'ignore', 'inherit'] });
  embeds = await query<{ id: number; token: string }>(`SELECT id, token FROM embeds WHERE status = 'active' ORDER BY id`);
  expect(embeds.length).toBeGreaterThanOrEqual(1);

  fs.mkdirSync(path.join(dir, 'a'));
  fs.mkdirSync(path.join(dir, 'b'));
  [a, b] = await Promise.all([startApp(path.join(dir, 'a'), env), startApp(path.join(dir, 'b'), env)]);
  for (const app of [a, b]) {
    const health = (await (await fetch(`${app.url}/api/health`)).json()) as { ok: boolean; database: { dialect: string }; redis: { ok: boolean; invalidations: string } };
    expect(health).toMatchObject({ ok: true, database: { dialect: 'postgres' }, redis: { ok: true, invalidations: 'listening' } });
  }
});

afterAll(async () => {
  if (worker?.pid) {
    try {
      process.kill(-worker.pid, 'SIGTERM');
    } catch {}
  }
  await Promise.all([a?.stop(), b?.stop()]);
  if (databaseUrl && !pg) {
    const server = databaseUrl.slice(0, databaseUrl.lastIndexOf('/'));
    const admin = openSequelize(`${server}/postgres`);
    await admin.query(`DROP DATABASE IF EXISTS ${databaseUrl.slice(databaseUrl.lastIndexOf('/') + 1)} WITH (FORCE)`).catch(() => {});
    await admin.close();
  }
  pg?.stop();
  redis?.stop();
});

function score(app: AppProcess, token: string, address: string) {
  return fetch(`${app.url}/api/score/${token}`, { method: 'POST', headers: { 'content-type': 'application/json', 'x-forwarded-for': address }, body: JSON.stringify({ values: good }) });
}

async function signIn(app: AppProcess, user: { email: string; password: string }): Promise<string> {
  const res = await fetch(`${app.url}/api/auth/csrf`);
  const { csrfToken } = (await res.json()) as { csrfToken: string };
  const csrfCookie = res.headers.getSetCookie().map((l) => l.split(';')[0]).find((c) => c.includes('csrf-token'))!;
  const signin = await fetch(`${app.url}/api/auth/callback/credentials`, {
    method: 'POST',
    redirect: 'manual',
    headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: csrfCookie },
    body: new URLSearchParams({ csrfToken, email: user.email, password: user.password, json: 'true' }),
  });
  const session = signin.headers.getSetCookie().map((l) => l.split(';')[0]).find((c) => /session-token=/.test(c));
  expect(session, `a session cookie from ${app.url}`).toBeTruthy();
  return session!;
}

describe('two app instances on one PostgreSQL and one Redis', () => {
  let staffCookie = '';

  it('accepts on B a session signed in on A', async () => {
    staffCookie = await signIn(a!, DEMO_USERS.staff);
    const onB = await fetch(`${b!.url}/api/support/calculators`, { headers: { cookie: staffCookie } });
    expect(onB.status).toBe(200);
    const without = await fetch(`${b!.url}/api/support/calculators`);
    expect([401, 403]).toContain(without.status);
  });

  it('holds the per-address scoring limit across both instances, and counts usage exactly', async () => {
    const token = embeds[0].token;
    const address = '198.51.100.7';
    const statuses: number[] = [];
    // Alternating A, B, A, B… from one address, more than twice the limit.
    for (let i = 0; i < ADDRESS_LIMIT * 2 + 4; i++) statuses.push((await score(i % 2 === 0 ? a! : b!, token, address)).status);
    const served = statuses.filter((s) => s === 200).length;
    expect(statuses.filter((s) => s !== 200 && s !== 429)).toEqual([]);
    // Each instance alone would have served up to the limit (2 × in all).
    expect(served).toBe(ADDRESS_LIMIT);
    // Both instances served some.
    expect(statuses.slice(0, ADDRESS_LIMIT).every((s) => s === 200)).toBe(true);

    // More answers from other addresses on both, concurrently.
    const more = await Promise.all(Array.from({ length: 20 }, (_, i) => score(i % 2 ? a! : b!, token, `203.0.113.${i}`).then((r) => r.status)));
    expect(more.every((s) => s === 200)).toBe(true);
    const total = served + more.length;

    // Both flush their buffered counts on SIGTERM; the database holds the exact sum.
    const [codeA, codeB] = await Promise.all([a!.stop(), b!.stop()]);
    expect([codeA, codeB]).toEqual([0, 0]);
    const month = new Date().toISOString().slice(0, 7);
    const [row] = await query<{ n: string | number | null }>(`SELECT SUM(count) AS n FROM usage_counters WHERE embed_id = ? AND granularity = 'month' AND period = ?`, [embeds[0].id, month]);
    expect(Number(row.n)).toBe(total);
    [a, b] = await Promise.all([a!.restart(), b!.restart()]);
  });

  it('refuses on B within one second a calculator disabled through A', async () => {
    const target = embeds[embeds.length - 1];
    // B has the calculator in its cache (kept a minute in this run).
    expect((await score(b!, target.token, '192.0.2.10')).status).toBe(200);
    expect((await score(b!, target.token, '192.0.2.11')).status).toBe(200);
    staffCookie = await signIn(a!, DEMO_USERS.staff);
    const disabled = await fetch(`${a!.url}/api/support/calculators/${target.id}/disable`, {
      method: 'POST',
      headers: { cookie: staffCookie, 'content-type': 'application/json', origin: a!.url },
      body: JSON.stringify({ reason: 'Switched off for review after a report of misuse.' }),
    });
    expect(disabled.status, await disabled.clone().text()).toBe(200);
    const since = Date.now();
    let status = 0;
    while (Date.now() - since < 1000) {
      status = (await score(b!, target.token, `192.0.2.${20 + Math.floor((Date.now() - since) / 50)}`)).status;
      if (status !== 200) break;
      await new Promise((r) => setTimeout(r, 25));
    }
    expect(status).toBe(410);
  });

  it('runs a fit started through A on a worker, with its progress and result seen through B', async () => {
    const logFile = path.join(dir, 'worker.log');
    const out = fs.openSync(logFile, 'a');
    worker = spawn(process.execPath, ['--import', 'tsx', 'scripts/worker.ts'], { env: appEnv, stdio: ['ignore', out, out], detached: true });
    const started = Date.now();
    while (!/taking fits from pg-boss/.test(fs.readFileSync(logFile, 'utf8'))) {
      if (worker.exitCode !== null || Date.now() - started > 60_000) throw new Error(`the worker did not start:\n${fs.readFileSync(logFile, 'utf8')}`);
      await new Promise((r) => setTimeout(r, 100));
    }
    const cookie = await signIn(a!, DEMO_USERS.member);
    const [dataset] = await query<{ id: number }>('SELECT id FROM datasets ORDER BY id LIMIT 1');
    const res = await fetch(`${a!.url}/api/fits`, {
      method: 'POST',
      headers: { cookie, 'content-type': 'application/json', origin: a!.url },
      body: JSON.stringify({ datasetId: dataset.id, features: Object.keys(good), minComponents: 1, maxComponents: 6, covariances: ['full', 'diagonal', 'spherical'], restarts: 4, seed: 11 }),
    });
    expect(res.status, await res.clone().text()).toBe(202);
    const { fit } = (await res.json()) as { fit: { id: number } };
    const seen = new Set<string>();
    let last: { status: string; progress?: { fraction?: number } } | null = null;
    while (Date.now() - started < 120_000) {
      const onB = await fetch(`${b!.url}/api/fits/${fit.id}`, { headers: { cookie } });
      expect(onB.status).toBe(200);
      last = ((await onB.json()) as { fit: { status: string; progress?: { fraction?: number } } }).fit;
      seen.add(last.status);
      if (last.status !== 'queued' && last.status !== 'running') break;
      await new Promise((r) => setTimeout(r, 100));
    }
    expect(last?.status).toBe('succeeded');
    expect(last?.progress?.fraction).toBe(1);
    // The row names the worker's process as its runner, not either app instance.
    const [row] = await query<{ runner_id: string | null }>('SELECT runner_id FROM fits WHERE id = ?', [fit.id]);
    expect(String(row.runner_id)).toContain(`:${worker.pid}:`);
    expect(seen.has('running') || seen.has('queued')).toBe(true);
  });
});
