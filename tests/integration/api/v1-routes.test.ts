import { beforeAll, describe, expect, it } from 'vitest';
import { GET as listDatasets, POST as uploadDataset } from '@/app/api/v1/datasets/route';
import { GET as getDataset } from '@/app/api/v1/datasets/[id]/route';
import { POST as startFit } from '@/app/api/v1/fits/route';
import { GET as getFit } from '@/app/api/v1/fits/[id]/route';
import { GET as getRanking } from '@/app/api/v1/fits/[id]/ranking/route';
import { POST as createModel } from '@/app/api/v1/models/route';
import { GET as getModel, PATCH as patchModel } from '@/app/api/v1/models/[id]/route';
import { GET as listCalculators, POST as publishCalculator } from '@/app/api/v1/calculators/route';
import { GET as getCalculator } from '@/app/api/v1/calculators/[id]/route';
import { POST as publishVersion } from '@/app/api/v1/calculators/[id]/versions/route';
import { PUT as serveVersion } from '@/app/api/v1/calculators/[id]/served-version/route';
import { GET as getUsage } from '@/app/api/v1/usage/route';
import { demoRidesCsv } from '@/lib/demo/cycling';
import { PLANS } from '@/lib/plans';
import { recordAnswer } from '@/lib/usage';
import { AuditEvent, Dataset, Embed, Fit, MixtureModel, ModelVersion } from '@/models';
import { studioWorld } from '../studio/helpers';
import { ctx, keyFor, keyRequest } from './helpers';

let w: Awaited<ReturnType<typeof studioWorld>>;
let key: string;
let foreignKey: string;
const FEATURES = ['avg_speed_kmh', 'weekly_distance_km', 'climb_per_ride_m'];
const ids = { dataset: 0, fit: 0, model: 0, calculator: 0, v1: 0, v2: 0 };

beforeAll(async () => {
  process.env.PARTWISE_FIT_PROGRESS_MS = '20';
  w = await studioWorld();
  key = (await keyFor(w.owner, w.workspace.id, ['read', 'fit', 'publish'], { name: 'Pipeline' })).secret;
  foreignKey = (await keyFor(w.outsider, w.other.id, ['read', 'fit', 'publish'])).secret;
});

// eslint-disable-next-line @typescript-eslint/no-explicit-any
type Handler = (r: Request, c: any) => Promise<Response> | Response;
async function call(handler: Handler, url: string, opts: { method?: string; json?: unknown; body?: BodyInit; headers?: Record<string, string>; params?: Record<string, string>; as?: string } = {}) {
  const res = await handler(keyRequest(url, opts.as ?? key, opts), ctx(opts.params));
  const text = await res.text();
  return { status: res.status, json: (text ? JSON.parse(text) : {}) as any };
}
/** A refusal of bad input: 422 with an issue on `field`, and `count` unchanged. */
async function refused(result: Promise<{ status: number; json: any }>, field: string, count: () => Promise<number>, before: number) {
  const { status, json } = await result;
  expect(status, JSON.stringify(json)).toBe(422);
  expect(json.error.issues.map((i: { field: string }) => i.field)).toContain(field);
  expect(await count()).toBe(before);
}

describe('the nightly job through /api/v1 with one key', () => {
  it('uploads a CSV body named by ?name= and reads it back', async () => {
    const csv = demoRidesCsv(3);
    const up = await call(uploadDataset, '/api/v1/datasets?name=Rides%20tonight', { body: csv, headers: { 'content-type': 'text/csv' } });
    expect(up.status).toBe(201);
    expect(up.json.dataset).toMatchObject({ name: 'Rides tonight', rowCount: csv.trim().split('\n').length - 1 });
    ids.dataset = up.json.dataset.id;
    expect((await Dataset.findByPk(ids.dataset))!.createdById).toBeNull();
    const audit = await AuditEvent.findOne({ where: { action: 'dataset.upload', targetId: String(ids.dataset) } });
    expect(audit).toMatchObject({ actorUserId: null, actorEmail: expect.stringMatching(/^API key "Pipeline" \(pwk_/) });

    const list = await call(listDatasets, '/api/v1/datasets');
    expect(list.json.datasets.map((d: { id: number }) => d.id)).toEqual([ids.dataset]);
    const one = await call(getDataset, `/api/v1/datasets/${ids.dataset}?preview=2`, { params: { id: String(ids.dataset) } });
    expect(one.status).toBe(200);
    expect(one.json.dataset.preview).toHaveLength(2);
  });

  it('refuses bad uploads and queries, naming the field, writing nothing', async () => {
    const count = () => Dataset.count();
    const before = await count();
    await refused(call(uploadDataset, '/api/v1/datasets?name=a%00b', { body: 'a,b\n1,2\n', headers: { 'content-type': 'text/csv' } }), 'name', count, before);
    await refused(call(uploadDataset, '/api/v1/datasets?title=x', { body: 'a,b\n1,2\n', headers: { 'content-type': 'text/csv' } }), 'title', count, before);
    const wrongType = await call(uploadDataset, '/api/v1/datasets', { body: '{}', headers: { 'content-type': 'application/json' } });
    expect(wrongType.status).toBe(415);
    expect(await count()).toBe(before);
    const preview = await call(getDataset, `/api/v1/datasets/${ids.dataset}?preview=0x2`, { params: { id: String(ids.dataset) } });
    expect(preview.status).toBe(422);
    expect(preview.json.error.issues[0].field).toBe('preview');
    const badId = await call(getDataset, '/api/v1/datasets/1e1', { params: { id: '1e1' } });
    expect(badId.status).toBe(422);
    expect(badId.json.error.issues[0].field).toBe('id');
  });

  it('starts a fit, waits for it with ?wait= and reads the BIC/AIC ranking', async () => {
    const count = () => Fit.count();
    const before = await count();
    await refused(call(startFit, '/api/v1/fits', { json: { datasetId: ids.dataset, features: [] } }), 'features', count, before);
    await refused(call(startFit, '/api/v1/fits', { json: { datasetId: ids.dataset, features: FEATURES, restarts: 0 } }), 'restarts', count, before);
    await refused(call(startFit, '/api/v1/fits', { json: { datasetId: String(ids.dataset), features: FEATURES } }), 'datasetId', count, before);

    const started = await call(startFit, '/api/v1/fits', { json: { datasetId: ids.dataset, features: FEATURES, minComponents: 1, maxComponents: 3, covariances: ['full', 'diagonal'], restarts: 2, seed: 4 } });
    expect(started.status).toBe(202);
    ids.fit = started.json.fit.id;
    expect((await Fit.findByPk(ids.fit))!.createdById).toBeNull();

    const early = await call(getRanking, `/api/v1/fits/${ids.fit}/ranking`, { params: { id: String(ids.fit) } });
    if (early.status !== 200) expect(early.status).toBe(409);

    const tooLong = await call(getFit, `/api/v1/fits/${ids.fit}?wait=61`, { params: { id: String(ids.fit) } });
    expect(tooLong.status).toBe(422);
    expect(tooLong.json.error.issues[0].field).toBe('wait');
    let fit = (await call(getFit, `/api/v1/fits/${ids.fit}?wait=60`, { params: { id: String(ids.fit) } })).json.fit;
    while (fit.status === 'queued' || fit.status === 'running') fit = (await call(getFit, `/api/v1/fits/${ids.fit}?wait=60`, { params: { id: String(ids.fit) } })).json.fit;
    expect(fit.status, fit.error).toBe('succeeded');

    const ranking = await call(getRanking, `/api/v1/fits/${ids.fit}/ranking`, { params: { id: String(ids.fit) } });
    expect(ranking.status).toBe(200);
    const candidates = ranking.json.ranking.candidates;
    expect(candidates).toHaveLength(6);
    expect(candidates[0]).toMatchObject({ index: 0, rank: 1 });
    const bics = candidates.filter((c: { bic: number | null }) => c.bic !== null).map((c: { bic: number }) => c.bic);
    expect([...bics].sort((a, b) => a - b)).toEqual(bics);
    for (const c of candidates) expect(c).not.toHaveProperty('model');
    // The ranking is the stored result's, candidate for candidate.
    const stored = (await Fit.findByPk(ids.fit))!.result as { candidates: { bic: number | null; aic: number | null; components: number }[] };
    expect(candidates.map((c: { bic: number | null; aic: number | null }) => [c.bic, c.aic])).toEqual(stored.candidates.map((c) => [c.bic, c.aic]));
  });

  it('keeps the winner as a model, names its clusters, and refuses bad edits without saving', async () => {
    const count = () => MixtureModel.count();
    const before = await count();
    await refused(call(createModel, '/api/v1/models', { json: { fitId: ids.fit, candidate: -1, name: 'Tonight' } }), 'candidate', count, before);
    await refused(call(createModel, '/api/v1/models', { json: { fitId: ids.fit, candidate: 0 } }), 'name', count, before);
    await refused(call(createModel, '/api/v1/models', { json: { fitId: ids.fit, candidate: 1, name: 'Not the winner' } }), 'selectionNote', count, before);
    const made = await call(createModel, '/api/v1/models', { json: { fitId: ids.fit, candidate: 0, name: 'Tonight' } });
    expect(made.status).toBe(201);
    ids.model = made.json.model.id;
    const k = made.json.model.clusters.length;
    const labels = Array.from({ length: k }, (_, j) => ({ label: `Riders ${String.fromCharCode(65 + j)}`, description: `Group ${j + 1} of tonight`, color: '#2f6f5e' }));

    const badColour = labels.map((c, j) => (j === 0 ? { ...c, color: 'red' } : c));
    const patchBad = await call(patchModel, `/api/v1/models/${ids.model}`, { method: 'PATCH', json: { clusters: badColour }, params: { id: String(ids.model) } });
    expect(patchBad.status).toBe(422);
    expect(patchBad.json.error.issues.map((i: { field: string }) => i.field)).toContain('clusters.0.color');
    expect((await MixtureModel.findByPk(ids.model))!.clusters[0].label).toBe('Cluster 1');

    const patched = await call(patchModel, `/api/v1/models/${ids.model}`, { method: 'PATCH', json: { clusters: labels }, params: { id: String(ids.model) } });
    expect(patched.status).toBe(200);
    const read = await call(getModel, `/api/v1/models/${ids.model}`, { params: { id: String(ids.model) } });
    expect(read.json.model.clusters.map((c: { label: string }) => c.label)).toEqual(labels.map((c) => c.label));
  });

  it('publishes a calculator, a new version, serves the old one again, and reads it all back', async () => {
    const embeds = () => Embed.count();
    const before = await embeds();
    await refused(call(publishCalculator, '/api/v1/calculators', { json: { mixtureModelId: ids.model, title: '' } }), 'title', embeds, before);
    await refused(call(publishCalculator, '/api/v1/calculators', { json: { mixtureModelId: ids.model, title: 'Rides', allowedOrigins: ['not a site'] } }), 'allowedOrigins.0', embeds, before);
    const made = await call(publishCalculator, '/api/v1/calculators', { json: { mixtureModelId: ids.model, title: 'Which riders are you like?' } });
    expect(made.status).toBe(201);
    ids.calculator = made.json.calculator.id;
    ids.v1 = made.json.version.id;
    expect((await ModelVersion.findByPk(ids.v1))!.createdById).toBeNull();
    const publishAudit = await AuditEvent.findOne({ where: { action: 'embed.publish', targetId: String(ids.calculator) } });
    expect(publishAudit).toMatchObject({ actorUserId: null, actorEmail: expect.stringMatching(/^API key "Pipeline"/) });

    const versions = () => ModelVersion.count({ where: { embedId: ids.calculator } });
    await refused(call(publishVersion, `/api/v1/calculators/${ids.calculator}/versions`, { json: { activate: 'yes' }, params: { id: String(ids.calculator) } }), 'activate', versions, 1);
    const again = await call(publishVersion, `/api/v1/calculators/${ids.calculator}/versions`, { json: {}, params: { id: String(ids.calculator) } });
    expect(again.status).toBe(201);
    ids.v2 = again.json.version.id;
    expect(again.json.version.number).toBe(2);
    expect(again.json.calculator.activeVersionId).toBe(ids.v2);

    const served = () => Embed.findByPk(ids.calculator).then((e) => e!.activeVersionId ?? 0);
    await refused(call(serveVersion, `/api/v1/calculators/${ids.calculator}/served-version`, { method: 'PUT', json: { versionId: String(ids.v1) }, params: { id: String(ids.calculator) } }), 'versionId', served, ids.v2);
    const back = await call(serveVersion, `/api/v1/calculators/${ids.calculator}/served-version`, { method: 'PUT', json: { versionId: ids.v1 }, params: { id: String(ids.calculator) } });
    expect(back.status).toBe(200);
    expect(back.json.calculator.activeVersionId).toBe(ids.v1);

    const one = await call(getCalculator, `/api/v1/calculators/${ids.calculator}`, { params: { id: String(ids.calculator) } });
    expect(one.json.versions.map((v: { number: number }) => v.number)).toEqual([2, 1]);
    expect(one.json.calculator.activeVersionId).toBe(ids.v1);
    const list = await call(listCalculators, '/api/v1/calculators');
    expect(list.json.calculators.map((c: { id: number }) => c.id)).toEqual([ids.calculator]);
  });

  it("reads this month's answers per calculator and the plan's allowance", async () => {
    recordAnswer({ id: ids.calculator, workspaceId: w.workspace.id });
    recordAnswer({ id: ids.calculator, workspaceId: w.workspace.id });
    const { status, json } = await call(getUsage, '/api/v1/usage');
    expect(status).toBe(200);
    expect(json.usage.plan.id).toBe('lab');
    expect(json.usage.answers).toMatchObject({ used: 2, allowance: PLANS.lab.limits.answersPerMonth });
    expect(json.usage.calculators).toEqual([expect.objectContaining({ calculatorId: ids.calculator, answers: 2 })]);
    expect(json.usage.period).toMatch(/^\d{4}-\d{2}$/);
  });
});

describe('a key of another workspace', () => {
  it("gets 404 on every one of this workspace's ids and changes nothing", async () => {
    const as = foreignKey;
    const p = (id: number) => ({ id: String(id) });
    expect((await call(getDataset, `/api/v1/datasets/${ids.dataset}`, { params: p(ids.dataset), as })).status).toBe(404);
    expect((await call(getFit, `/api/v1/fits/${ids.fit}`, { params: p(ids.fit), as })).status).toBe(404);
    expect((await call(getRanking, `/api/v1/fits/${ids.fit}/ranking`, { params: p(ids.fit), as })).status).toBe(404);
    expect((await call(startFit, '/api/v1/fits', { json: { datasetId: ids.dataset, features: FEATURES }, as })).status).toBe(404);
    expect((await call(createModel, '/api/v1/models', { json: { fitId: ids.fit, candidate: 0, name: 'x' }, as })).status).toBe(404);
    expect((await call(getModel, `/api/v1/models/${ids.model}`, { params: p(ids.model), as })).status).toBe(404);
    expect((await call(patchModel, `/api/v1/models/${ids.model}`, { method: 'PATCH', json: { name: 'taken' }, params: p(ids.model), as })).status).toBe(404);
    expect((await call(publishCalculator, '/api/v1/calculators', { json: { mixtureModelId: ids.model, title: 'x' }, as })).status).toBe(404);
    expect((await call(getCalculator, `/api/v1/calculators/${ids.calculator}`, { params: p(ids.calculator), as })).status).toBe(404);
    expect((await call(publishVersion, `/api/v1/calculators/${ids.calculator}/versions`, { json: {}, params: p(ids.calculator), as })).status).toBe(404);
    expect((await call(serveVersion, `/api/v1/calculators/${ids.calculator}/served-version`, { method: 'PUT', json: { versionId: ids.v2 }, params: p(ids.calculator), as })).status).toBe(404);
    expect((await call(listDatasets, '/api/v1/datasets', { as })).json.datasets).toEqual([]);
    expect((await MixtureModel.findByPk(ids.model))!.name).toBe('Tonight');
    expect((await Embed.findByPk(ids.calculator))!.activeVersionId).toBe(ids.v1);
    expect(await ModelVersion.count({ where: { embedId: ids.calculator } })).toBe(2);
  });
});
