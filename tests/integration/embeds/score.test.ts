import { beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { makeRequest } from '../../helpers/auth';
import { POST as publishRoute } from '@/app/api/embeds/route';
import { OPTIONS as preflightRoute, POST as scoreRoute } from '@/app/api/score/[token]/route';
import { parseModelJson, scoreRow } from '@/lib/mixture';
import { rateLimitTesting } from '@/lib/rate-limit';
import { clearScoringCaches, invalidateAllowance, invalidateEmbed, rereadScoringSettings } from '@/lib/scoring';
import { embedMonthlyAnswers, flushUsage, monthPeriod } from '@/lib/usage';
import { Embed, ModelVersion, UsageCounter, Workspace } from '@/models';
import { modelWorkspace } from './fixtures';

const tokenCtx = (token: string) => ({ params: Promise.resolve({ token }) });
const good = { avg_speed_kmh: 24.5, weekly_distance_km: 130, climb_per_ride_m: 420 };

let ws: Awaited<ReturnType<typeof modelWorkspace>>;
let token: string;
let embedId: number;

async function post(json: unknown, opts: { token?: string; headers?: Record<string, string>; body?: string } = {}) {
  const t = opts.token ?? token;
  const request = opts.body !== undefined
    ? await makeRequest(`/api/score/${t}`, { method: 'POST', body: opts.body, headers: { 'content-type': 'application/json', ...opts.headers } })
    : await makeRequest(`/api/score/${t}`, { json, headers: opts.headers });
  return scoreRoute(request, tokenCtx(t));
}

beforeAll(async () => {
  ws = await modelWorkspace();
  const res = await publishRoute(await makeRequest('/api/embeds', { userId: ws.owner.id, json: { mixtureModelId: ws.model.id, allowedOrigins: ['https://club.example'] } }), { params: Promise.resolve({}) });
  const body = await res.json();
  token = body.embed.token;
  embedId = body.embed.id;
});

beforeEach(() => {
  rateLimitTesting.clear();
});

describe('scoring a visitor\'s values', () => {
  it('answers the engine\'s probabilities, log density and typicality, with labels, and counts the answer', async () => {
    const before = await embedMonthlyAnswers(embedId);
    const res = await post({ values: good });
    expect(res.status).toBe(200);
    expect(res.headers.get('cache-control')).toBe('no-store');
    const answer = await res.json();
    const expected = scoreRow(parseModelJson(ws.model.model), [good.avg_speed_kmh, good.weekly_distance_km, good.climb_per_ride_m]);
    expect(answer.probabilities.map((p: { probability: number }) => p.probability)).toEqual(expected.probabilities);
    expect(answer.logDensity).toBe(expected.logDensity);
    expect(answer.typicality).toBe(expected.typicality);
    expect(answer.best.index).toBe(expected.best);
    expect(answer.best.label).toBe(ws.model.clusters[expected.best].label);
    expect(answer.best.description).toBe(ws.model.clusters[expected.best].description);
    expect(answer.probabilities[0]).toMatchObject({ label: 'Easy social', color: '#3a8a74' });
    expect(answer.threshold).toBe(1);
    expect(answer.unusual).toBe(false);
    expect(await embedMonthlyAnswers(embedId)).toBe(before + 1);
    await flushUsage();
    const hour = await UsageCounter.findOne({ where: { embedId, granularity: 'hour' } });
    expect(hour?.count).toBeGreaterThan(0);
  });

  it('flags values unlike the training data against the embed\'s threshold', async () => {
    const odd = { avg_speed_kmh: 44, weekly_distance_km: 5, climb_per_ride_m: 2900 };
    const answer = await (await post({ values: odd })).json();
    expect(answer.typicality).toBeLessThan(1);
    expect(answer.unusual).toBe(true);
    expect(answer.probabilities.reduce((s: number, p: { probability: number }) => s + p.probability, 0)).toBeCloseTo(1, 12);
  });

  it('answers 404 for an unknown or malformed token', async () => {
    expect((await post({ values: good }, { token: 'UnknownTokenUnknownToken1' })).status).toBe(404);
    expect((await post({ values: good }, { token: 'bad token!' })).status).toBe(404);
  });

  it('answers 422 with one message per field: out of range, missing, wrong type, extra', async () => {
    const res = await post({ values: { avg_speed_kmh: 80, weekly_distance_km: '130', surprise: 1 } });
    expect(res.status).toBe(422);
    const issues: { field: string; message: string }[] = (await res.json()).error.issues;
    const byField = Object.fromEntries(issues.map((i) => [i.field, i.message]));
    expect(byField['values.avg_speed_kmh']).toBe('Average speed must be between 10 and 45 km/h.');
    expect(byField['values.weekly_distance_km']).toBe('Weekly distance must be a number.');
    expect(byField['values.climb_per_ride_m']).toBe('Climbing per ride is needed for this calculator.');
    expect(byField['values.surprise']).toMatch(/not a field/);

    expect((await post({ values: { ...good, avg_speed_kmh: -3 } })).status).toBe(422);
    expect((await post({ values: { ...good, avg_speed_kmh: null } })).status).toBe(422);
    expect((await post({ values: [1, 2, 3] })).status).toBe(422);
    expect((await post({ numbers: good })).status).toBe(422);
    // JSON cannot say Infinity, but 1e999 parses to it.
    const inf = await post(null, { body: '{"values":{"avg_speed_kmh":1e999,"weekly_distance_km":130,"climb_per_ride_m":420}}' });
    expect(inf.status).toBe(422);
    expect((await inf.json()).error.issues[0].field).toBe('values.avg_speed_kmh');
  });

  it('answers 413 for an oversized body, 415 for a non-JSON body, 400 for broken JSON', async () => {
    const big = JSON.stringify({ values: good, padding: 'x'.repeat(10_000) });
    expect((await post(null, { body: big })).status).toBe(413);
    const form = await scoreRoute(await makeRequest(`/api/score/${token}`, { method: 'POST', body: 'avg_speed_kmh=24', headers: { 'content-type': 'application/x-www-form-urlencoded' } }), tokenCtx(token));
    expect(form.status).toBe(415);
    expect((await post(null, { body: '{"values":' })).status).toBe(400);
  });

  it('checks Origin and Referer of browser calls: own origin and allowed hosts answer, others 403', async () => {
    expect((await post({ values: good }, { headers: { origin: 'http://localhost:3000' } })).status).toBe(200);
    const allowed = await post({ values: good }, { headers: { origin: 'https://club.example' } });
    expect(allowed.status).toBe(200);
    expect(allowed.headers.get('access-control-allow-origin')).toBe('https://club.example');
    const denied = await post({ values: good }, { headers: { origin: 'https://copycat.example' } });
    expect(denied.status).toBe(403);
    expect(denied.headers.get('access-control-allow-origin')).toBeNull();
    expect((await post({ values: good }, { headers: { referer: 'https://copycat.example/page' } })).status).toBe(403);
    expect((await post({ values: good }, { headers: { referer: 'https://club.example/rides' } })).status).toBe(200);
    expect((await post({ values: good }, { headers: { origin: 'null' } })).status).toBe(403);

    const preflight = async (origin: string) => preflightRoute(await makeRequest(`/api/score/${token}`, { method: 'OPTIONS', headers: { origin } }), tokenCtx(token));
    const ok = await preflight('https://club.example');
    expect(ok.status).toBe(204);
    expect(ok.headers.get('access-control-allow-methods')).toBe('POST');
    expect((await preflight('https://copycat.example')).status).toBe(403);
  });

  it('rate-limits per client address and per calculator with 429 and Retry-After', async () => {
    const from = (ip: string) => ({ headers: { 'x-forwarded-for': ip } });
    let last: Response | undefined;
    for (let i = 0; i < 31; i++) last = await post({ values: good }, from('203.0.113.7'));
    expect(last!.status).toBe(429);
    expect(Number(last!.headers.get('retry-after'))).toBeGreaterThanOrEqual(1);
    expect((await last!.json()).error.code).toBe('rate_limited');
    // Another address still gets answers.
    expect((await post({ values: good }, from('203.0.113.8'))).status).toBe(200);

    process.env.PARTWISE_SCORE_TOKEN_BURST = '5';
    try {
      rereadScoringSettings();
      rateLimitTesting.clear();
      const statuses: number[] = [];
      for (let i = 0; i < 7; i++) statuses.push((await post({ values: good }, from(`198.51.100.${i}`))).status);
      expect(statuses).toEqual([200, 200, 200, 200, 200, 429, 429]);
    } finally {
      delete process.env.PARTWISE_SCORE_TOKEN_BURST;
      rereadScoringSettings();
    }
  });

  it('answers 410 at once when staff disable the embed or suspend the workspace (with the invalidation hook)', async () => {
    process.env.PARTWISE_EMBED_CACHE_MS = '600000';
    rereadScoringSettings();
    try {
      expect((await post({ values: good })).status).toBe(200);
      await Embed.update({ status: 'disabled', disabledReason: 'abuse', disabledAt: new Date() }, { where: { id: embedId } });
      invalidateEmbed(token);
      const res = await post({ values: good });
      expect(res.status).toBe(410);
      expect((await res.json()).error.message).toBe('This calculator is not available.');
      await Embed.update({ status: 'active', disabledReason: null, disabledAt: null }, { where: { id: embedId } });
      invalidateEmbed(embedId);
      expect((await post({ values: good })).status).toBe(200);

      await Workspace.update({ suspendedAt: new Date(), suspendedReason: 'unpaid abuse' }, { where: { id: ws.workspace.id } });
      invalidateEmbed(embedId);
      expect((await post({ values: good })).status).toBe(410);
      await Workspace.update({ suspendedAt: null, suspendedReason: null }, { where: { id: ws.workspace.id } });
      invalidateEmbed(embedId);
      expect((await post({ values: good })).status).toBe(200);
    } finally {
      delete process.env.PARTWISE_EMBED_CACHE_MS;
      rereadScoringSettings();
    }
  });

  it('pauses calmly with 503 when the month\'s answers are used up', async () => {
    await flushUsage();
    await UsageCounter.update({ count: 1_000_000 }, { where: { embedId, granularity: 'month', period: monthPeriod() } });
    invalidateAllowance(ws.workspace.id);
    const res = await post({ values: good });
    expect(res.status).toBe(503);
    expect((await res.json()).error).toMatchObject({ code: 'unavailable', message: expect.stringMatching(/short break/) });
    await UsageCounter.update({ count: 1 }, { where: { embedId, granularity: 'month', period: monthPeriod() } });
    invalidateAllowance(ws.workspace.id);
    expect((await post({ values: good })).status).toBe(200);
  });

  it('refuses to serve a version whose stored payload no longer matches its checksum', async () => {
    const embed = (await Embed.findByPk(embedId))!;
    const version = (await ModelVersion.findByPk(embed.activeVersionId!))!;
    const payload = { ...(version.payload as Record<string, unknown>), caution: 'tampered' };
    await ModelVersion.update({ payload }, { where: { id: version.id } });
    clearScoringCaches();
    expect((await post({ values: good })).status).toBe(503);
  });
});
