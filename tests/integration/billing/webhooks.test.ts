import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import Stripe from 'stripe';
import { AuditEvent, Invoice, MailMessage, Subscription, WebhookEvent } from '@/models';
import { POST as webhookPOST } from '@/app/api/webhooks/payments/route';
import { controlHeaders, signPayload } from '@/lib/fakes/payments';
import { ownerWorkspace, startBillingStack, subscribe, type BillingStack } from './stack';

let stack: BillingStack;
beforeAll(async () => {
  stack = await startBillingStack();
});
afterAll(async () => {
  await stack.stop();
});

const deliver = async (body: string, signature?: string) => {
  const headers: Record<string, string> = { 'content-type': 'application/json' };
  if (signature !== undefined) headers['stripe-signature'] = signature;
  const res = await webhookPOST(new Request('http://localhost:3000/api/webhooks/payments', { method: 'POST', headers, body }), { params: Promise.resolve({}) });
  return { status: res.status, body: await res.json() };
};

async function snapshot(workspaceId: number) {
  const sub = await Subscription.findOne({ where: { workspaceId }, raw: true });
  return {
    sub: sub && { plan: sub.plan, status: sub.status, ref: sub.subscriptionRef, cancel: sub.cancelAtPeriodEnd, end: sub.currentPeriodEnd },
    invoices: await Invoice.count({ where: { workspaceId } }),
    receipts: await MailMessage.count({ where: { kind: 'receipt' } }),
    events: await WebhookEvent.count(),
    planAudits: await AuditEvent.count({ where: { action: 'billing.plan_changed' } }),
  };
}

describe('webhook route', () => {
  it('the fake signs events the way the SDK verifies them', () => {
    const payload = JSON.stringify({ id: 'evt_sig', object: 'event', type: 'ping', data: { object: {} } });
    const header = signPayload(payload, process.env.STRIPE_WEBHOOK_SECRET!);
    const event = Stripe.webhooks.constructEvent(payload, header, process.env.STRIPE_WEBHOOK_SECRET!);
    expect(event.id).toBe('evt_sig');
    // And the SDK's own test header is accepted by our check just the same.
    expect(() => Stripe.webhooks.constructEvent(payload, Stripe.webhooks.generateTestHeaderString({ payload, secret: process.env.STRIPE_WEBHOOK_SECRET! }), process.env.STRIPE_WEBHOOK_SECRET!)).not.toThrow();
  });

  it('a bad, missing, stale or foreign signature → 400 and nothing changes', async () => {
    const { ws, owner } = await ownerWorkspace();
    await subscribe(stack, owner.id, ws.id, 'bench');
    const before = await snapshot(ws.id);
    // A real event from the fake, re-addressed to downgrade — with wrong signatures.
    const real = stack.fake.state.events.filter((e) => e.type === 'customer.subscription.created').at(-1)!;
    const tampered = JSON.stringify({ ...real, id: 'evt_tampered', type: 'customer.subscription.deleted' });
    const secret = process.env.STRIPE_WEBHOOK_SECRET!;

    const cases: [string, string | undefined][] = [
      ['missing header', undefined],
      ['garbage header', 'nonsense'],
      ['signed with another secret', signPayload(tampered, 'whsec_someone_else')],
      ['signature of a different body', signPayload(JSON.stringify(real), secret)],
      ['too old', signPayload(tampered, secret, Math.floor(Date.now() / 1000) - 3600)],
    ];
    for (const [why, header] of cases) {
      const res = await deliver(tampered, header);
      expect(res.status, why).toBe(400);
      expect(res.body.error.code, why).toBe('bad_request');
    }
    // A re-serialised body (same JSON, different bytes) fails too: the raw body is what is signed.
    const original = JSON.stringify(real, null, 2);
    const reformatted = JSON.stringify(JSON.parse(original));
    expect((await deliver(reformatted, signPayload(original, secret))).status).toBe(400);
    expect(await snapshot(ws.id)).toEqual(before);
  });

  it('duplicated and replayed events change nothing twice', async () => {
    const { ws, owner } = await ownerWorkspace();
    await subscribe(stack, owner.id, ws.id, 'lab');
    const before = await snapshot(ws.id);
    const mine = stack.fake.state.events.filter((e) => ['checkout.session.completed', 'invoice.paid', 'customer.subscription.created'].includes(e.type)).slice(-3);
    expect(mine.map((e) => e.type).sort()).toEqual(['checkout.session.completed', 'customer.subscription.created', 'invoice.paid']);

    // Replays through the fake's control endpoint: same id, fresh signature.
    for (const e of mine) {
      const res = await fetch(`${stack.fake.url}/_test/events/${e.id}/replay`, { method: 'POST', headers: controlHeaders(stack.fake.controlKey) });
      expect((await res.json()).attempt.status).toBe(200);
    }
    // Duplicates delivered directly, several at once.
    const payload = JSON.stringify(mine[1]);
    const results = await Promise.all([1, 2, 3].map(() => deliver(payload, signPayload(payload, process.env.STRIPE_WEBHOOK_SECRET!))));
    expect(results.map((r) => r.status)).toEqual([200, 200, 200]);
    expect(results.every((r) => r.body.duplicate === true)).toBe(true);

    expect(await snapshot(ws.id)).toEqual(before);
    expect(await MailMessage.count({ where: { to: owner.email, kind: 'receipt' } })).toBe(1);
    const delivery = (await (await fetch(`${stack.fake.url}/_test/events/${mine[0].id}`, { headers: controlHeaders(stack.fake.controlKey) })).json()).delivery;
    expect(delivery.attempts.map((a: { reason: string }) => a.reason)).toEqual(['send', 'replay']);
  });

  it('an event that fails to apply is given back and applied by the retry', async () => {
    const { ws, owner } = await ownerWorkspace();
    const statusesBefore = stack.webhookStatuses.length;
    // The next API call fails: that is the webhook handler fetching the subscription.
    const started = await (await import('./stack')).startCheckout(owner.id, 'bench');
    stack.fake.webhooks.pause();
    const paid = await fetch(started.body.url!, { method: 'POST', body: new URLSearchParams({ number: '4242424242424242', expiry: '12/34', cvc: '123' }), redirect: 'manual' });
    expect(paid.status).toBe(303);
    stack.fake.failNext(1, 500);
    stack.fake.webhooks.resume();
    expect(await stack.fake.webhooks.idle()).toBe(true);
    const statuses = stack.webhookStatuses.slice(statusesBefore);
    expect(statuses.some((s) => s >= 500)).toBe(true);
    expect(statuses.filter((s) => s === 200).length).toBeGreaterThanOrEqual(3);
    expect((await Subscription.findOne({ where: { workspaceId: ws.id } }))!.plan).toBe('bench');
    expect(await Invoice.count({ where: { workspaceId: ws.id } })).toBe(1);
  });

  it('events for customers we do not know are acknowledged and ignored', async () => {
    const payload = JSON.stringify({ id: 'evt_unknown_1', object: 'event', type: 'invoice.paid', created: 1, data: { object: { id: 'in_nowhere', object: 'invoice', customer: 'cus_nobody' } } });
    stack.fake.state.invoices.set('in_nowhere', { ...(stack.fake.state.invoices.values().next().value as object), id: 'in_nowhere', customer: 'cus_nobody' } as never);
    const res = await deliver(payload, signPayload(payload, process.env.STRIPE_WEBHOOK_SECRET!));
    expect(res).toMatchObject({ status: 200, body: { duplicate: false, handled: false } });
    expect(await Invoice.count({ where: { invoiceRef: 'in_nowhere' } })).toBe(0);
  });
});
