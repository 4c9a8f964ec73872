import { beforeAll, describe, expect, it } from 'vitest';
import { Embed, MailMessage, Membership, Subscription, UsageCounter, User, Workspace } from '@/models';
import { AppError } from '@/lib/errors';
import { ANSWER_GRACE, PLANS } from '@/lib/plans';
import { monthPeriod } from '@/lib/usage';
import { alertsSent, answerAllowance, assertCanPublish, assertRowsAllowed, pauseThreshold, workspacePlan } from '@/lib/billing/limits';

let slug = 0;
async function workspaceOn(plan: 'sketch' | 'bench' | 'lab' | null, status = 'active') {
  const ws = await Workspace.create({ name: `Limits ${++slug}`, slug: `limits-${slug}` });
  const owner = await User.create({ email: `owner${slug}@limits.test`, name: 'Owner', passwordHash: 'x' });
  const member = await User.create({ email: `member${slug}@limits.test`, name: 'Member', passwordHash: 'x' });
  await Membership.bulkCreate([
    { userId: owner.id, workspaceId: ws.id, role: 'owner' },
    { userId: member.id, workspaceId: ws.id, role: 'member' },
  ]);
  if (plan) await Subscription.create({ workspaceId: ws.id, plan, status });
  return { ws, owner, member };
}

async function refusal(p: Promise<unknown>): Promise<AppError> {
  const error = await p.then(() => null, (e) => e);
  expect(error, 'expected a refusal').toBeInstanceOf(AppError);
  return error as AppError;
}

const at = new Date('2026-12-10T12:00:00Z');
const period = monthPeriod(at);

async function setAnswers(ws: Workspace, embed: Embed, count: number) {
  await UsageCounter.destroy({ where: { embedId: embed.id, granularity: 'month', period } });
  await UsageCounter.create({ embedId: embed.id, workspaceId: ws.id, granularity: 'month', period, count });
}

describe('plan of a workspace', () => {
  it('is the free plan without a subscription, or when the subscription has ended', async () => {
    expect((await workspacePlan((await workspaceOn(null)).ws.id)).id).toBe('sketch');
    expect((await workspacePlan((await workspaceOn('lab', 'canceled')).ws.id)).id).toBe('sketch');
    expect((await workspacePlan((await workspaceOn('lab', 'incomplete')).ws.id)).id).toBe('sketch');
    expect((await workspacePlan((await workspaceOn('bench', 'past_due')).ws.id)).id).toBe('bench');
    expect((await workspacePlan((await workspaceOn('lab')).ws.id)).id).toBe('lab');
  });
});

describe('assertCanPublish', () => {
  it('allows up to the calculator limit, refuses the next with the plan and upgrade named, and frees a place on retire', async () => {
    const { ws } = await workspaceOn('sketch');
    await assertCanPublish(ws.id);
    const first = await Embed.create({ workspaceId: ws.id, token: `pub-${ws.id}-0`.padEnd(24, 'x'), title: 'One' });
    const error = await refusal(assertCanPublish(ws.id));
    expect(error.code).toBe('plan_limit');
    expect(error.status).toBe(402);
    expect(error.message).toMatch(/Sketch plan allows 1 published calculator/);
    expect(error.message).toMatch(/upgrade to Bench/);
    // A disabled calculator still holds its place; a retired one does not.
    await first.update({ status: 'disabled' });
    await refusal(assertCanPublish(ws.id));
    await first.update({ status: 'retired' });
    await assertCanPublish(ws.id);
  });

  it('counts against the paid plan once the subscription says so', async () => {
    const { ws } = await workspaceOn('bench');
    for (let i = 0; i < PLANS.bench.limits.calculators; i++) {
      await assertCanPublish(ws.id);
      await Embed.create({ workspaceId: ws.id, token: `bench-${ws.id}-${i}`.padEnd(24, 'x'), title: `C${i}` });
    }
    const error = await refusal(assertCanPublish(ws.id));
    expect(error.message).toMatch(/Bench plan allows 5 published calculators and this workspace has 5/);
    expect(error.message).toMatch(/upgrade to Lab/);
  });
});

describe('assertRowsAllowed', () => {
  it('accepts exactly the row and byte limits and refuses one more, naming the plan', async () => {
    const { ws } = await workspaceOn(null);
    const { datasetRows, uploadBytes } = PLANS.sketch.limits;
    await assertRowsAllowed(ws.id, datasetRows, uploadBytes);
    const rows = await refusal(assertRowsAllowed(ws.id, datasetRows + 1, 1000));
    expect(rows.code).toBe('plan_limit');
    expect(rows.message).toMatch(/2,001 rows; the Sketch plan accepts up to 2,000 rows/);
    expect(rows.message).toMatch(/Upgrade to Bench/);
    const bytes = await refusal(assertRowsAllowed(ws.id, 10, uploadBytes + 1));
    expect(bytes.message).toMatch(/Sketch plan accepts uploads up to 2 MB/);
  });

  it('names the plan that would fit, skipping ones that would not', async () => {
    const { ws } = await workspaceOn('sketch');
    const error = await refusal(assertRowsAllowed(ws.id, PLANS.bench.limits.datasetRows + 1, 1000));
    expect(error.message).toMatch(/Upgrade to Lab/);
    const { ws: lab } = await workspaceOn('lab');
    const top = await refusal(assertRowsAllowed(lab.id, PLANS.lab.limits.datasetRows + 1, 1000));
    expect(top.message).toMatch(/largest plan/);
  });
});

describe('answerAllowance', () => {
  it('is ok below 80 %, warned from 80 % through the grace, paused after 100 % + grace', async () => {
    const { ws } = await workspaceOn('sketch');
    const embed = await Embed.create({ workspaceId: ws.id, token: `ans-${ws.id}`.padEnd(24, 'x'), title: 'A' });
    const limit = PLANS.sketch.limits.answersPerMonth;
    const pauseAt = Math.ceil(limit * (1 + ANSWER_GRACE));
    expect(pauseThreshold(limit)).toBe(pauseAt);
    const cases: [number, string, boolean][] = [
      [0, 'ok', true],
      [Math.ceil(limit * 0.8) - 1, 'ok', true],
      [Math.ceil(limit * 0.8), 'warned', true],
      [limit, 'warned', true],
      [pauseAt - 1, 'warned', true],
      [pauseAt, 'paused', false],
      [pauseAt + 50, 'paused', false],
    ];
    for (const [used, state, allowed] of cases) {
      await setAnswers(ws, embed, used);
      const a = await answerAllowance(ws.id, at);
      expect({ used, state: a.state, allowed: a.allowed }).toEqual({ used, state, allowed });
      expect(a.limit).toBe(limit);
    }
  });

  it('e-mails the owners once at 80 % and once at 100 % per month, never the members', async () => {
    const { ws, owner } = await workspaceOn('sketch');
    const embed = await Embed.create({ workspaceId: ws.id, token: `mail-${ws.id}`.padEnd(24, 'x'), title: 'M' });
    const mails = () => MailMessage.findAll({ where: { to: owner.email }, order: [['id', 'ASC']] });

    await setAnswers(ws, embed, 399);
    await answerAllowance(ws.id, at);
    expect(await mails()).toHaveLength(0);

    await setAnswers(ws, embed, 400);
    await Promise.all([answerAllowance(ws.id, at), answerAllowance(ws.id, at), answerAllowance(ws.id, at)]);
    await setAnswers(ws, embed, 450);
    await answerAllowance(ws.id, at);
    let sent = await mails();
    expect(sent.map((m) => m.kind)).toEqual(['usage-alert-80']);
    expect(sent[0].text).toMatch(/400 of the 500 answers the Sketch plan includes/);
    expect(sent[0].text).toMatch(/Upgrading to Bench/);

    await setAnswers(ws, embed, 500);
    await answerAllowance(ws.id, at);
    await setAnswers(ws, embed, 530);
    await answerAllowance(ws.id, at);
    sent = await mails();
    expect(sent.map((m) => m.kind)).toEqual(['usage-alert-80', 'usage-alert-100']);
    expect(sent[1].subject).toMatch(/used all 500 answers of 2026-12/);
    expect(await alertsSent(ws.id, period)).toEqual([80, 100]);
    expect(await MailMessage.count({ where: { to: `member${slug}@limits.test` } })).toBe(0);

    // A new month starts from nothing: no alert, answers allowed again.
    const next = new Date('2027-01-02T00:00:00Z');
    const fresh = await answerAllowance(ws.id, next);
    expect(fresh).toMatchObject({ allowed: true, state: 'ok', used: 0 });
  });

  it('a jump straight past 100 % sends both alerts, and an upgrade lifts the pause at once', async () => {
    const { ws, owner } = await workspaceOn('sketch');
    const embed = await Embed.create({ workspaceId: ws.id, token: `jump-${ws.id}`.padEnd(24, 'x'), title: 'J' });
    await setAnswers(ws, embed, 600);
    expect(await answerAllowance(ws.id, at)).toMatchObject({ allowed: false, state: 'paused', plan: 'sketch' });
    expect((await MailMessage.findAll({ where: { to: owner.email } })).map((m) => m.kind).sort()).toEqual(['usage-alert-100', 'usage-alert-80']);
    await Subscription.update({ plan: 'bench' }, { where: { workspaceId: ws.id } });
    expect(await answerAllowance(ws.id, at)).toMatchObject({ allowed: true, state: 'ok', plan: 'bench', limit: PLANS.bench.limits.answersPerMonth });
  });
});
