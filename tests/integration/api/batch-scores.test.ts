import Papa from 'papaparse';
import { beforeAll, describe, expect, it } from 'vitest';
import { POST as scoreBatch } from '@/app/api/v1/calculators/[id]/scores/route';
import { publishNew } from '@/lib/embeds/service';
import { parseModelJson, scoreRow } from '@/lib/mixture';
import { invalidateAllowance, invalidateEmbed } from '@/lib/scoring';
import { flushUsage, monthPeriod } from '@/lib/usage';
import { Embed, ModelVersion, Subscription, UsageCounter } from '@/models';
import { modelWorkspace } from '../embeds/fixtures';
import { ctx, keyFor, keyRequest } from './helpers';

/** Batch scoring through POST /api/v1/calculators/{id}/scores with a score key, on real SQLite. */
let ws: Awaited<ReturnType<typeof modelWorkspace>>;
let embedId = 0;
let key = '';
let readKey = '';
let engine: ReturnType<typeof parseModelJson>;
const FEATURES = ['avg_speed_kmh', 'weekly_distance_km', 'climb_per_ride_m'];

function rows(n: number, seed = 1): number[][] {
  // Deterministic rows spread over the calculator's ranges.
  let s = seed;
  const next = () => ((s = (s * 16807) % 2147483647) / 2147483647);
  return Array.from({ length: n }, () => [12 + next() * 30, next() * 400, next() * 2000]);
}

async function call(opts: { json?: unknown; body?: string; contentType?: string; query?: string; accept?: string; as?: string; id?: number }) {
  const id = opts.id ?? embedId;
  const headers: Record<string, string> = {};
  if (opts.contentType) headers['content-type'] = opts.contentType;
  if (opts.accept) headers.accept = opts.accept;
  const res = await scoreBatch(keyRequest(`/api/v1/calculators/${id}/scores${opts.query ?? ''}`, opts.as ?? key, { method: 'POST', json: opts.json, body: opts.body, headers }), ctx({ id: String(id) }));
  return { status: res.status, headers: res.headers, text: await res.text() };
}

async function metered(): Promise<number> {
  await flushUsage();
  return (await UsageCounter.sum('count', { where: { embedId, granularity: 'month', period: monthPeriod() } })) ?? 0;
}

beforeAll(async () => {
  ws = await modelWorkspace({ plan: 'bench' });
  const { embed, version } = await publishNew({ user: ws.owner, workspace: ws.workspace }, { mixtureModelId: ws.model.id, title: 'Batch' });
  embedId = embed.id;
  engine = parseModelJson(version.payload.model as Record<string, unknown>);
  key = (await keyFor(ws.owner, ws.workspace.id, ['score'], { name: 'Back office' })).secret;
  readKey = (await keyFor(ws.owner, ws.workspace.id, ['read'])).secret;
});

describe('batch scoring', () => {
  it('scores JSON rows like the engine scores each row, and meters one answer per row', async () => {
    const before = await metered();
    const sent = rows(250);
    const res = await call({ json: { rows: sent } });
    expect(res.status, res.text).toBe(200);
    expect(res.headers.get('content-type')).toContain('application/json');
    expect(res.headers.get('x-partwise-rows')).toBe('250');
    const body = JSON.parse(res.text);
    expect(body.count).toBe(250);
    expect(body.groups.map((g: { label: string }) => g.label)).toEqual(['Easy social', 'Steady club', 'Hill lovers']);
    for (const i of [0, 17, 249]) {
      const one = scoreRow(engine, sent[i]);
      expect(body.rows[i].row).toBe(i + 1);
      expect(body.rows[i].best).toBe(one.best);
      one.probabilities.forEach((p, c) => expect(Math.abs(body.rows[i].probabilities[c] - p)).toBeLessThanOrEqual(5e-7));
      expect(body.rows[i].typicality).toBeCloseTo(one.typicality, 3);
    }
    expect((await metered()) - before).toBe(250);
  });

  it('takes a CSV body with extra columns and answers CSV when asked', async () => {
    const sent = rows(40, 7);
    const csv = ['id,' + FEATURES.join(','), ...sent.map((r, i) => `r${i},${r.join(',')}`)].join('\n');
    const res = await call({ body: csv, contentType: 'text/csv', accept: 'text/csv' });
    expect(res.status, res.text).toBe(200);
    expect(res.headers.get('content-type')).toContain('text/csv');
    const table = Papa.parse<Record<string, string>>(res.text, { header: true, skipEmptyLines: true });
    expect(table.meta.fields).toEqual(['row', 'p Easy social', 'p Steady club', 'p Hill lovers', 'best', 'log_density', 'typicality', 'unusual']);
    expect(table.data).toHaveLength(40);
    const labels = ['Easy social', 'Steady club', 'Hill lovers'];
    expect(table.data[5].best).toBe(labels[scoreRow(engine, sent[5]).best]);
    const asJson = await call({ body: csv, contentType: 'text/csv', query: '?format=json', accept: 'text/csv' });
    expect(JSON.parse(asJson.text).count).toBe(40);
  });

  it('refuses bad rows naming row and column, and meters nothing', async () => {
    const before = await metered();
    const bad = await call({ body: `${FEATURES.join(',')}\n24,130,420\n24,,420\n24,lots,420\n`, contentType: 'text/csv' });
    expect(bad.status).toBe(422);
    const issues = JSON.parse(bad.text).error.issues.map((i: { field: string }) => i.field);
    expect(issues).toEqual(['row 3, column weekly_distance_km', 'row 4, column weekly_distance_km']);
    const missing = await call({ body: 'avg_speed_kmh,climb_per_ride_m\n24,420\n', contentType: 'text/csv' });
    expect(missing.status).toBe(422);
    expect(JSON.parse(missing.text).error.issues[0].field).toBe('column weekly_distance_km');
    expect((await call({ json: { rows: [[1, 2]] } })).status).toBe(422);
    expect((await call({ body: 'hello', contentType: 'text/plain' })).status).toBe(415);
    expect((await call({ json: { rows: [[24, 130, 420]] }, query: '?format=xml' })).status).toBe(422);
    expect(await metered()).toBe(before);
  });

  it('refuses more rows than the plan takes per request, and a batch larger than the answers left, whole', async () => {
    const before = await metered();
    const over = await call({ json: { rows: rows(10_001) } });
    expect(over.status).toBe(402);
    expect(JSON.parse(over.text).error.message).toContain('at most 10,000 rows per request');
    expect(await metered()).toBe(before);

    // Leave 100 answers (Bench: 20,000 a month, paused past 5 % more).
    await UsageCounter.update({ count: 21_000 - 100 }, { where: { embedId, granularity: 'month', period: monthPeriod() } });
    invalidateAllowance(ws.workspace.id);
    const tooBig = await call({ json: { rows: rows(101) } });
    expect(tooBig.status).toBe(402);
    expect(JSON.parse(tooBig.text).error.message).toMatch(/101 rows, and 100 answers are left/);
    expect(await metered()).toBe(20_900);
    const fits = await call({ json: { rows: rows(100) } });
    expect(fits.status).toBe(200);
    expect(await metered()).toBe(21_000);
    await UsageCounter.update({ count: 0 }, { where: { embedId, granularity: 'month', period: monthPeriod() } });
    invalidateAllowance(ws.workspace.id);
  });

  it('needs the score scope, and refuses a calculator that serves nothing', async () => {
    expect((await call({ json: { rows: rows(1) }, as: readKey })).status).toBe(403);
    expect((await call({ json: { rows: rows(1) }, id: embedId + 999 })).status).toBe(404);
    await Embed.update({ status: 'disabled', disabledReason: 'test' }, { where: { id: embedId } });
    invalidateEmbed(embedId);
    try {
      expect((await call({ json: { rows: rows(1) } })).status).toBe(409);
    } finally {
      await Embed.update({ status: 'active', disabledReason: null }, { where: { id: embedId } });
    }
    expect(await ModelVersion.count({ where: { embedId } })).toBe(1);
    expect((await Subscription.findOne({ where: { workspaceId: ws.workspace.id } }))!.plan).toBe('bench');
  });
});
