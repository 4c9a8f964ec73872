/**
 * Fair use of scoring over real HTTP, as `npm start` serves it (the app server's fast
 * path), on the seeded free calculator: a crowd of addresses behind a declared proxy
 * gets the calculator's burst cap and a neutral 429 for the rest, the monthly pause
 * line holds exactly under concurrent requests, and the counts the server writes on
 * shutdown match what it served.
 */
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
// Only modules that load no models: the models must open this test's database, set in beforeAll.
import { ANSWER_GRACE, CALCULATOR_BURST_LIMITS, PLANS } from '@/lib/plans';
import { prepareDatabase, startApp, type AppProcess } from '../helpers/app-process';

type Models = typeof import('@/models');

let dir = '';
let env = {} as NodeJS.ProcessEnv;
let app: AppProcess | undefined;
let m: Models;
let embed: { id: number; workspaceId: number; token: string };

const good = { avg_speed_kmh: 24.5, weekly_distance_km: 130, climb_per_ride_m: 420 };
// lib/billing/limits' pause line, worked out here so that module (and the models) load late.
const pauseAt = Math.ceil(PLANS.sketch.limits.answersPerMonth * (1 + ANSWER_GRACE));
const perMinute = CALCULATOR_BURST_LIMITS.sketch[0].answers;
const month = () => new Date().toISOString().slice(0, 7);

beforeAll(async () => {
  ({ dir, env } = await prepareDatabase('scoring-burst', { PARTWISE_TRUST_PROXY: '1' }));
  process.env.DATABASE_URL = env.DATABASE_URL;
  m = await import('@/models');
  const row = (await m.Embed.findOne({ where: { status: 'active' }, order: [['id', 'ASC']] }))!;
  embed = { id: row.id, workspaceId: row.workspaceId, token: row.token };
  expect((await m.Subscription.findOne({ where: { workspaceId: row.workspaceId } }))!.plan).toBe('sketch');
});

// A test that fails before stopping its server must not leave it counting into the next one.
afterEach(async () => {
  await app?.stop();
  app = undefined;
});

afterAll(async () => {
  await m?.sequelize.close();
});

async function crowd(addresses: number, perAddress: number, prefix: string) {
  const calls: Promise<{ status: number; retryAfter: string | null; code?: string }>[] = [];
  for (let i = 0; i < perAddress; i++) {
    for (let a = 0; a < addresses; a++) {
      calls.push(
        fetch(`${app!.url}/api/score/${embed.token}`, { method: 'POST', headers: { 'content-type': 'application/json', 'x-forwarded-for': `${prefix}.${a}` }, body: JSON.stringify({ values: good }) }).then(async (res) => ({
          status: res.status,
          retryAfter: res.headers.get('retry-after'),
          code: ((await res.json()) as { error?: { code: string } }).error?.code,
        })),
      );
    }
  }
  return Promise.all(calls);
}

/** The alert is recorded beside the answers; wait for its outbox row before stopping the server. */
async function mailsOf(kind: string, atLeast: number): Promise<number> {
  let n = 0;
  for (let i = 0; i < 100 && (n = await m.MailMessage.count({ where: { kind } })) < atLeast; i++) await new Promise((r) => setTimeout(r, 50));
  return n;
}

async function metered(): Promise<number> {
  return Number((await m.UsageCounter.sum('count', { where: { workspaceId: embed.workspaceId, granularity: 'month', period: month() } })) ?? 0);
}

describe('fair use of scoring over HTTP', () => {
  it('with 5 answers left of the month, 40 concurrent requests get exactly 5 answers, metered, and one pause mail', async () => {
    expect(perMinute).toBeGreaterThan(5);
    await m.UsageCounter.create({ embedId: embed.id, workspaceId: embed.workspaceId, granularity: 'month', period: month(), count: pauseAt - 5 });
    app = await startApp(dir, env);
    const answers = await crowd(40, 1, '203.0.113');
    expect(answers.filter((a) => a.status === 200).length).toBe(5);
    // The first perMinute of the crowd pass the minute's burst window: 5 are answered, the
    // rest of them find the line reached (503); the others were turned away as a burst (429).
    expect(answers.filter((a) => a.status === 503 && a.code === 'unavailable').length).toBe(perMinute - 5);
    expect(answers.filter((a) => a.status === 429 && a.code === 'rate_limited').length).toBe(40 - perMinute);
    expect(await mailsOf('answers-paused', 1)).toBe(1);
    expect(await app.stop()).toBe(0);
    app = undefined;
    expect(await metered()).toBe(pauseAt);
  });

  it('600 requests from 20 addresses: the burst cap is served and metered, the rest are 429 with Retry-After, one mail', async () => {
    await m.UsageCounter.destroy({ where: { embedId: embed.id } });
    app = await startApp(dir, env);
    const answers = await crowd(20, 30, '198.51.100');
    const served = answers.filter((a) => a.status === 200).length;
    expect(served).toBe(perMinute);
    const refused = answers.filter((a) => a.status !== 200);
    expect(refused.every((a) => a.status === 429 && a.code === 'rate_limited' && Number(a.retryAfter) >= 1)).toBe(true);
    expect(await mailsOf('calculator-burst', 1)).toBe(1);
    expect(await app.stop()).toBe(0);
    app = undefined;
    expect(await metered()).toBe(served);
    expect(await m.MailMessage.count({ where: { kind: 'calculator-burst' } })).toBe(1);
  });
});
