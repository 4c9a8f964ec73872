import fs from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import { Fit, MixtureModel } from '@/models';
import { POST as uploadRoute } from '@/app/api/datasets/route';
import { POST as createRoute, GET as listRoute } from '@/app/api/models/route';
import { GET as getRoute, PATCH as patchRoute } from '@/app/api/models/[id]/route';
import { GET as downloadRoute } from '@/app/api/models/[id]/download/route';
import { GET as reviewRoute } from '@/app/api/models/[id]/review/route';
import { computeFit } from '@/lib/fitting/compute';
import { featureMatrix, findDataset } from '@/lib/datasets';
import { parseModelJson, scoreRow } from '@/lib/mixture';
import { makeRequest } from '../../helpers/auth';
import { csvForm, studioWorld } from './helpers';

const FEATURES = ['avg_speed_kmh', 'weekly_distance_km', 'climb_per_ride_m'];
let w: Awaited<ReturnType<typeof studioWorld>>;
let fitId: number;
let candidates: { rank: number | null; components: number }[];
const none = { params: Promise.resolve({}) };
const ctx = (id: number) => ({ params: Promise.resolve({ id: String(id) }) });

beforeAll(async () => {
  w = await studioWorld();
  const res = await uploadRoute(await makeRequest('/api/datasets', { method: 'POST', userId: w.member.id, body: csvForm(fs.readFileSync('public/samples/riverside-rides.csv'), 'rides.csv') }), none);
  const datasetId = (await res.json()).dataset.id;
  const dataset = await findDataset(w.workspace.id, datasetId);
  const m = featureMatrix(dataset, FEATURES);
  const outcome = computeFit({ rows: m.rows, n: m.n, d: m.d, features: FEATURES.map((name) => ({ name, unit: null })), components: [2, 3, 4], covariances: ['full'], restarts: 2, seed: 3, standardize: true, maxIter: 200, tol: 1e-4, regCovar: 1e-6 });
  candidates = outcome.candidates;
  const fit = await Fit.create({ workspaceId: w.workspace.id, datasetId, createdById: w.member.id, status: 'succeeded', params: { features: FEATURES }, result: { ...outcome, durationMs: 1, dropped: 0, features: FEATURES.map((name) => ({ name, displayName: name, unit: '' })) } as never });
  fitId = fit.id;
});

async function create(body: unknown, userId = w.member.id) {
  const res = await createRoute(await makeRequest('/api/models', { method: 'POST', userId, json: body }), none);
  return { status: res.status, json: (await res.json()) as any };
}
async function patch(id: number, body: unknown) {
  const res = await patchRoute(await makeRequest(`/api/models/${id}`, { method: 'PATCH', userId: w.owner.id, json: body }), ctx(id));
  return { status: res.status, json: (await res.json()) as any };
}

describe('named models', () => {
  it('keeps the BIC winner without a note, a runner-up only with one', async () => {
    const winner = await create({ fitId, candidate: 0, name: 'Ride groups' });
    expect(winner.status).toBe(201);
    expect(winner.json.model.clusters).toHaveLength(candidates[0].components);
    expect(winner.json.model.fields.map((f: any) => f.label)).toEqual(['Avg speed', 'Weekly distance', 'Climb per ride']);
    expect(winner.json.model.fields[0].unit).toBe('km/h');
    expect(winner.json.model.caution).toMatch(/not a diagnosis/);

    const runnerUp = await create({ fitId, candidate: 1, name: 'Other' });
    expect(runnerUp.status).toBe(422);
    expect(runnerUp.json.error.issues[0].field).toBe('selectionNote');
    const withNote = await create({ fitId, candidate: 1, name: 'Other', selectionNote: 'Matches the club’s three ride groups.' });
    expect(withNote.status).toBe(201);
    expect(withNote.json.model.selectionNote).toBe('Matches the club’s three ride groups.');
    const missing = await create({ fitId, candidate: 9, name: 'Nope' });
    expect(missing.status).toBe(422);
    expect((await create({ fitId, candidate: 0, name: 'X' }, w.outsider.id)).status).toBe(404);
    expect((await create({ fitId, candidate: 0, name: 'X' }, w.staff.id)).status).toBe(403);

    const list = await (await listRoute(await makeRequest('/api/models', { userId: w.member.id }), none)).json();
    expect(list.models.map((m: any) => m.name)).toEqual(expect.arrayContaining(['Ride groups', 'Other']));
  });

  it('saves labels, descriptions, colours, fields and caution; refuses what a visitor could not use', async () => {
    const model = (await MixtureModel.findOne({ where: { name: 'Ride groups' } }))!;
    const k = model.clusters.length;
    const clusters = Array.from({ length: k }, (_, i) => ({ label: `Group ${i + 1}`, description: `Riders of kind ${i + 1}.`, color: '#4462c9' }));
    const fields = model.fields.map((f) => ({ ...f, help: 'Your usual value.' }));
    const ok = await patch(model.id, { clusters, fields, caution: 'Similarity to groups in our club, not advice.' });
    expect(ok.status).toBe(200);
    const read = await (await getRoute(await makeRequest(`/api/models/${model.id}`, { userId: w.member.id }), ctx(model.id))).json();
    expect(read.model.clusters).toEqual(clusters);
    expect(read.model.fields[0].help).toBe('Your usual value.');
    expect(read.model.caution).toBe('Similarity to groups in our club, not advice.');

    expect((await patch(model.id, { clusters: clusters.slice(1) })).json.error.message).toMatch(new RegExp(`has ${k} clusters`));
    const dup = await patch(model.id, { clusters: clusters.map((c) => ({ ...c, label: 'Same' })) });
    expect(dup.status).toBe(422);
    expect(dup.json.error.message).toMatch(/both labelled "Same"/);
    const colour = await patch(model.id, { clusters: clusters.map((c, i) => (i === 0 ? { ...c, color: 'blue' } : c)) });
    expect(colour.status).toBe(422);
    expect(colour.json.error.issues[0].field).toBe('clusters.0.color');
    const range = await patch(model.id, { fields: fields.map((f, i) => (i === 1 ? { ...f, min: 10, max: 1 } : f)) });
    expect(range.status).toBe(422);
    expect(range.json.error.issues[0].field).toBe('fields.1.max');
    const order = await patch(model.id, { fields: [...fields].reverse() });
    expect(order.status).toBe(422);
    expect((await MixtureModel.findByPk(model.id))!.clusters).toEqual(clusters); // refusals changed nothing
  });

  it('downloads the documented model JSON, which scores rows like the engine', async () => {
    const model = (await MixtureModel.findOne({ where: { name: 'Ride groups' } }))!;
    const res = await downloadRoute(await makeRequest(`/api/models/${model.id}/download`, { userId: w.member.id }), ctx(model.id));
    expect(res.status).toBe(200);
    expect(res.headers.get('content-disposition')).toBe('attachment; filename="ride-groups.partwise-model.json"');
    const parsed = parseModelJson(await res.text());
    expect(parsed.format).toBe('partwise.mixture-model');
    expect(parsed.ranking).toHaveLength(3);
    // the analyst's names travel with the numbers, for `npm run score`
    expect(parsed.clusters?.map((c) => c.label)).toEqual(model.clusters.map((c) => c.label));
    const score = scoreRow(parsed, [25, 140, 430]);
    expect(score.probabilities.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 9);

    const review = await (await reviewRoute(await makeRequest(`/api/models/${model.id}/review?x=0&y=2`, { userId: w.member.id }), ctx(model.id))).json();
    expect(review.review.axes).toEqual({ x: 0, y: 2 });
    expect(review.review.rows).toBe(410);
    expect(review.trace.length).toBeGreaterThan(1);
  });
});
