/**
 * Fits through the pg-boss queue (PARTWISE_FIT_QUEUE=pg-boss on PostgreSQL): the app
 * only publishes a job beside the fit row; the worker loop (lib/fitting/queue-worker.ts,
 * called here in this process) runs it with the usual runner code, progress and
 * cancellation go through the row, and a lost worker's job (failed as pg-boss's expiry
 * fails it) is taken over once, then failed with a reason. On SQLite the queue setting
 * is refused with one clear line.
 */
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import { Fit, sequelize } from '@/models';
import { POST as startRoute } from '@/app/api/fits/route';
import { GET as pollRoute } from '@/app/api/fits/[id]/route';
import { POST as cancelRoute } from '@/app/api/fits/[id]/cancel/route';
import { POST as uploadRoute } from '@/app/api/datasets/route';
import { FIT_DEAD_QUEUE, FIT_QUEUE, WORKER_LOST_REASON, fitBoss, fitQueueMode, queueHealth, stopFitBoss, type FitJobData } from '@/lib/fitting/fit-queue';
import { activeFitIds } from '@/lib/fitting/jobs';
import { startFitWorker, type FitWorkerHandle } from '@/lib/fitting/queue-worker';
import { makeRequest } from '../../helpers/auth';
import { csvForm, ridesCsv, RIDE_FEATURES, studioWorld } from '../studio/helpers';

const onPg = process.env.PARTWISE_TEST_DIALECT === 'postgres';
const FEATURES = RIDE_FEATURES;
const TINY = { features: FEATURES, minComponents: 1, maxComponents: 2, covariances: ['diagonal'], restarts: 1, seed: 1 };
/** Many candidates, each quick: a fit that runs for a while and pauses between candidates. */
const LONG = { features: FEATURES, minComponents: 1, maxComponents: 8, covariances: ['full', 'diagonal', 'spherical', 'tied'], restarts: 4, seed: 3 };

const none = { params: Promise.resolve({}) };
const ctx = (id: number) => ({ params: Promise.resolve({ id: String(id) }) });
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

describe.skipIf(onPg)('the queue setting on SQLite', () => {
  it('is refused with one line naming the setting and what it needs', () => {
    expect(fitQueueMode({ PARTWISE_FIT_QUEUE: '' })).toBe('in-process');
    expect(() => fitQueueMode({ PARTWISE_FIT_QUEUE: 'pg-boss', DATABASE_URL: 'data/x.sqlite' })).toThrow(/PARTWISE_FIT_QUEUE=pg-boss needs DATABASE_URL to be a postgres:\/\/ address/);
    expect(() => fitQueueMode({ PARTWISE_FIT_QUEUE: 'bullmq' })).toThrow(/PARTWISE_FIT_QUEUE is "bullmq", which Partwise does not know/);
  });
  it('leaves queueHealth null when no queue is configured', async () => {
    expect(await queueHealth()).toBeNull();
  });
});

describe.skipIf(!onPg)('fits through pg-boss', () => {
  let w: Awaited<ReturnType<typeof studioWorld>>;
  let small: number;
  let big: number;
  let other: number;
  let worker: FitWorkerHandle | null = null;

  async function upload(userId: number, csv: string, name: string): Promise<number> {
    const res = await uploadRoute(await makeRequest('/api/datasets', { method: 'POST', userId, body: csvForm(csv, name) }), none);
    expect(res.status).toBe(201);
    return (await res.json()).dataset.id;
  }
  async function start(body: Record<string, unknown>) {
    const res = await startRoute(await makeRequest('/api/fits', { method: 'POST', userId: w.member.id, json: body }), none);
    expect(res.status).toBe(202);
    return ((await res.json()) as any).fit;
  }
  async function poll(id: number) {
    return (await (await pollRoute(await makeRequest(`/api/fits/${id}`, { userId: w.member.id }), ctx(id))).json()).fit;
  }
  async function waitFor(id: number, done: (fit: any) => boolean, seen: any[] = [], timeoutMs = 90_000) {
    const t0 = Date.now();
    for (;;) {
      const fit = await poll(id);
      seen.push(fit);
      if (done(fit)) return fit;
      if (Date.now() - t0 > timeoutMs) throw new Error(`fit ${id} still ${fit.status} after ${timeoutMs} ms`);
      await sleep(25);
    }
  }
  const ended = (f: any) => !['queued', 'running'].includes(f.status);
  const jobsOf = (fitId: number) =>
    sequelize.query<{ name: string; state: string; retry_count: number }>(`SELECT name, state, retry_count FROM pgboss.job WHERE (data->>'fitId')::int = ? ORDER BY created_on`, { replacements: [fitId], type: QueryTypes.SELECT });
  /** Take the fit's job the way a worker does and mark the fit running under a runner that then dies. */
  async function takeAndDie(fitId: number, claim: boolean) {
    const boss = await fitBoss();
    const [job] = await boss.fetch<FitJobData>(FIT_QUEUE, { batchSize: 1, includeMetadata: true });
    expect(job.data.fitId).toBe(fitId);
    if (claim) await Fit.update({ status: 'running', runnerId: 'gone-host:1:dead', startedAt: new Date(), lastTurnAt: new Date() }, { where: { id: fitId } });
    // What pg-boss's upkeep does to a job still active after its expiry.
    await boss.fail(FIT_QUEUE, job.id, { message: 'job failed by timeout in active state' });
    return job;
  }

  beforeAll(async () => {
    process.env.PARTWISE_FIT_QUEUE = 'pg-boss';
    process.env.PARTWISE_FIT_PROGRESS_MS = '20';
    process.env.PARTWISE_WORKER_POLL_MS = '50';
    process.env.PARTWISE_FIT_SLOTS = '1';
    w = await studioWorld('lab');
    small = await upload(w.member.id, ridesCsv(300), 'rides.csv');
    big = await upload(w.member.id, ridesCsv(3000), 'rides-season.csv');
    other = await upload(w.outsider.id, ridesCsv(300), 'other-club.csv');
  });
  afterEach(async () => {
    await worker?.stop(5_000);
    worker = null;
    for (const f of await Fit.findAll({ where: { status: ['queued', 'running'] } })) await Fit.update({ status: 'cancelled', cancelRequested: true, finishedAt: new Date() }, { where: { id: f.id } });
    await sequelize.query('DELETE FROM pgboss.job');
  });
  afterAll(async () => {
    await stopFitBoss();
    for (const k of ['PARTWISE_FIT_QUEUE', 'PARTWISE_FIT_PROGRESS_MS', 'PARTWISE_WORKER_POLL_MS', 'PARTWISE_FIT_SLOTS']) delete process.env[k];
  });

  it('publishes a job beside the new fit row and leaves it to a worker, not the app process', async () => {
    const fit = await start({ ...TINY, datasetId: small });
    expect(await jobsOf(fit.id)).toEqual([{ name: FIT_QUEUE, state: 'created', retry_count: 0 }]);
    await sleep(300);
    expect((await poll(fit.id)).status).toBe('queued');
    expect(activeFitIds()).toEqual([]);
    expect(await queueHealth()).toEqual({ ok: true, detail: 'pg-boss: 1 fit turn waiting' });
  });

  it('runs the fit in the worker loop, with progress through the row, and completes its job', async () => {
    const fit = await start({ ...LONG, datasetId: small, maxComponents: 3, covariances: ['diagonal', 'full'] });
    worker = await startFitWorker({ log: () => {} });
    const seen: any[] = [];
    const done = await waitFor(fit.id, ended, seen);
    expect(done.status).toBe('succeeded');
    expect(seen.some((f) => f.status === 'running' && f.progress?.phase === 'fitting' && f.progress.fraction > 0 && f.progress.fraction < 1)).toBe(true);
    const row = (await Fit.findByPk(fit.id))!;
    expect((row.result as any).candidates).toHaveLength(6);
    expect(row.runnerId).toMatch(new RegExp(`:${process.pid}:`));
    expect(await jobsOf(fit.id)).toEqual([{ name: FIT_QUEUE, state: 'completed', retry_count: 0 }]);
  });

  it('takes the next job as soon as a slot frees, not a poll interval later, and stops without waiting out the poll', async () => {
    const fits = [await start({ ...TINY, datasetId: small, seed: 1 }), await start({ ...TINY, datasetId: small, seed: 2 }), await start({ ...TINY, datasetId: small, seed: 3 })];
    // One slot and a look at the queue every 10 minutes: only a freed slot can start fits 2 and 3 in time.
    worker = await startFitWorker({ log: () => {}, pollMs: 600_000 });
    for (const fit of fits) expect((await waitFor(fit.id, ended, [], 30_000)).status).toBe('succeeded');
    const stopped = worker.stop(5_000);
    worker = null;
    await stopped;
  });

  it('keeps the fair order across workspaces: the other workspace\'s fit starts second, not after all of the first\'s', async () => {
    const a1 = await start({ ...TINY, datasetId: small, seed: 1 });
    const a2 = await start({ ...TINY, datasetId: small, seed: 2 });
    const a3 = await start({ ...TINY, datasetId: small, seed: 3 });
    const res = await startRoute(await makeRequest('/api/fits', { method: 'POST', userId: w.outsider.id, json: { ...TINY, datasetId: other } }), none);
    expect(res.status).toBe(202);
    const b1 = ((await res.json()) as any).fit;
    // The order the app shows (the rule of schedule.ts): B's one fit is not left behind A's three.
    const positions = new Map<number, number>();
    for (const f of [a1, a2, a3]) positions.set(f.id, (await poll(f.id)).queuePosition);
    positions.set(b1.id, b1.queuePosition);
    const order = [a1, a2, a3, b1].map((f) => f.id).sort((x, y) => positions.get(x)! - positions.get(y)!);
    expect(order.indexOf(b1.id)).toBeLessThanOrEqual(1);
    worker = await startFitWorker({ log: () => {} }); // one slot (PARTWISE_FIT_SLOTS=1)
    for (const f of [a1, a2, a3]) expect((await waitFor(f.id, ended)).status).toBe('succeeded');
    const rows = await Fit.findAll({ where: { id: [a1.id, a2.id, a3.id, b1.id] }, order: [['startedAt', 'ASC']] });
    // The worker starts them in that order, not first come first served (B's came last).
    expect(rows.map((r) => r.id)).toEqual(order);
    // Every fit kept exactly one job, each completed.
    for (const r of rows) expect((await jobsOf(r.id)).map((j) => j.state)).toEqual(['completed']);
  });

  it('stops a fit running in the worker when it is cancelled through the route', async () => {
    const fit = await start({ ...LONG, datasetId: big });
    worker = await startFitWorker({ log: () => {} });
    await waitFor(fit.id, (f) => f.status === 'running' && f.progress?.phase === 'fitting');
    expect((await cancelRoute(await makeRequest(`/api/fits/${fit.id}/cancel`, { method: 'POST', userId: w.member.id }), ctx(fit.id))).status).toBe(202);
    const done = await waitFor(fit.id, ended);
    expect(done.status).toBe('cancelled');
    expect(done.error).toMatch(/^Cancelled after/);
  });

  it('takes over a fit whose worker was lost (its job retried by pg-boss) and finishes it', async () => {
    const fit = await start({ ...TINY, datasetId: small });
    await takeAndDie(fit.id, true);
    expect(await jobsOf(fit.id)).toEqual([{ name: FIT_QUEUE, state: 'retry', retry_count: 0 }]);
    worker = await startFitWorker({ log: () => {} });
    const done = await waitFor(fit.id, ended);
    expect(done.status).toBe('succeeded');
    expect((await Fit.findByPk(fit.id))!.runnerId).not.toBe('gone-host:1:dead');
  });

  it('fails with a reason, never stays running, when the retry is lost too', async () => {
    const fit = await start({ ...TINY, datasetId: small });
    await takeAndDie(fit.id, true);
    await takeAndDie(fit.id, false); // the worker that took the retry died as well
    expect((await jobsOf(fit.id)).map((j) => `${j.name}:${j.state}`)).toEqual([`${FIT_QUEUE}:failed`, `${FIT_DEAD_QUEUE}:created`]);
    expect((await poll(fit.id)).status).toBe('running');
    worker = await startFitWorker({ log: () => {} });
    const done = await waitFor(fit.id, ended);
    expect(done).toMatchObject({ status: 'failed', error: WORKER_LOST_REASON });
  });

  it('on stop hands a running fit back at its next candidate, with a new job, and another worker finishes it from there', async () => {
    const fit = await start({ ...LONG, datasetId: small });
    worker = await startFitWorker({ log: () => {} });
    await waitFor(fit.id, (f) => f.status === 'running' && f.progress?.candidate >= 2);
    await worker.stop(30_000);
    worker = null;
    const row = (await Fit.findByPk(fit.id))!;
    expect(row.status).toBe('queued');
    const kept = row.checkpoint as { next: number } | null;
    expect(kept?.next).toBeGreaterThan(0);
    expect((await jobsOf(fit.id)).map((j) => j.state)).toEqual(['completed', 'created']);
    worker = await startFitWorker({ log: () => {} });
    const done = await waitFor(fit.id, ended);
    expect(done.status).toBe('succeeded');
    expect((done.result ?? (await Fit.findByPk(fit.id))!.result)).toBeTruthy();
  });
});
