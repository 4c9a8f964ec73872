import { beforeAll, describe, expect, it } from 'vitest';
import { GET as searchRoute } from '@/app/api/support/calculators/route';
import { GET as detailRoute } from '@/app/api/support/calculators/[id]/route';
import type { CalculatorPage } from '@/lib/support';
import type { CalculatorDetail } from '@/lib/support/detail';
import { hourPeriod } from '@/lib/usage';
import { makeRequest } from '../../helpers/auth';
import { calculator, hoursBefore, report, setUsage, staffUser, workspaceWithOwner } from './fixtures';

let staffId: number;
const ids: Record<string, number> = {};
const noParams = { params: Promise.resolve({}) };

async function search(query: string): Promise<{ status: number; body: CalculatorPage & { error?: { issues: { field: string }[] } } }> {
  const res = await searchRoute(await makeRequest(`/api/support/calculators${query}`, { userId: staffId }), noParams);
  return { status: res.status, body: await res.json() };
}
const titles = (p: CalculatorPage) => p.rows.map((r) => r.title);

beforeAll(async () => {
  staffId = (await staffUser()).id;
  const river = await workspaceWithOwner({ name: 'Riverside Riders', slug: 'riverside-riders', ownerEmail: 'maren@riverside.example', plan: 'lab' });
  const hills = await workspaceWithOwner({ name: 'Hill Climb Society', slug: 'hill-climbers', ownerEmail: 'jo@hills.example', plan: 'bench' });
  const lapsed = await workspaceWithOwner({ name: 'Lapsed Wheelers', slug: 'lapsed', plan: 'lab', subscriptionStatus: 'canceled' });

  const a = await calculator(river.workspace, { title: 'Alpha ride groups', token: 'AlphaToken_0123456789abcd', origins: ['https://riverside.example'] });
  const b = await calculator(river.workspace, { title: 'Beta pace finder', origins: ['https://pace.example', 'https://www.pace.example'] });
  const c = await calculator(hills.workspace, { title: 'Climbing style' });
  const d = await calculator(lapsed.workspace, { title: 'Dormant', status: 'disabled' });
  Object.assign(ids, { a: a.id, b: b.id, c: c.id, d: d.id });
  // Someone framed C on a site it never allowed; the report names that site.
  await report(c, { hostOrigin: 'https://copycat.example' });
  await report(c, { hostOrigin: 'https://copycat.example', status: 'closed' });
  await report(b, {});
  await report(b, {});
  await setUsage(a, { month: 500, hours: hoursBefore(new Date(), [[0, 40]]) });
  await setUsage(b, { month: 20 });
  await setUsage(c, { month: 9000, hours: hoursBefore(new Date(), [[0, 5]]) });
  for (let i = 0; i < 11; i++) await calculator(hills.workspace, { title: `Filler ${String(i).padStart(2, '0')}` });
});

describe('support search', () => {
  it('finds a calculator by its full token, by part of it, and by title', async () => {
    expect(titles((await search('?q=AlphaToken_0123456789abcd')).body)).toEqual(['Alpha ride groups']);
    expect(titles((await search('?q=alphatoken')).body)).toEqual(['Alpha ride groups']);
    // `_` is matched literally, not as a wildcard.
    expect((await search('?q=a_p')).body.total).toBe(0);
  });

  it('finds calculators by an allowed host origin, also when a full page address is pasted', async () => {
    expect(titles((await search('?q=pace.example')).body)).toEqual(['Beta pace finder']);
    expect(titles((await search(`?q=${encodeURIComponent('https://riverside.example/clubs/join?x=1')}`)).body)).toEqual(['Alpha ride groups']);
  });

  it('finds a calculator by the host origin named in an abuse report', async () => {
    const { body } = await search('?q=copycat.example');
    expect(titles(body)).toEqual(['Climbing style']);
    expect(body.rows[0].openReports).toBe(1);
  });

  it('finds by workspace name, slug and owner e-mail', async () => {
    expect(titles((await search('?q=riverside%20riders&sort=title&dir=asc')).body)).toEqual(['Alpha ride groups', 'Beta pace finder']);
    expect((await search('?q=hill-climbers')).body.total).toBe(12);
    const byOwner = await search('?q=JO@HILLS.EXAMPLE&pageSize=50');
    expect(byOwner.body.total).toBe(12);
    expect(byOwner.body.rows.every((r) => r.owners.includes('jo@hills.example'))).toBe(true);
  });

  it('reports status, plan (as in force), answers this month and in the last hour, and open reports', async () => {
    const row = (await search('?q=AlphaToken')).body.rows[0];
    expect(row).toMatchObject({ status: 'active', plan: { id: 'lab', name: 'Lab' }, monthAnswers: 500, openReports: 0, workspace: { name: 'Riverside Riders' } });
    expect(row.lastHourAnswers).toBe(40);
    expect(row.allowedOrigins).toEqual(['https://riverside.example']);
    const dormant = (await search('?q=dormant')).body.rows[0];
    // A cancelled subscription falls back to the free plan.
    expect(dormant).toMatchObject({ status: 'disabled', plan: { id: 'sketch' } });
  });

  it('sorts on the server by any column, both ways', async () => {
    const desc = (await search('?sort=monthAnswers&dir=desc&pageSize=10')).body;
    expect(desc.rows.slice(0, 3).map((r) => r.monthAnswers)).toEqual([9000, 500, 20]);
    const asc = (await search('?sort=title&dir=asc&pageSize=10')).body;
    expect(asc.rows[0].title).toBe('Alpha ride groups');
    expect(titles(asc)).toEqual([...titles(asc)].sort((x, y) => x.localeCompare(y)));
    const byReports = (await search('?sort=openReports&dir=desc&pageSize=10')).body;
    expect(byReports.rows.slice(0, 2).map((r) => [r.title, r.openReports])).toEqual([['Beta pace finder', 2], ['Climbing style', 1]]);
    const byPlan = (await search('?sort=plan&dir=desc&pageSize=100')).body;
    expect(byPlan.rows[0].plan.id).toBe('lab');
    expect(byPlan.rows[byPlan.rows.length - 1].plan.id).toBe('sketch');
  });

  it('puts calculators needing attention first by default: reported, then busiest', async () => {
    const { body } = await search('?pageSize=10');
    expect(body.sort).toBe('attention');
    expect(titles(body).slice(0, 3)).toEqual(['Beta pace finder', 'Climbing style', 'Alpha ride groups']);
  });

  it('pages on the server and clamps a page past the end', async () => {
    const first = (await search('?sort=title&dir=asc&pageSize=10&page=1')).body;
    const second = (await search('?sort=title&dir=asc&pageSize=10&page=2')).body;
    expect(first.total).toBe(15);
    expect(first.pageCount).toBe(2);
    expect(first.rows).toHaveLength(10);
    expect(second.rows).toHaveLength(5);
    expect(new Set([...titles(first), ...titles(second)]).size).toBe(15);
    const beyond = (await search('?sort=title&dir=asc&pageSize=10&page=9')).body;
    expect(beyond.page).toBe(2);
  });

  it('filters by state', async () => {
    expect(titles((await search('?status=disabled')).body)).toEqual(['Dormant']);
    expect(titles((await search('?status=reported&sort=title&dir=asc')).body)).toEqual(['Beta pace finder', 'Climbing style']);
  });

  it('refuses a bad query with the field named', async () => {
    const bad = await search('?sort=price&pageSize=7');
    expect(bad.status).toBe(422);
    expect(bad.body.error!.issues.map((i) => i.field).sort()).toEqual(['pageSize', 'sort']);
  });

  it('shows one calculator in detail: versions, origins, 30 days of usage from the hour buckets, reports', async () => {
    const today = new Date();
    const yesterday = new Date(today.getTime() - 86_400_000);
    const { UsageCounter, Embed } = await import('@/models');
    const embed = (await Embed.findByPk(ids.c))!;
    await UsageCounter.bulkCreate([
      { embedId: embed.id, workspaceId: embed.workspaceId, granularity: 'hour', period: hourPeriod(new Date(yesterday.setUTCHours(3))), count: 7 },
      { embedId: embed.id, workspaceId: embed.workspaceId, granularity: 'hour', period: hourPeriod(new Date(yesterday.setUTCHours(20))), count: 8 },
      // 40 days ago: outside the chart.
      { embedId: embed.id, workspaceId: embed.workspaceId, granularity: 'hour', period: hourPeriod(new Date(today.getTime() - 40 * 86_400_000)), count: 999 },
    ]);
    const res = await detailRoute(await makeRequest(`/api/support/calculators/${ids.c}`, { userId: staffId }), { params: Promise.resolve({ id: String(ids.c) }) });
    expect(res.status).toBe(200);
    const { calculator: detail } = (await res.json()) as { calculator: CalculatorDetail };
    expect(detail.title).toBe('Climbing style');
    expect(detail.versions).toEqual([expect.objectContaining({ number: 1, active: true })]);
    expect(detail.usage.daily).toHaveLength(30);
    expect(detail.usage.daily.at(-2)).toEqual({ day: yesterday.toISOString().slice(0, 10), answers: 15 });
    expect(detail.usage.daily.reduce((s, d) => s + d.answers, 0)).toBe(15 + 5);
    expect(detail.reports).toHaveLength(2);
    expect(detail.reports[0]).toMatchObject({ status: 'open', hostOrigin: 'https://copycat.example', message: expect.stringContaining('rest days') });
    expect(detail.workspace.owners).toEqual(['jo@hills.example']);
    expect(detail.plan.id).toBe('bench');

    const missing = await detailRoute(await makeRequest('/api/support/calculators/99999', { userId: staffId }), { params: Promise.resolve({ id: '99999' }) });
    expect(missing.status).toBe(404);
  });
});
