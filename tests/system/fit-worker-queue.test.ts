/**
 * Fits through the pg-boss queue across processes: one app server and one `npm run worker`
 * process on one PostgreSQL database (the server `npm test` started, PARTWISE_TEST_PG_URL, or
 * a throwaway one of this file's own). A fit started through the app runs in the worker and
 * its progress shows through the app; a cancel through the app stops a fit running in the
 * worker; a worker killed with SIGKILL mid-fit leaves a job that pg-boss's expiry retries,
 * and a second worker takes the fit over and finishes it (never left 'running'); a worker
 * stopped with SIGTERM mid-fit hands the fit back and exits cleanly, and a third finishes it.
 */
import fs from 'node:fs';
import path from 'node:path';
import { spawn, type ChildProcess } from 'node:child_process';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_USERS } from '@/lib/demo/accounts';
import { WORKER_LOST_REASON } from '@/lib/fitting/fit-queue';
import { openSequelize } from '@/models/db';
import { startPostgres, type RunningPostgres } from '../../scripts/lib/ensure-postgres';
import { freePort, prepareDatabase, queryApp, startApp, SYSTEM_SECRET, type AppProcess } from '../helpers/app-process';

let pg: RunningPostgres | undefined;
let app: AppProcess | undefined;
let env = {} as NodeJS.ProcessEnv;
let dir = '';
let cookie = '';
let datasetId = 0;
let features: string[] = [];
const workers: ChildProcess[] = [];

type FitView = { id: number; status: string; error: string | null; progress: { fraction?: number; phase?: string } | null };
const query = <T extends object>(sql: string) => queryApp<T>(app!, sql);

async function api(p: string, init: RequestInit = {}) {
  const res = await fetch(`${app!.url}${p}`, { ...init, headers: { cookie, 'content-type': 'application/json', origin: app!.url, ...(init.headers ?? {}) } });
  return { status: res.status, body: (await res.json()) as { fit?: FitView } };
}
async function waitForFit(id: number, done: (fit: FitView) => boolean, timeoutMs = 120_000) {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const { body } = await api(`/api/fits/${id}`);
    if (body.fit && done(body.fit)) return body.fit;
    if (Date.now() > deadline) throw new Error(`fit ${id} did not get there in time: ${JSON.stringify(body.fit)}`);
    await new Promise((r) => setTimeout(r, 150));
  }
}
const ended = (f: FitView) => f.status !== 'queued' && f.status !== 'running';
/** Many candidates, so the fit runs for a while, in turns of PARTWISE_FIT_TURN_MS (below the job expiry). */
const longFit = (seed: number) => ({ datasetId, features, minComponents: 1, maxComponents: 10, covariances: ['full', 'diagonal', 'spherical', 'tied'], restarts: 10, seed, maxIter: 1000, tol: 1e-7 });

/** `npm run worker` as its own process group; resolves once it takes fits. */
async function startWorker(name: string): Promise<{ child: ChildProcess; log: () => string; exited: Promise<number | null> }> {
  const logFile = path.join(dir, `${name}.log`);
  const out = fs.openSync(logFile, 'a');
  const child = spawn(process.execPath, ['--import', 'tsx', 'scripts/worker.ts'], { env, stdio: ['ignore', out, out], detached: true });
  workers.push(child);
  const exited = new Promise<number | null>((resolve) => child.once('exit', (code) => resolve(code)));
  const log = () => fs.readFileSync(logFile, 'utf8');
  const deadline = Date.now() + 60_000;
  while (!/taking fits from pg-boss/.test(log())) {
    if (child.exitCode !== null || Date.now() > deadline) throw new Error(`the worker did not start:\n${log()}`);
    await new Promise((r) => setTimeout(r, 100));
  }
  return { child, log, exited };
}
const signal = (child: ChildProcess, sig: NodeJS.Signals) => {
  try {
    process.kill(-child.pid!, sig);
  } catch {}
};

beforeAll(async () => {
  let server = process.env.PARTWISE_TEST_PG_URL?.replace(/\/+$/, '');
  if (!server) {
    pg = startPostgres(await freePort());
    server = pg.url('').replace(/\/+$/, '');
  }
  const name = `system_queue_${process.pid}`;
  const admin = openSequelize(`${server}/postgres`);
  try {
    await admin.query(`DROP DATABASE IF EXISTS ${name}`);
    await admin.query(`CREATE DATABASE ${name}`);
  } finally {
    await admin.close();
  }
  ({ dir, env } = await prepareDatabase('fit-worker-queue', {
    DATABASE_URL: `${server}/${name}`,
    PARTWISE_FIT_QUEUE: 'pg-boss',
    // Short on purpose: a killed worker's job is taken for lost after 8 s, looked for every second.
    PARTWISE_FIT_JOB_EXPIRE_S: '8',
    PARTWISE_QUEUE_MAINTENANCE_S: '1',
    PARTWISE_FIT_TURN_MS: '2000',
    PARTWISE_FIT_PROGRESS_MS: '100',
    PARTWISE_WORKER_POLL_MS: '100',
    PARTWISE_FIT_SLOTS: '1',
  }));
  app = await startApp(dir, env);
  process.env.NEXTAUTH_SECRET = SYSTEM_SECRET;
  const [analyst] = await query<{ id: number; session_generation: number }>(`SELECT id, session_generation FROM users WHERE email = '${DEMO_USERS.member.email}'`);
  const [dataset] = await query<{ id: number; workspace_id: number; columns: unknown }>('SELECT id, workspace_id, columns FROM datasets ORDER BY id LIMIT 1');
  datasetId = dataset.id;
  const columns = (typeof dataset.columns === 'string' ? JSON.parse(dataset.columns) : dataset.columns) as { name: string; kind: string }[];
  features = columns.filter((c) => c.kind === 'numeric').map((c) => c.name).slice(0, 3);
  const { sessionCookie } = await import('../helpers/auth');
  cookie = await sessionCookie(analyst.id, dataset.workspace_id, { generation: analyst.session_generation });
});

afterAll(async () => {
  for (const w of workers) signal(w, 'SIGKILL');
  await app?.stop('SIGTERM');
  pg?.stop();
});

describe('fits through pg-boss with a separate worker process', () => {
  it('runs a fit in the worker with progress through the app, survives a worker killed mid-fit, cancels another, and hands a fit back on SIGTERM', async () => {
    const first = await startWorker('worker-1');

    // Progress through the app while the worker computes.
    const started = await api('/api/fits', { method: 'POST', body: JSON.stringify(longFit(3)) });
    expect(started.status).toBe(202);
    const id = started.body.fit!.id;
    const running = await waitForFit(id, (f) => f.status === 'running' && (f.progress?.fraction ?? 0) > 0);
    expect(running.progress?.fraction).toBeLessThan(1);
    // The worker process, not the app server, runs it: the row names the worker's pid as its runner.
    const [owner] = await query<{ runner_id: string | null }>(`SELECT runner_id FROM fits WHERE id = ${id}`);
    expect(owner.runner_id).toContain(`:${first.child.pid}:`);

    // Killed with no chance to clean up: the fit is left 'running' with a job still active.
    signal(first.child, 'SIGKILL');
    await first.exited;
    const [left] = await query<{ status: string }>(`SELECT status FROM fits WHERE id = ${id}`);
    expect(['running', 'queued']).toContain(left.status);

    // A second worker: pg-boss's expiry fails the lost job, its retry is taken over, and the fit ends.
    const second = await startWorker('worker-2');
    const done = await waitForFit(id, ended);
    if (left.status === 'running') {
      // Retried once and finished from its last checkpoint (a second loss would fail it with WORKER_LOST_REASON).
      expect(done.status, JSON.stringify(done)).toBe('succeeded');
      expect(done.error).not.toBe(WORKER_LOST_REASON);
      expect(second.log()).toMatch(new RegExp(`fit ${id}: turn taken over after a lost worker`));
      const jobs = await query<{ state: string; retry_count: number }>(`SELECT state, retry_count FROM pgboss.job WHERE name = 'partwise-fit' AND (data->>'fitId')::int = ${id} AND retry_count > 0`);
      expect(jobs.length).toBeGreaterThan(0);
    } else {
      // Killed between two turns: the next turn's job was already queued, and worker 2 simply ran it.
      expect(done.status).toBe('succeeded');
    }

    // Cancel through the app stops a fit running in the worker.
    const other = await api('/api/fits', { method: 'POST', body: JSON.stringify(longFit(5)) });
    expect(other.status).toBe(202);
    const otherId = other.body.fit!.id;
    await waitForFit(otherId, (f) => f.status === 'running' && (f.progress?.fraction ?? 0) > 0);
    expect((await api(`/api/fits/${otherId}/cancel`, { method: 'POST' })).status).toBe(202);
    const cancelled = await waitForFit(otherId, ended);
    expect(cancelled.status).toBe('cancelled');

    // SIGTERM mid-fit: the worker takes no new fit, hands the running one back at its next candidate and exits cleanly.
    const third = await api('/api/fits', { method: 'POST', body: JSON.stringify(longFit(7)) });
    const thirdId = third.body.fit!.id;
    await waitForFit(thirdId, (f) => f.status === 'running' && (f.progress?.fraction ?? 0) > 0);
    signal(second.child, 'SIGTERM');
    expect(await second.exited).toBe(0);
    expect(second.log()).toMatch(/SIGTERM: handing back 1 running fit/);
    const handed = (await api(`/api/fits/${thirdId}`)).body.fit!;
    expect(handed.status).toBe('queued');
    expect(handed.progress).toMatchObject({ paused: true });
    const jobs = await query<{ state: string }>(`SELECT state FROM pgboss.job WHERE name = 'partwise-fit' AND (data->>'fitId')::int = ${thirdId} AND state = 'created'`);
    expect(jobs).toHaveLength(1);

    // The next worker carries on from there.
    const third_ = await startWorker('worker-3');
    expect((await waitForFit(thirdId, ended)).status).toBe('succeeded');
    signal(third_.child, 'SIGTERM');
    expect(await third_.exited).toBe(0);
  });
});
