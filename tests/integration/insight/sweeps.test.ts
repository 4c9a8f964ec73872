import { beforeAll, describe, expect, it } from 'vitest';
import { makeRequest } from '../../helpers/auth';
import { PUT as alertsRoute } from '@/app/api/embeds/[id]/insight/alerts/route';
import { addDays, RETENTION_MONTHS, retentionCutoffDay } from '@/lib/insight/aggregate';
import { sweepInsightAlerts } from '@/lib/insight/alerts';
import { recordInsight, utcDay } from '@/lib/insight/counters';
import { sweepInsightRetention } from '@/lib/insight/sweeps';
import { loadServedVersion } from '@/lib/scoring';
import { flushUsage } from '@/lib/usage';
import { InsightAlert, InsightCount, MailMessage, Membership, User } from '@/models';
import { insightCalculator } from './helpers';

type Calc = Awaited<ReturnType<typeof insightCalculator>>;
let calc: Calc;
const now = new Date('2026-12-03T10:00:00Z');
const ctx = (id: number) => ({ params: Promise.resolve({ id: String(id) }) });

async function subscribe(userId: number, json: unknown) {
  const res = await alertsRoute(await makeRequest(`/api/embeds/${calc.embed.id}/insight/alerts`, { method: 'PUT', userId, json }), ctx(calc.embed.id));
  expect(res.status).toBe(200);
}

const mails = (to: string) => MailMessage.findAll({ where: { to, kind: 'insight-weekly' } });

beforeAll(async () => {
  calc = await insightCalculator();
  // Visitors of the last days all gave 44 km/h, a bin the training data hardly fills: clear drift.
  const served = await loadServedVersion(calc.version.id);
  for (let d = 0; d < 5; d++) {
    for (let i = 0; i < 20; i++) recordInsight({ id: calc.embed.id, insightEnabled: true }, served.insight, [44, 100, 300], 0, i < 2, new Date(Date.parse(`${addDays(utcDay(now), -d)}T08:00:00Z`)));
  }
  await flushUsage();
});

describe('the weekly insight mail', () => {
  it('goes once to each subscribed member whose threshold is crossed, however often the sweep runs, with drift explained as about inputs', async () => {
    await subscribe(calc.member.id, { subscribed: true, driftThreshold: 0.25, unusualShare: 0.5 });
    // The owner keeps the mail off.
    await subscribe(calc.owner.id, { subscribed: false, driftThreshold: 0.05, unusualShare: 0.01 });
    const outsider = await User.create({ email: `gone-${calc.embed.id}@insight.test`, name: 'Gone', passwordHash: 'x', emailVerifiedAt: new Date() });
    await Membership.create({ userId: outsider.id, workspaceId: calc.workspace.id, role: 'member' });
    await subscribe(outsider.id, { subscribed: true, driftThreshold: 0.05, unusualShare: 0.05 });
    await Membership.destroy({ where: { userId: outsider.id } });

    const first = await sweepInsightAlerts(now);
    const second = await sweepInsightAlerts(now);
    const later = await sweepInsightAlerts(new Date(now.getTime() + 3 * 86_400_000));
    const toMember = await mails(calc.member.email);
    expect(toMember).toHaveLength(1);
    expect([first.sent, second.sent, later.sent]).toEqual([1, 0, 0]);
    expect(await mails(calc.owner.email)).toHaveLength(0);
    expect(await mails(outsider.email)).toHaveLength(0);
    const mail = toMember[0];
    expect(mail.subject).toContain('drifted from the training data');
    expect(mail.text).toContain('100 answers');
    expect(mail.text).toContain('not anything about any one visitor');
    expect(mail.text).toContain('/studio/calculators/');
    const row = await InsightAlert.findOne({ where: { embedId: calc.embed.id, userId: calc.member.id } });
    expect(row!.lastSentAt!.toISOString()).toBe(now.toISOString());
  });

  it('goes out again after 7 days only when the new week crosses a threshold too', async () => {
    const weekLater = new Date(now.getTime() + 7 * 86_400_000);
    // Nothing was answered in that week: no mail.
    await sweepInsightAlerts(weekLater);
    expect(await mails(calc.member.email)).toHaveLength(1);
    const served = await loadServedVersion(calc.version.id);
    for (let i = 0; i < 10; i++) recordInsight({ id: calc.embed.id, insightEnabled: true }, served.insight, [44, 100, 300], 0, true, weekLater);
    await flushUsage();
    await sweepInsightAlerts(weekLater);
    await sweepInsightAlerts(weekLater);
    const toMember = await mails(calc.member.email);
    expect(toMember).toHaveLength(2);
    // Unusual share was 100 % this time, above the member's 50 %.
    expect(toMember[1].text).toContain('100% of the answers were flagged as unlike the training data');
  });

  it('sends nothing to members who unsubscribed', async () => {
    await subscribe(calc.member.id, { subscribed: false, driftThreshold: 0.05, unusualShare: 0.01 });
    const res = await sweepInsightAlerts(new Date(now.getTime() + 30 * 86_400_000));
    expect(res.sent).toBe(0);
  });
});

describe('retention of the daily aggregates', () => {
  it(`deletes days older than ${RETENTION_MONTHS} months and keeps the rest`, async () => {
    const keptFrom = retentionCutoffDay(now);
    expect(keptFrom).toBe('2025-11-03');
    const base = { embedId: calc.embed.id, versionId: calc.version.id, kind: 'answers' as const, count: 5 };
    await InsightCount.bulkCreate([
      { ...base, day: '2025-10-01' },
      { ...base, day: addDays(keptFrom, -1) },
      { ...base, day: keptFrom },
      { ...base, day: '2026-01-15' },
    ]);
    const result = await sweepInsightRetention(now);
    expect(result).toEqual({ deleted: 2, keptFrom });
    const days = (await InsightCount.findAll({ where: { embedId: calc.embed.id, kind: 'answers' }, attributes: ['day'], raw: true })).map((r) => r.day);
    expect(days).toContain(keptFrom);
    expect(days).toContain('2026-01-15');
    expect(days.every((d) => d >= keptFrom)).toBe(true);
    expect((await sweepInsightRetention(now)).deleted).toBe(0);
  });
});
