import { beforeAll, describe, expect, it } from 'vitest';
import { makeRequest } from '../../helpers/auth';
import { GET as reportRoute, PUT as switchRoute } from '@/app/api/embeds/[id]/insight/route';
import { GET as exportRoute } from '@/app/api/embeds/[id]/insight/export/route';
import { PUT as alertsRoute } from '@/app/api/embeds/[id]/insight/alerts/route';
import { addDays } from '@/lib/insight/aggregate';
import { recordInsight, utcDay } from '@/lib/insight/counters';
import { populationStability, driftBand } from '@/lib/insight/psi';
import type { InsightReport } from '@/lib/insight/types';
import { loadServedVersion } from '@/lib/scoring';
import { flushUsage } from '@/lib/usage';
import { AuditEvent, InsightBins, InsightCount } from '@/models';
import { answer, insightCalculator, liftScoringLimits, republish } from './helpers';

type Calc = Awaited<ReturnType<typeof insightCalculator>>;
let calc: Calc;
let outsider: Calc;
let v1: number;
let v2: number;
const today = utcDay(new Date());
const at = (daysAgo: number) => new Date(Date.parse(`${addDays(today, -daysAgo)}T12:00:00Z`));
const ctx = (id: number) => ({ params: Promise.resolve({ id: String(id) }) });

async function report(query = '', userId = calc.member.id, id = calc.embed.id) {
  return reportRoute(await makeRequest(`/api/embeds/${id}/insight${query}`, { userId }), ctx(id));
}

// speed 20 km/h is bin 1 + floor((20 - 10) / (35 / 12)) = 4; 40 km/h is bin 11.
const slow = [20, 100, 300];
const fast = [40, 100, 300];

beforeAll(async () => {
  liftScoringLimits();
  calc = await insightCalculator();
  outsider = await insightCalculator();
  const embed = { id: calc.embed.id, insightEnabled: true };
  const first = await loadServedVersion(calc.version.id);
  v1 = first.id;
  for (let i = 0; i < 3; i++) recordInsight(embed, first.insight, slow, 0, false, at(0));
  recordInsight(embed, first.insight, [20, 100, null], 1, true, at(5));
  for (let i = 0; i < 4; i++) recordInsight(embed, first.insight, fast, 2, false, at(20));
  recordInsight(embed, first.insight, slow, 0, false, at(40));
  const { version } = await republish(calc.acting, calc.embed);
  v2 = version.id;
  const second = await loadServedVersion(v2);
  for (let i = 0; i < 2; i++) recordInsight(embed, second.insight, fast, 1, true, at(1));
  await flushUsage();
});

describe('the insight report', () => {
  it('covers the last 30 UTC days by default: every version, every day, group counts, unusual, blanks', async () => {
    const res = await report();
    expect(res.status).toBe(200);
    const r: InsightReport = await res.json();
    expect(r.to).toBe(today);
    expect(r.from).toBe(addDays(today, -29));
    expect(r.versionId).toBeNull();
    expect(r.servedVersionId).toBe(v2);
    expect(r.enabled).toBe(true);
    expect(r.demo).toBe(false);
    expect(r.retentionMonths).toBe(13);
    expect(r.versions.map((v) => v.id)).toEqual([v1, v2]);
    expect(r.versions[0].groups.map((g) => g.label)).toEqual(['Easy social', 'Steady club', 'Hill lovers']);
    expect(r.days).toHaveLength(60); // 30 days × the two versions with answers in the window
    const day = (ago: number, versionId: number) => r.days.find((d) => d.day === addDays(today, -ago) && d.versionId === versionId)!;
    expect(day(0, v1)).toEqual({ day: today, versionId: v1, answers: 3, unusual: 0, withBlanks: 0, byGroup: [3, 0, 0] });
    expect(day(5, v1)).toMatchObject({ answers: 1, unusual: 1, withBlanks: 1, byGroup: [0, 1, 0] });
    expect(day(20, v1)).toMatchObject({ answers: 4, byGroup: [0, 0, 4] });
    expect(day(1, v2)).toMatchObject({ answers: 2, unusual: 2, byGroup: [0, 2, 0] });
    expect(r.days.reduce((s, d) => s + d.answers, 0)).toBe(10); // the answer 40 days ago is outside

    // Fields of the served version (v2), adding up v1 too: both have the very same bins.
    const speed = r.fields.find((f) => f.feature === 'avg_speed_kmh')!;
    expect(speed.edges).toHaveLength(15);
    expect(speed.visitors[4]).toBe(4);
    expect(speed.visitors[11]).toBe(6);
    expect(speed.visitors.reduce((s, c) => s + c, 0)).toBe(10);
    const climb = r.fields.find((f) => f.feature === 'climb_per_ride_m')!;
    expect(climb.blanks).toBe(1);
    const bins = await InsightBins.findByPk(v2);
    expect(speed.training).toEqual(bins!.training[0]);
    expect(r.trainingSource).toBe(bins!.source);

    // Last 7 days: 3 slow + 1 slow (blank climb) + 2 fast; last 30 adds the 4 fast ones.
    const last7 = new Array(14).fill(0);
    last7[4] = 4;
    last7[11] = 2;
    const psi7 = populationStability(speed.training, last7)!;
    expect(speed.last7.psi).toBeCloseTo(psi7, 12);
    expect(speed.last7.band).toBe(driftBand(psi7));
    expect(speed.last7.answers).toBe(6);
    const last30 = [...last7];
    last30[11] += 4;
    expect(speed.last30.psi).toBeCloseTo(populationStability(speed.training, last30)!, 12);
    // Overall = the largest field PSI.
    expect(r.overall.last7.psi).toBe(Math.max(...r.fields.map((f) => f.last7.psi!)));
    expect(r.overall.last7.answers).toBe(6);
    expect(r.overall.last30.answers).toBe(10);
    expect(r.alerts).toEqual({ subscribed: false, driftThreshold: 0.25, unusualShare: 0.2, lastSentAt: null });
  });

  it('reads a longer window and filters by version', async () => {
    const long: InsightReport = await (await report('?days=60')).json();
    expect(long.from).toBe(addDays(today, -59));
    expect(long.days.reduce((s, d) => s + d.answers, 0)).toBe(11);

    const only: InsightReport = await (await report(`?days=30&version=${v1}`)).json();
    expect(only.versionId).toBe(v1);
    expect(new Set(only.days.map((d) => d.versionId))).toEqual(new Set([v1]));
    expect(only.days.reduce((s, d) => s + d.answers, 0)).toBe(8);
    const speed = only.fields.find((f) => f.feature === 'avg_speed_kmh')!;
    expect(speed.visitors[4]).toBe(4);
    expect(speed.visitors[11]).toBe(4);
    expect(speed.last7.answers).toBe(4);
  });

  it('refuses bad queries with the field named, and answers 404 for another workspace and for a version of another calculator', async () => {
    const bad = await report('?days=0');
    expect(bad.status).toBe(422);
    expect(JSON.stringify(await bad.json())).toContain('days');
    expect((await report('?version=0x6')).status).toBe(422);
    expect((await report(`?version=${outsider.version.id}`)).status).toBe(404);
    expect((await report('', outsider.owner.id)).status).toBe(404);
    const csv = await exportRoute(await makeRequest(`/api/embeds/${calc.embed.id}/insight/export`, { userId: outsider.owner.id }), ctx(calc.embed.id));
    expect(csv.status).toBe(404);
  });

  it('exports the daily aggregates as CSV: a header, then one row per day, version and counter', async () => {
    const res = await exportRoute(await makeRequest(`/api/embeds/${calc.embed.id}/insight/export`, { userId: calc.member.id }), ctx(calc.embed.id));
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toContain('text/csv');
    expect(res.headers.get('content-disposition')).toMatch(/^attachment; filename="insight-\d+-ride-groups\.csv"$/);
    const lines = (await res.text()).trimEnd().split('\r\n');
    expect(lines[0]).toBe('day,version_id,version_number,counter,field,bin,bin_from,bin_to,count,demo');
    expect(lines).toHaveLength(1 + (await InsightCount.count({ where: { embedId: calc.embed.id } })));
    expect(lines).toContain(`${today},${v1},1,answers,,,,,3,0`);
    const speedBin = lines.find((l) => l.startsWith(`${today},${v1},1,bin,avg_speed_kmh,4,`))!.split(',');
    expect(Number(speedBin[6])).toBeCloseTo(10 + 3 * (35 / 12), 10);
    expect(Number(speedBin[7])).toBeCloseTo(10 + 4 * (35 / 12), 10);
    expect(speedBin[8]).toBe('3');
  });

  it('switches counting off and on (audited), and the report says so', async () => {
    const put = (enabled: unknown) => makeRequest(`/api/embeds/${calc.embed.id}/insight`, { method: 'PUT', userId: calc.member.id, json: { enabled } }).then((r) => switchRoute(r, ctx(calc.embed.id)));
    expect((await put('no')).status).toBe(422);
    const off = await put(false);
    expect(off.status).toBe(200);
    expect(await off.json()).toEqual({ enabled: false });
    const before = await InsightCount.sum('count', { where: { embedId: calc.embed.id, kind: 'answers' } });
    await answer(calc.embed.token, { avg_speed_kmh: 20, weekly_distance_km: 100, climb_per_ride_m: 300 });
    await flushUsage();
    expect(await InsightCount.sum('count', { where: { embedId: calc.embed.id, kind: 'answers' } })).toBe(before);
    expect(((await (await report()).json()) as InsightReport).enabled).toBe(false);
    const audit = await AuditEvent.findOne({ where: { action: 'embed.insight', targetId: String(calc.embed.id) }, order: [['id', 'DESC']] });
    expect(audit?.detail).toMatchObject({ changes: [{ setting: 'insightEnabled', from: true, to: false }] });
    expect((await put(true)).status).toBe(200);
    await answer(calc.embed.token, { avg_speed_kmh: 20, weekly_distance_km: 100, climb_per_ride_m: 300 });
    await flushUsage();
    expect(await InsightCount.sum('count', { where: { embedId: calc.embed.id, kind: 'answers' } })).toBe(before + 1);
  });

  it('keeps each member\'s weekly mail settings, checked', async () => {
    const put = (json: unknown, userId = calc.member.id) => makeRequest(`/api/embeds/${calc.embed.id}/insight/alerts`, { method: 'PUT', userId, json }).then((r) => alertsRoute(r, ctx(calc.embed.id)));
    const bad = await put({ subscribed: true, driftThreshold: 0.01, unusualShare: 0.1 });
    expect(bad.status).toBe(422);
    expect((await bad.json()).error.issues).toEqual([{ field: 'driftThreshold', message: 'The drift threshold must be at least 0.05.' }]);
    const ok = await put({ subscribed: true, driftThreshold: 0.3, unusualShare: 0.15 });
    expect(ok.status).toBe(200);
    expect((await ok.json()).alerts).toEqual({ subscribed: true, driftThreshold: 0.3, unusualShare: 0.15, lastSentAt: null });
    expect(((await (await report()).json()) as InsightReport).alerts.subscribed).toBe(true);
    // The owner's are their own.
    expect(((await (await report('', calc.owner.id)).json()) as InsightReport).alerts.subscribed).toBe(false);
  });
});
