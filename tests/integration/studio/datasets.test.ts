import fs from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import { Dataset, Subscription } from '@/models';
import { GET as listRoute, POST as uploadRoute } from '@/app/api/datasets/route';
import { DELETE as deleteRoute, GET as getRoute, PATCH as patchRoute } from '@/app/api/datasets/[id]/route';
import { featureMatrix } from '@/lib/datasets';
import { makeRequest } from '../../helpers/auth';
import { csvForm, studioWorld } from './helpers';

let w: Awaited<ReturnType<typeof studioWorld>>;
beforeAll(async () => {
  w = await studioWorld();
});

const ctx = (id: number | string) => ({ params: Promise.resolve({ id: String(id) }) });

async function upload(body: BodyInit, opts: { userId?: number; headers?: Record<string, string>; url?: string } = {}) {
  const req = await makeRequest(opts.url ?? '/api/datasets', { method: 'POST', userId: opts.userId ?? w.member.id, body, headers: opts.headers });
  const res = await uploadRoute(req, { params: Promise.resolve({}) });
  return { status: res.status, json: (await res.json()) as any };
}

const rides = fs.readFileSync('public/samples/riverside-rides.csv', 'utf8');
const rowsOf = (n: number, header = 'a,b,c') => [header, ...Array.from({ length: n }, (_, i) => `${i},${i * 2 + 1},${(i * 7) % 5}`)].join('\n');

describe('dataset upload', () => {
  it('stores a good CSV: numeric columns detected, stats, bytes kept, default settings', async () => {
    const { status, json } = await upload(csvForm(rides, 'riverside-rides.csv'));
    expect(status).toBe(201);
    const d = json.dataset;
    expect(d.name).toBe('riverside rides');
    expect(d.rowCount).toBe(410);
    const byName = Object.fromEntries(d.columns.map((c: any) => [c.name, c]));
    expect(byName.rider.kind).toBe('text');
    expect(byName.home_side.kind).toBe('text');
    const speed = byName.avg_speed_kmh;
    expect(speed.kind).toBe('numeric');
    expect(speed.count).toBe(410);
    expect(speed.missing).toBe(0);
    const values = rides.trim().split('\n').slice(1).map((l) => Number(l.split(',')[1]));
    const mean = values.reduce((a, b) => a + b, 0) / values.length;
    expect(speed.min).toBe(Math.min(...values));
    expect(speed.max).toBe(Math.max(...values));
    expect(speed.mean).toBeCloseTo(mean, 10);
    expect(speed.std).toBeCloseTo(Math.sqrt(values.reduce((a, b) => a + (b - mean) ** 2, 0) / (values.length - 1)), 10);
    expect(speed.unit).toBe('km/h');
    expect(speed.displayName).toBe('Avg speed');
    expect(speed.inputMin).toBeLessThan(speed.min);
    expect(speed.inputMax).toBeGreaterThan(speed.max);
    const stored = await Dataset.findByPk(d.id);
    expect(Buffer.from(stored!.originalCsv).toString('utf8')).toBe(rides);
    expect(stored!.cells[0]).toEqual(rides.split('\n')[1].split(',').map((c, j) => (j === 0 || j === 4 ? c : Number(c))));
  });

  it('accepts a raw text/csv body and semicolons; counts missing and non-numeric cells, and a fit drops those rows', async () => {
    const lines = ['x;y;label', ...Array.from({ length: 20 }, (_, i) => `${i};${i % 7 === 0 ? '' : i * 1.5};g${i % 2}`), '21;oops;g1', '22;NA;g0'];
    const { status, json } = await upload(lines.join('\n'), { headers: { 'content-type': 'text/csv' }, url: '/api/datasets?name=Semicolons' });
    expect(status).toBe(201);
    expect(json.dataset.name).toBe('Semicolons');
    const y = json.dataset.columns[1];
    expect(y).toMatchObject({ name: 'y', kind: 'numeric', count: 17, missing: 5, invalid: 1 });
    expect(y.invalidExamples[0]).toContain('row 22');
    const stored = (await Dataset.findByPk(json.dataset.id))!;
    const m = featureMatrix(stored, ['x', 'y']);
    expect(m.n).toBe(17);
    expect(m.dropped).toBe(5);
  });

  it('reads decimal commas in a semicolon-separated export', async () => {
    const lines = ['speed;distance', ...Array.from({ length: 12 }, (_, i) => `${20 + i},5;${100 + i}`)];
    const { status, json } = await upload(csvForm(lines.join('\r\n'), 'export.csv'));
    expect(status).toBe(201);
    expect(json.dataset.columns[0]).toMatchObject({ kind: 'numeric', min: 20.5, max: 31.5, missing: 0 });
    expect(json.dataset.preview[0]).toEqual([20.5, 100]);
  });

  it('accepts a pasted table from the form', async () => {
    const form = new FormData();
    form.set('text', rowsOf(12));
    form.set('name', 'Pasted');
    const { status, json } = await upload(form);
    expect(status).toBe(201);
    expect(json.dataset.originalFilename).toBe('pasted.csv');
    expect(json.dataset.columns.map((c: any) => c.kind)).toEqual(['numeric', 'numeric', 'numeric']);
  });

  const bad: [string, BodyInit | (() => BodyInit), number, RegExp][] = [
    ['a binary file', () => csvForm(new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13]), 'photo.png'), 415, /binary data/],
    ['invalid UTF-8', () => csvForm(new Uint8Array([0x61, 0x2c, 0x62, 0x0a, 0xff, 0xfe, 0x2c, 0x31]), 'latin.csv'), 415, /not UTF-8 text/],
    ['an empty file', () => csvForm('', 'empty.csv'), 400, /empty/],
    ['whitespace only', () => csvForm('\n\n  \n', 'blank.csv'), 400, /empty/],
    ['a header only', () => csvForm('a,b,c\n', 'header.csv'), 400, /header row but no data rows/],
    ['duplicate headers', () => csvForm(rowsOf(12, 'speed,distance,Speed'), 'dup.csv'), 422, /Column 3 is named "Speed", the same as column 1/],
    ['an empty header', () => csvForm(rowsOf(12, 'speed,,climb'), 'nameless.csv'), 422, /Column 2 has no name/],
    ['ragged rows', () => csvForm('a,b,c\n' + Array.from({ length: 12 }, (_, i) => (i === 4 ? '1,2' : '1,2,3')).join('\n'), 'ragged.csv'), 422, /Row 6 has 2 values but the header has 3 columns/],
    ['too few rows', () => csvForm(rowsOf(5), 'small.csv'), 422, /Only 5 rows have a number in every numeric column .* at least 10/],
    ['no numeric column', () => csvForm('name,side\n' + Array.from({ length: 12 }, (_, i) => `r${i},north`).join('\n'), 'text.csv'), 422, /No column holds numbers/],
    ['an unclosed quote', () => csvForm('a,b\n1,2\n3,"4\n5,6\n', 'quote.csv'), 422, /quoted value that never closes/],
    ['no file at all', () => new FormData(), 422, /Choose a CSV file/],
    ['a JSON body', () => JSON.stringify({ a: 1 }), 415, /CSV file/],
  ];

  for (const [what, body, wantStatus, message] of bad) {
    it(`refuses ${what} with ${wantStatus} and saves nothing`, async () => {
      const before = await Dataset.count();
      const b = typeof body === 'function' ? body() : body;
      const res = await upload(b, what === 'a JSON body' ? { headers: { 'content-type': 'application/json' } } : {});
      expect(res.status).toBe(wantStatus);
      expect(res.json.error.message).toMatch(message);
      expect(await Dataset.count()).toBe(before);
    });
  }

  it('enforces the plan: upload size and complete rows (free plan)', async () => {
    await Subscription.update({ plan: 'sketch' }, { where: { workspaceId: w.workspace.id } });
    try {
      const before = await Dataset.count();
      const big = rowsOf(2100);
      const rows = await upload(csvForm(big, 'big.csv'));
      expect(rows.status).toBe(402);
      expect(rows.json.error.message).toMatch(/2,100 rows; the Sketch plan accepts up to 2,000 rows/);
      const huge = 'a,b\n' + '1,2\n'.repeat(600_000);
      const size = await upload(csvForm(huge, 'huge.csv'));
      // Past the plan's size the body is not read further: 413, naming the plan and its limit.
      expect(size.status).toBe(413);
      expect(size.json.error.message).toMatch(/Sketch plan accepts uploads up to 2 MB/);
      expect(await Dataset.count()).toBe(before);
    } finally {
      await Subscription.update({ plan: 'lab' }, { where: { workspaceId: w.workspace.id } });
    }
  });
});

describe('dataset settings, listing, deletion, roles', () => {
  it('lists, reads, updates feature settings with validation, and deletes', async () => {
    const { json } = await upload(csvForm(rides, 'rides.csv', 'For settings'));
    const id = json.dataset.id;
    const list = await (await listRoute(await makeRequest('/api/datasets', { userId: w.owner.id }), { params: Promise.resolve({}) })).json();
    expect(list.datasets.some((d: any) => d.id === id && d.rowCount === 410)).toBe(true);

    const patch = (body: unknown, userId = w.member.id) => makeRequest(`/api/datasets/${id}`, { method: 'PATCH', userId, json: body }).then((r) => patchRoute(r, ctx(id)));
    const good = await patch({ name: 'Autumn rides', features: [{ name: 'climb_per_ride_m', displayName: 'Climbing per ride', unit: 'm', inputMin: 0, inputMax: 2000 }] });
    expect(good.status).toBe(200);
    const body = await good.json();
    expect(body.dataset.name).toBe('Autumn rides');
    expect(body.dataset.columns.find((c: any) => c.name === 'climb_per_ride_m')).toMatchObject({ displayName: 'Climbing per ride', inputMin: 0, inputMax: 2000, count: 410 });

    const inverted = await patch({ features: [{ name: 'climb_per_ride_m', displayName: 'Climb', unit: 'm', inputMin: 10, inputMax: 5 }] });
    expect(inverted.status).toBe(422);
    expect((await inverted.json()).error.issues[0].field).toBe('features.0.inputMax');
    const textColumn = await patch({ features: [{ name: 'home_side', displayName: 'Side', unit: '', inputMin: 0, inputMax: 1 }] });
    expect(textColumn.status).toBe(422);
    expect((await textColumn.json()).error.message).toMatch(/"home_side" holds text/);

    const outsider = await getRoute(await makeRequest(`/api/datasets/${id}`, { userId: w.outsider.id }), ctx(id));
    expect(outsider.status).toBe(404);
    const staff = await getRoute(await makeRequest(`/api/datasets/${id}`, { userId: w.staff.id }), ctx(id));
    expect(staff.status).toBe(403);

    const del = await deleteRoute(await makeRequest(`/api/datasets/${id}`, { method: 'DELETE', userId: w.owner.id }), ctx(id));
    expect(del.status).toBe(204);
    expect(await Dataset.findByPk(id)).toBeNull();
    const again = await getRoute(await makeRequest(`/api/datasets/${id}`, { userId: w.member.id }), ctx(id));
    expect(again.status).toBe(404);
  });
});
