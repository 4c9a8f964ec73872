/**
 * Fair use of scoring on a free (Sketch) calculator: a crowd of addresses, each under
 * its own per-address limit, cannot drain the month. The calculator's burst limits
 * (lib/plans) refuse the excess with a neutral 429 and Retry-After, the owner hears
 * once per window, and the monthly pause line holds exactly: with N answers left,
 * exactly N are served and metered, however many arrive at once.
 */
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { makeRequest } from '../../helpers/auth';
import { useMailSink } from '../accounts/mail-helpers';
import { modelWorkspace } from '../embeds/fixtures';
import { POST as publishRoute } from '@/app/api/embeds/route';
import { POST as scoreRoute } from '@/app/api/score/[token]/route';
import { GET as usageRoute } from '@/app/api/billing/usage/route';
import { pauseThreshold } from '@/lib/billing/limits';
import { CALCULATOR_BURST_LIMITS, PLANS } from '@/lib/plans';
import { rateLimitTesting } from '@/lib/rate-limit';
import { invalidateAllowance } from '@/lib/scoring';
import { recentScoringAlerts } from '@/lib/scoring/alerts';
import { embedMonthlyAnswers, flushUsage, monthPeriod, workspaceMonthlyAnswers } from '@/lib/usage';
import { MailMessage, UsageCounter } from '@/models';

const mail = useMailSink();
const good = { avg_speed_kmh: 24.5, weekly_distance_km: 130, climb_per_ride_m: 420 };
const sketch = PLANS.sketch.limits.answersPerMonth;
const [perMinute, perHour] = CALCULATOR_BURST_LIMITS.sketch;

async function freeCalculator() {
  const ws = await modelWorkspace({ plan: 'sketch' });
  const res = await publishRoute(await makeRequest('/api/embeds', { userId: ws.owner.id, json: { mixtureModelId: ws.model.id } }), { params: Promise.resolve({}) });
  expect(res.status).toBe(201);
  const { embed } = await res.json();
  return { ...ws, token: embed.token as string, embedId: embed.id as number };
}

async function score(token: string, address: string) {
  const res = await scoreRoute(await makeRequest(`/api/score/${token}`, { json: { values: good }, headers: { 'x-forwarded-for': address } }), { params: Promise.resolve({ token }) });
  return { status: res.status, retryAfter: res.headers.get('retry-after'), body: await res.json() };
}

/** `perAddress` requests from each of `addresses` addresses, all at once. */
function crowd(token: string, addresses: number, perAddress: number, prefix: string) {
  const calls: Promise<Awaited<ReturnType<typeof score>>>[] = [];
  for (let i = 0; i < perAddress; i++) for (let a = 0; a < addresses; a++) calls.push(score(token, `${prefix}.${a}`));
  return Promise.all(calls);
}

const mailsOf = (to: string, kind: string) => MailMessage.count({ where: { to, kind } });

/** Let the alert's background work (insert, outbox, SMTP) finish. */
async function settle(to: string, kind: string, count: number) {
  for (let i = 0; i < 100 && (await mailsOf(to, kind)) < count; i++) await new Promise((r) => setTimeout(r, 20));
  await new Promise((r) => setTimeout(r, 100));
}

// The clock (Date only: timers stay real for the database and the mail), moved by the
// tests. It starts at 10:10 UTC on the 15th of this month, so the windows below straddle
// neither an hour nor a month boundary by accident.
beforeEach(() => {
  const today = new Date();
  vi.useFakeTimers({ toFake: ['Date'], now: Date.UTC(today.getUTCFullYear(), today.getUTCMonth(), 15, 10, 10) });
  rateLimitTesting.clear();
});
afterEach(() => vi.useRealTimers());
const advance = (ms: number) => vi.setSystemTime(Date.now() + ms);

describe('burst limits of a free calculator', () => {
  it('600 requests from 20 addresses: the burst cap is served and metered, the rest get a neutral 429, the owner one mail', async () => {
    const c = await freeCalculator();
    const answers = await crowd(c.token, 20, 30, '203.0.113');
    const served = answers.filter((a) => a.status === 200);
    const refused = answers.filter((a) => a.status !== 200);

    expect(served.length).toBe(Math.min(perMinute.answers, pauseThreshold(sketch)));
    expect(await embedMonthlyAnswers(c.embedId)).toBe(served.length);
    expect(refused.length).toBe(600 - served.length);
    for (const r of refused) {
      expect(r.status).toBe(429);
      expect(r.body.error.code).toBe('rate_limited');
      expect(r.body.error.message).toMatch(/^Many people are using this calculator right now\. Please try again in \d+ seconds?\.$/);
      // Every request came at the window's first instant: the whole minute is left.
      expect(Number(r.retryAfter)).toBe(perMinute.windowMs / 1000);
    }

    // One mail to the owner for the window, none to the member, however many refusals.
    const burstMail = await mail.mailTo(c.owner.email, 'calculator-burst');
    expect(burstMail.subject).toContain('more requests than usual');
    await crowd(c.token, 5, 10, '198.51.100');
    await settle(c.owner.email, 'calculator-burst', 1);
    expect(await mailsOf(c.owner.email, 'calculator-burst')).toBe(1);
    expect(await mailsOf(c.member.email, 'calculator-burst')).toBe(0);

    // The studio sees it: recorded with the usage alerts and returned by the usage route.
    const alerts = await recentScoringAlerts(c.workspace.id);
    expect(alerts).toEqual([expect.objectContaining({ kind: 'burst', threshold: 1, limit: perMinute.answers, calculator: { id: c.embedId, title: expect.any(String) } })]);
    const usage = await usageRoute(await makeRequest('/api/billing/usage', { userId: c.owner.id }), { params: Promise.resolve({}) });
    expect((await usage.json()).alerts).toEqual([expect.objectContaining({ kind: 'burst', calculator: expect.objectContaining({ id: c.embedId }) })]);

    // After the minute the calculator answers other visitors again.
    advance(perMinute.windowMs + 1000);
    expect((await score(c.token, '192.0.2.1')).status).toBe(200);

    // A burst in the next hour is a new window: one more mail.
    advance(3_600_000);
    const again = await crowd(c.token, 20, 5, '192.0.2');
    expect(again.filter((a) => a.status === 200).length).toBe(perMinute.answers);
    await settle(c.owner.email, 'calculator-burst', 2);
    expect(await mailsOf(c.owner.email, 'calculator-burst')).toBe(2);
    expect(await embedMonthlyAnswers(c.embedId)).toBe(served.length + 1 + perMinute.answers);
  });

  it('the hour limit holds a slow, steady crowd to a small share of the month', async () => {
    const c = await freeCalculator();
    let served = 0;
    // Ten answers asked every ten seconds for an hour: 3,600 requests.
    for (let step = 0; step < 360; step++) {
      const round = await crowd(c.token, 10, 1, `10.${step % 250}.0`);
      served += round.filter((a) => a.status === 200).length;
      advance(10_000);
    }
    // One hour window, opened by the first answer: exactly its answers, however steady the crowd.
    expect(served).toBe(perHour.answers);
    expect(served).toBeLessThan(0.25 * sketch);
    expect(await embedMonthlyAnswers(c.embedId)).toBe(served);
  });
});

describe('the monthly pause line', () => {
  it('serves and meters exactly the answers left, however many arrive at once, then pauses and tells the owner once', async () => {
    const c = await freeCalculator();
    const pauseAt = pauseThreshold(sketch);
    const left = 7;
    expect(left).toBeLessThan(perMinute.answers);
    await UsageCounter.create({ embedId: c.embedId, workspaceId: c.workspace.id, granularity: 'month', period: monthPeriod(), count: pauseAt - left });
    invalidateAllowance(c.workspace.id);

    const answers = await crowd(c.token, 40, 1, '203.0.113');
    const statuses = answers.map((a) => a.status);
    expect(statuses.filter((s) => s === 200).length).toBe(left);
    // The crowd meets the minute's burst window first: of the first perMinute.answers in
    // it, `left` are answered and the rest find the line reached (503); the others were
    // already turned away as a burst (429), and none of them is metered.
    expect(statuses.filter((s) => s === 503).length).toBe(perMinute.answers - left);
    expect(statuses.filter((s) => s === 429).length).toBe(40 - perMinute.answers);
    const pausedAnswer = answers.find((a) => a.status === 503)!;
    expect(pausedAnswer.body.error).toMatchObject({ code: 'unavailable', message: expect.stringMatching(/short break/) });
    expect(pausedAnswer.retryAfter).toBe('3600');
    await flushUsage();
    expect(await workspaceMonthlyAnswers(c.workspace.id)).toBe(pauseAt);

    // Later visitors find it paused too; nothing more is metered.
    const later = await crowd(c.token, 5, 1, '198.51.100');
    expect(later.every((a) => a.status === 503)).toBe(true);
    expect(await workspaceMonthlyAnswers(c.workspace.id)).toBe(pauseAt);

    const pausedMail = await mail.mailTo(c.owner.email, 'answers-paused');
    expect(pausedMail.subject).toContain('paused');
    await settle(c.owner.email, 'answers-paused', 1);
    expect(await mailsOf(c.owner.email, 'answers-paused')).toBe(1);
    expect(await mailsOf(c.member.email, 'answers-paused')).toBe(0);
    expect((await recentScoringAlerts(c.workspace.id)).map((a) => [a.kind, a.threshold])).toEqual(expect.arrayContaining([['allowance', 105], ['allowance', 100], ['allowance', 80]]));
  });

  it('counts answers that are still in the usage buffer when the allowance is read', async () => {
    const c = await freeCalculator();
    const pauseAt = pauseThreshold(sketch);
    await UsageCounter.create({ embedId: c.embedId, workspaceId: c.workspace.id, granularity: 'month', period: monthPeriod(), count: pauseAt - 12 });
    invalidateAllowance(c.workspace.id);
    // Five answers, then the allowance is read afresh while they may still be unwritten.
    expect((await crowd(c.token, 5, 1, '203.0.113')).every((a) => a.status === 200)).toBe(true);
    invalidateAllowance(c.workspace.id);
    advance(perMinute.windowMs);
    const rest = await crowd(c.token, 10, 1, '198.51.100');
    expect(rest.filter((a) => a.status === 200).length).toBe(7);
    expect(await workspaceMonthlyAnswers(c.workspace.id)).toBe(pauseAt);
  });
});
