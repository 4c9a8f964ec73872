import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Embed, Invoice, MailMessage, Subscription } from '@/models';
import { POST as planPOST } from '@/app/api/billing/plan/route';
import { POST as cancelPOST } from '@/app/api/billing/cancel/route';
import { POST as resumePOST } from '@/app/api/billing/resume/route';
import { assertCanPublish, workspacePlan } from '@/lib/billing/limits';
import { AppError } from '@/lib/errors';
import { controlHeaders } from '@/lib/fakes/payments';
import { makeRequest } from '../../helpers/auth';
import { SUCCESS_CARD, ownerWorkspace, startBillingStack, startCheckout, submitCard, subscribe, type BillingStack } from './stack';

let stack: BillingStack;
beforeAll(async () => {
  stack = await startBillingStack();
});
afterAll(async () => {
  await stack.stop();
});

const none = { params: Promise.resolve({}) };
const post = async (handler: typeof planPOST, url: string, userId: number, json?: unknown) => {
  const res = await handler(await makeRequest(url, { userId, method: 'POST', json }), none);
  return { status: res.status, body: await res.json() };
};
const sub = (workspaceId: number) => Subscription.findOne({ where: { workspaceId } });
const invoices = (workspaceId: number) => Invoice.findAll({ where: { workspaceId }, order: [['id', 'ASC']] });

describe('changing and ending a subscription', () => {
  it('upgrade bills the prorated difference at once; downgrade leaves credit that the renewal uses', async () => {
    const { ws, owner } = await ownerWorkspace();
    await subscribe(stack, owner.id, ws.id, 'bench');

    const up = await post(planPOST, '/api/billing/plan', owner.id, { plan: 'lab' });
    expect(up.status).toBe(200);
    expect(up.body.plan.id).toBe('lab');
    // Listed as soon as the change answers, not only once its webhook lands.
    expect(await Invoice.count({ where: { workspaceId: ws.id } })).toBe(2);
    await stack.fake.webhooks.idle();
    let list = await invoices(ws.id);
    expect(list).toHaveLength(2);
    // Nearly the whole month is left: about €79 − €19.
    expect(list[1].amountPaid).toBeGreaterThan(5900);
    expect(list[1].amountPaid).toBeLessThanOrEqual(6000);
    expect(list[1].status).toBe('paid');

    const down = await post(planPOST, '/api/billing/plan', owner.id, { plan: 'bench' });
    expect(down.status).toBe(200);
    await stack.fake.webhooks.idle();
    expect((await workspacePlan(ws.id)).id).toBe('bench');
    list = await invoices(ws.id);
    // The downgrade's difference is credit, so the invoice for it is €0.
    expect(list).toHaveLength(3);
    expect(list[2].amountPaid).toBe(0);

    // The period ends: the renewal invoice for Bench is paid from the credit first.
    const ref = (await sub(ws.id))!.subscriptionRef!;
    const renewed = await fetch(`${stack.fake.url}/_test/subscriptions/${ref}/end-period`, { method: 'POST', headers: controlHeaders(stack.fake.controlKey) });
    expect(renewed.status).toBe(200);
    await stack.fake.webhooks.idle();
    list = await invoices(ws.id);
    expect(list).toHaveLength(4);
    expect(list[3].amountPaid).toBe(0);
    expect((await sub(ws.id))!.currentPeriodEnd!.getTime()).toBeGreaterThan(Date.now() + 50 * 86400_000);
    // One receipt per paid invoice, never more.
    expect(await MailMessage.count({ where: { to: owner.email, kind: 'receipt' } })).toBe(4);

    const changes = await AuditEvent.findAll({ where: { workspaceId: ws.id, action: 'billing.plan_changed' }, order: [['id', 'ASC']] });
    expect(changes.map((c) => `${c.detail.from}→${c.detail.to}`)).toEqual(['sketch→bench', 'bench→lab', 'lab→bench']);
    // Who asked is on the request entry (the change itself may be applied by the webhook first).
    const requests = await AuditEvent.findAll({ where: { workspaceId: ws.id, action: 'billing.change_requested' }, order: [['id', 'ASC']] });
    expect(requests.map((r) => [r.actorUserId, r.detail.to])).toEqual([[owner.id, 'lab'], [owner.id, 'bench']]);
  });

  it('cancellation keeps the plan until the period ends, can be taken back, and then ends on the free plan', async () => {
    const { ws, owner } = await ownerWorkspace();
    await subscribe(stack, owner.id, ws.id, 'bench');
    for (let i = 0; i < 3; i++) await Embed.create({ workspaceId: ws.id, token: `cancel-${ws.id}-${i}`.padEnd(24, 'x'), title: `C${i}` });

    const cancel = await post(cancelPOST, '/api/billing/cancel', owner.id);
    expect(cancel.status).toBe(200);
    expect(cancel.body.subscription.cancelAtPeriodEnd).toBe(true);
    expect(cancel.body.plan.id).toBe('bench');
    expect((await post(cancelPOST, '/api/billing/cancel', owner.id)).status).toBe(409);

    const resume = await post(resumePOST, '/api/billing/resume', owner.id);
    expect(resume.body.subscription.cancelAtPeriodEnd).toBe(false);

    // Choosing the free plan is the same as cancelling.
    const toFree = await post(planPOST, '/api/billing/plan', owner.id, { plan: 'sketch' });
    expect(toFree.status).toBe(200);
    expect(toFree.body.subscription.cancelAtPeriodEnd).toBe(true);
    await stack.fake.webhooks.idle();
    expect((await workspacePlan(ws.id)).id).toBe('bench');
    await assertCanPublish(ws.id);

    const ref = (await sub(ws.id))!.subscriptionRef!;
    await fetch(`${stack.fake.url}/_test/subscriptions/${ref}/end-period`, { method: 'POST', headers: controlHeaders(stack.fake.controlKey) });
    await stack.fake.webhooks.idle();
    expect(await sub(ws.id)).toMatchObject({ plan: 'sketch', status: 'canceled', cancelAtPeriodEnd: false });
    expect((await workspacePlan(ws.id)).id).toBe('sketch');
    // Three live calculators now exceed Sketch's one: no new ones.
    const refused = await assertCanPublish(ws.id).then(() => null, (e: AppError) => e);
    expect(refused?.code).toBe('plan_limit');
    // No renewal invoice was charged for the ended subscription.
    expect(await Invoice.count({ where: { workspaceId: ws.id } })).toBe(1);
    // Nothing left to change or cancel.
    expect((await post(cancelPOST, '/api/billing/cancel', owner.id)).status).toBe(409);
    expect((await post(planPOST, '/api/billing/plan', owner.id, { plan: 'lab' })).status).toBe(409);
  });

  it('an old subscription ending never overrides a newer one in force', async () => {
    const { ws, owner } = await ownerWorkspace();
    await subscribe(stack, owner.id, ws.id, 'bench');
    const oldRef = (await sub(ws.id))!.subscriptionRef!;
    await post(cancelPOST, '/api/billing/cancel', owner.id);
    await fetch(`${stack.fake.url}/_test/subscriptions/${oldRef}/end-period`, { method: 'POST', headers: controlHeaders(stack.fake.controlKey) });
    await stack.fake.webhooks.idle();
    await subscribe(stack, owner.id, ws.id, 'lab');
    // The old subscription's last event arrives again, late.
    const late = stack.fake.state.events.filter((e) => e.type === 'customer.subscription.deleted' && (e.data.object as { id: string }).id === oldRef).at(-1)!;
    const copy = { ...late, id: `${late.id}_late` };
    stack.fake.state.events.push(copy);
    await fetch(`${stack.fake.url}/_test/events/${copy.id}/replay`, { method: 'POST', headers: controlHeaders(stack.fake.controlKey) });
    expect(await sub(ws.id)).toMatchObject({ plan: 'lab', status: 'active' });
  });

  it('two checkouts paid one after the other: the later plan wins and the earlier subscription is ended', async () => {
    const { ws, owner } = await ownerWorkspace();
    const first = await startCheckout(owner.id, 'bench');
    const second = await startCheckout(owner.id, 'lab');
    expect((await submitCard(first.body.url!, SUCCESS_CARD)).status).toBe(303);
    await stack.fake.webhooks.idle();
    const benchRef = (await sub(ws.id))!.subscriptionRef!;
    expect((await submitCard(second.body.url!, SUCCESS_CARD)).status).toBe(303);
    await stack.fake.webhooks.idle();
    expect(await sub(ws.id)).toMatchObject({ plan: 'lab', status: 'active' });
    expect(stack.fake.state.subscriptions.get(benchRef)!.status).toBe('canceled');
    expect(await AuditEvent.count({ where: { workspaceId: ws.id, action: 'billing.subscription_replaced', targetId: benchRef } })).toBe(1);
  });

  it('only owners change plans', async () => {
    const { ws, owner, member } = await ownerWorkspace();
    await subscribe(stack, owner.id, ws.id, 'bench');
    expect((await post(planPOST, '/api/billing/plan', member.id, { plan: 'lab' })).status).toBe(403);
    expect((await post(cancelPOST, '/api/billing/cancel', member.id)).status).toBe(403);
    expect((await post(planPOST, '/api/billing/plan', owner.id, { plan: 'bench' })).status).toBe(409);
    expect((await post(planPOST, '/api/billing/plan', owner.id, { plan: 'platinum' })).status).toBe(422);
    expect((await workspacePlan(ws.id)).id).toBe('bench');
  });
});
