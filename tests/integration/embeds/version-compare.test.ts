/**
 * GET /api/embeds/:id/compare?from&to on a real SQLite file: two versions of one
 * calculator from two different fits of the invented ride logs (lib/demo/cycling.ts),
 * each fit's groups named by their means (lib/demo/model.ts nameClusters) on its own,
 * so matched pairs carrying the same name show the matching found the same groups.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { makeRequest } from '../../helpers/auth';
import { POST as publishRoute } from '@/app/api/embeds/route';
import { POST as publishAgainRoute } from '@/app/api/embeds/[id]/versions/route';
import { GET as compareRoute } from '@/app/api/embeds/[id]/compare/route';
import { deleteDataset } from '@/lib/datasets';
import { parseCsvText } from '@/lib/datasets/parse';
import { demoRidesCsv } from '@/lib/demo/cycling';
import { nameClusters } from '@/lib/demo/model';
import { clusterColor } from '@/lib/fitting/palette';
import { buildModel, parseNumericTable, selectMixture, toModelJson, type Covariance } from '@/lib/mixture';
import { Dataset, Fit, MixtureModel } from '@/models';
import { FEATURES, modelWorkspace } from './fixtures';

const idCtx = (id: number) => ({ params: Promise.resolve({ id: String(id) }) });

let ws: Awaited<ReturnType<typeof modelWorkspace>>;
let dataset: Dataset;
let embedId: number;
const version: Record<'fourFull' | 'fourDiagonal' | 'five', number> = { fourFull: 0, fourDiagonal: 0, five: 0 };

/** One fit of the dataset (stored as a succeeded Fit) and its model, named by its means. */
async function fittedModel(k: number, covariance: Covariance, seed: number, name: string, on: Dataset = dataset) {
  const numeric = parseNumericTable(on.originalCsv.toString('utf8'), [...FEATURES]);
  const selection = selectMixture(numeric.rows, numeric.n, numeric.d, { components: [k], covariances: [covariance], seed, restarts: 3 });
  const engine = buildModel(numeric.rows, numeric.n, numeric.d, selection.best, { features: FEATURES.map((f) => ({ name: f })) });
  const fit = await Fit.create({ workspaceId: ws.workspace.id, datasetId: on.id, createdById: ws.owner.id, status: 'succeeded', params: { features: [...FEATURES], components: [k], covariances: [covariance], seed }, finishedAt: new Date() });
  return MixtureModel.create({
    workspaceId: ws.workspace.id,
    fitId: fit.id,
    datasetId: on.id,
    createdById: ws.owner.id,
    name,
    model: JSON.parse(toModelJson(engine)),
    clusters: nameClusters(engine.means).map((g, i) => ({ ...g, color: clusterColor(i) })),
    fields: [
      { feature: 'avg_speed_kmh', label: 'Average speed', unit: 'km/h', min: 10, max: 45, help: '' },
      { feature: 'weekly_distance_km', label: 'Weekly distance', unit: 'km', min: 0, max: 500, help: '' },
      { feature: 'climb_per_ride_m', label: 'Climbing per ride', unit: 'm', min: 0, max: 3000, help: '' },
    ],
    caution: '',
  });
}

/** Publish `mixtureModelId` as the next version of calculator `id`, not served; its version id. */
async function publishAgain(id: number, mixtureModelId: number): Promise<number> {
  const res = await publishAgainRoute(await makeRequest(`/api/embeds/${id}/versions`, { userId: ws.owner.id, json: { mixtureModelId, activate: false } }), idCtx(id));
  return (await res.json()).version.id;
}

async function compare(query: string, opts: { userId?: number; id?: number } = {}) {
  const id = opts.id ?? embedId;
  const res = await compareRoute(await makeRequest(`/api/embeds/${id}/compare${query}`, { userId: opts.userId ?? ws.member.id, workspaceId: ws.workspace.id }), idCtx(id));
  return { status: res.status, body: await res.json() };
}

beforeAll(async () => {
  ws = await modelWorkspace();
  const csv = demoRidesCsv(11);
  const table = parseCsvText(csv);
  dataset = await Dataset.create({ workspaceId: ws.workspace.id, createdById: ws.owner.id, name: 'Ride logs', originalFilename: 'rides.csv', originalCsv: Buffer.from(csv), columns: table.columns, cells: table.cells, rowCount: table.cells.length });
  const fourFull = await fittedModel(4, 'full', 3, 'Four groups, full');
  const fourDiagonal = await fittedModel(4, 'diagonal', 5, 'Four groups, diagonal');
  const five = await fittedModel(5, 'full', 5, 'Five groups');
  const first = await (await publishRoute(await makeRequest('/api/embeds', { userId: ws.owner.id, json: { mixtureModelId: fourFull.id, title: 'Ride groups' } }), { params: Promise.resolve({}) })).json();
  embedId = first.embed.id;
  version.fourFull = first.version.id;
  version.fourDiagonal = await publishAgain(embedId, fourDiagonal.id);
  version.five = await publishAgain(embedId, five.id);
});

describe('comparing two versions of a calculator', () => {
  it('matches the groups of two fits one to one: the same groups carry the same names', async () => {
    const { status, body } = await compare(`?from=${version.fourFull}&to=${version.fourDiagonal}`);
    expect(status).toBe(200);
    const c = body.comparison;
    expect(c.from).toMatchObject({ id: version.fourFull, number: 1 });
    expect(c.to).toMatchObject({ id: version.fourDiagonal, number: 2 });
    expect(c.pairs).toHaveLength(4);
    expect(c.pairs.map((p: { from: { label: string }; to: { label: string } }) => p.to.label)).toEqual(c.pairs.map((p: { from: { label: string } }) => p.from.label));
    expect(new Set(c.pairs.map((p: { from: { label: string } }) => p.from.label))).toEqual(new Set(['Easy social', 'Steady tourers', 'Hill chasers', 'Fast pack']));
    expect(c.unmatchedFrom).toEqual([]);
    expect(c.unmatchedTo).toEqual([]);
    expect(c.standardisedBy).toEqual({ version: 1, basis: 'scaler' });
    // shifts in the fields' own units, with their labels
    const shifts = c.pairs[0].meanShifts;
    expect(shifts.map((s: { label: string; unit: string }) => `${s.label} (${s.unit})`)).toEqual(['Average speed (km/h)', 'Weekly distance (km)', 'Climbing per ride (m)']);
    for (const s of shifts) expect(s.shift).toBeCloseTo(s.to - s.from, 9);
    for (const p of c.pairs) expect(p.weight.shift).toBeCloseTo(p.weight.to - p.weight.from, 12);
  });

  it('scores the fitted dataset under both: the cross table sums to the row count', async () => {
    const { body } = await compare(`?from=${version.fourFull}&to=${version.fourDiagonal}`);
    expect(body.dataset).toEqual({ id: dataset.id, name: 'Ride logs', rows: dataset.rowCount, dropped: 0 });
    expect(body.datasetReason).toBeNull();
    const r = body.comparison.rows;
    expect(r.count).toBe(dataset.rowCount);
    expect(r.counts).toHaveLength(4);
    expect(r.counts.flat().reduce((a: number, b: number) => a + b, 0)).toBe(dataset.rowCount);
    // changed = rows off the matched partner of their old group, read back from the table
    const partner = new Map<number, number>(body.comparison.pairs.map((p: { from: { index: number }; to: { index: number } }) => [p.from.index, p.to.index]));
    const offPartner = r.counts.reduce((sum: number, row: number[], i: number) => sum + row.reduce((s, v, j) => s + (partner.get(i) === j ? 0 : v), 0), 0);
    expect(r.changed).toBe(offPartner);
    expect(r.changedShare).toBeCloseTo(r.changed / r.count, 12);
    // two fits of the same four groups agree on nearly every rider
    expect(r.changedShare).toBeLessThan(0.1);
  });

  it('calls out a group the other version does not have', async () => {
    const { body } = await compare(`?from=${version.fourFull}&to=${version.five}`);
    const c = body.comparison;
    expect(c.pairs).toHaveLength(4);
    expect(c.unmatchedFrom).toEqual([]);
    expect(c.unmatchedTo).toHaveLength(1);
    expect(c.rows.counts[0]).toHaveLength(5);
    expect(c.rows.counts.flat().reduce((a: number, b: number) => a + b, 0)).toBe(dataset.rowCount);
    // the other way round the surplus group is on the "from" side
    const back = (await compare(`?from=${version.five}&to=${version.fourFull}`)).body.comparison;
    expect(back.unmatchedFrom).toHaveLength(1);
    expect(back.unmatchedTo).toEqual([]);
    expect(back.standardisedBy).toEqual({ version: 1, basis: 'scaler' });
    expect(back.totalDistance).toBeCloseTo(c.totalDistance, 9);
  });

  it('says why there are no rows once the dataset is deleted, and still matches the groups', async () => {
    const copy = await Dataset.create({ workspaceId: ws.workspace.id, createdById: ws.owner.id, name: 'Copy', originalFilename: 'copy.csv', originalCsv: dataset.originalCsv, columns: dataset.columns, cells: dataset.cells, rowCount: dataset.rowCount });
    const onCopyA = await fittedModel(4, 'full', 9, 'On the copy, full', copy);
    const onCopyB = await fittedModel(4, 'diagonal', 11, 'On the copy, diagonal', copy);
    // a version of the main calculator fitted to the copy, and a second calculator wholly on the copy
    const onMain = await publishAgain(embedId, onCopyA.id);
    const second = await (await publishRoute(await makeRequest('/api/embeds', { userId: ws.owner.id, json: { mixtureModelId: onCopyA.id } }), { params: Promise.resolve({}) })).json();
    const secondB = await publishAgain(second.embed.id, onCopyB.id);
    await deleteDataset(ws.workspace.id, copy.id);

    // rows come from the newer version's dataset, else the older one's
    const fallback = await compare(`?from=${version.fourFull}&to=${onMain}`);
    expect(fallback.status).toBe(200);
    expect(fallback.body.dataset.id).toBe(dataset.id);
    expect(fallback.body.comparison.rows.count).toBe(dataset.rowCount);

    const { status, body } = await compare(`?from=${second.version.id}&to=${secondB}`, { id: second.embed.id });
    expect(status).toBe(200);
    expect(body.dataset).toBeNull();
    expect(body.datasetReason).toBe('No rows to compare on: version 2: the dataset it was fitted to is no longer in the workspace; version 1: the dataset it was fitted to is no longer in the workspace.');
    expect(body.comparison.rows).toBeNull();
    expect(body.comparison.pairs).toHaveLength(4);
  });

  it('is not found from another workspace, for the calculator and for its versions', async () => {
    const other = await modelWorkspace();
    const asOutsider = await compare(`?from=${version.fourFull}&to=${version.fourDiagonal}`, { userId: other.owner.id });
    expect(asOutsider.status).toBe(404);
    // the other workspace's own calculator with our version ids: no such versions there
    const theirs = await (await publishRoute(await makeRequest('/api/embeds', { userId: other.owner.id, json: { mixtureModelId: other.model.id } }), { params: Promise.resolve({}) })).json();
    const res = await compareRoute(await makeRequest(`/api/embeds/${theirs.embed.id}/compare?from=${theirs.version.id}&to=${version.fourDiagonal}`, { userId: other.owner.id }), idCtx(theirs.embed.id));
    expect(res.status).toBe(404);
    expect((await res.json()).error.issues).toEqual([{ field: 'to', message: 'no such version of this calculator' }]);
  });

  it('refuses a bad query with 422, naming the fields', async () => {
    const hex = await compare(`?from=0x${version.fourFull.toString(16)}&to=${version.fourDiagonal}`);
    expect(hex.status).toBe(422);
    expect(hex.body.error.issues.map((i: { field: string }) => i.field)).toEqual(['from']);
    const missing = await compare(`?from=${version.fourFull}`);
    expect(missing.status).toBe(422);
    expect(missing.body.error.issues.map((i: { field: string }) => i.field)).toEqual(['to']);
    const both = await compare('?from=1e1&to=');
    expect(both.status).toBe(422);
    expect(both.body.error.issues.map((i: { field: string }) => i.field)).toEqual(['from', 'to']);
    const same = await compare(`?from=${version.fourFull}&to=${version.fourFull}`);
    expect(same.status).toBe(422);
    expect(same.body.error.issues[0].field).toBe('to');
  });
});
