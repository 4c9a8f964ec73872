import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Invoice, MailMessage, Subscription, WebhookEvent } from '@/models';
import { GET as statusGET } from '@/app/api/billing/checkout/[sessionId]/route';
import { GET as invoicesGET } from '@/app/api/billing/invoices/route';
import { GET as usageGET } from '@/app/api/billing/usage/route';
import { workspacePlan } from '@/lib/billing/limits';
import { makeRequest } from '../../helpers/auth';
import { DECLINED_CARD, SUCCESS_CARD, ownerWorkspace, startBillingStack, startCheckout, submitCard, type BillingStack } from './stack';

let stack: BillingStack;
beforeAll(async () => {
  stack = await startBillingStack();
});
afterAll(async () => {
  await stack.stop();
});

const status = async (userId: number, sessionId: string) => {
  const res = await statusGET(await makeRequest(`/api/billing/checkout/${sessionId}`, { userId }), { params: Promise.resolve({ sessionId }) });
  return { code: res.status, body: await res.json() };
};

describe('checkout through the fake payment service', () => {
  it('a good card: the webhook (not the redirect) moves the workspace to the plan, records the invoice and e-mails a receipt', async () => {
    const { ws, owner } = await ownerWorkspace();
    const started = await startCheckout(owner.id, 'bench');
    expect(started.status).toBe(201);
    expect(started.body.url).toMatch(new RegExp(`^${stack.fake.url}/pay/cs_test_`));

    const page = await fetch(started.body.url!);
    const html = await page.text();
    expect(html).toContain('Subscribe to Partwise Bench');
    expect(html).toContain('€19.00');

    // Hold the webhooks: the redirect alone must not change the plan.
    stack.fake.webhooks.pause();
    const paid = await submitCard(started.body.url!, SUCCESS_CARD);
    expect(paid.status).toBe(303);
    const back = new URL(paid.headers.get('location')!);
    expect(back.pathname).toBe('/studio/billing/return');
    expect(back.searchParams.get('session_id')).toBe(started.body.sessionId);
    expect((await workspacePlan(ws.id)).id).toBe('sketch');
    expect((await status(owner.id, started.body.sessionId!)).body).toMatchObject({ state: 'processing', plan: 'sketch', wantedPlan: 'bench' });

    stack.fake.webhooks.resume();
    expect(await stack.fake.webhooks.idle()).toBe(true);
    expect((await workspacePlan(ws.id)).id).toBe('bench');
    expect((await status(owner.id, started.body.sessionId!)).body).toMatchObject({ state: 'confirmed', plan: 'bench' });

    const sub = await Subscription.findOne({ where: { workspaceId: ws.id } });
    expect(sub).toMatchObject({ plan: 'bench', status: 'active', cancelAtPeriodEnd: false });
    expect(sub!.subscriptionRef).toMatch(/^sub_/);
    expect(sub!.currentPeriodEnd!.getTime()).toBeGreaterThan(Date.now() + 27 * 86400_000);

    const invoices = await Invoice.findAll({ where: { workspaceId: ws.id } });
    expect(invoices.map((i) => ({ amountPaid: i.amountPaid, status: i.status, currency: i.currency }))).toEqual([{ amountPaid: 1900, status: 'paid', currency: 'eur' }]);
    const receipts = await MailMessage.findAll({ where: { to: owner.email, kind: 'receipt' } });
    expect(receipts).toHaveLength(1);
    expect(receipts[0].subject).toContain('€19.00 paid');

    const listed = await invoicesGET(await makeRequest('/api/billing/invoices', { userId: owner.id }), { params: Promise.resolve({}) });
    expect((await listed.json()).invoices).toMatchObject([{ amountPaid: 1900, status: 'paid' }]);

    const usage = await (await usageGET(await makeRequest('/api/billing/usage', { userId: owner.id }), { params: Promise.resolve({}) })).json();
    expect(usage.plan.id).toBe('bench');
    expect(usage.usage.map((m: { key: string }) => m.key)).toEqual(['answers', 'calculators', 'seats', 'datasetRows', 'uploadBytes']);
    expect(usage.usage[2]).toMatchObject({ used: 2, limit: 2 });

    const audits = await AuditEvent.findAll({ where: { workspaceId: ws.id } });
    const actions = audits.map((a) => a.action);
    expect(actions).toContain('billing.checkout_started');
    expect(actions.filter((a) => a === 'billing.plan_changed')).toHaveLength(1);
    expect(actions.filter((a) => a === 'billing.webhook_processed').length).toBeGreaterThanOrEqual(3);
  });

  it('a declined card shows the decline on the checkout page and changes nothing here', async () => {
    const { ws, owner } = await ownerWorkspace();
    const started = await startCheckout(owner.id, 'lab');
    const eventsBefore = await WebhookEvent.count();
    const declined = await submitCard(started.body.url!, DECLINED_CARD);
    expect(declined.status).toBe(402);
    const html = await declined.text();
    expect(html).toContain('Your card was declined.');
    // The form keeps the number for a retry; the security code is never echoed.
    expect(html).toContain('value="4000 0000 0000 0002"');
    expect(html).not.toContain('value="123"');
    await stack.fake.webhooks.idle();
    expect((await workspacePlan(ws.id)).id).toBe('sketch');
    expect(await Invoice.count({ where: { workspaceId: ws.id } })).toBe(0);
    expect((await status(owner.id, started.body.sessionId!)).body.state).toBe('open');
    // Only the customer's creation reached us; no subscription or invoice event.
    const types = (await WebhookEvent.findAll({ offset: eventsBefore })).map((e) => e.type);
    expect(types.filter((t) => t !== 'customer.created')).toEqual([]);

    // The same checkout can still be paid with a good card afterwards.
    const retry = await submitCard(started.body.url!, SUCCESS_CARD);
    expect(retry.status).toBe(303);
    await stack.fake.webhooks.idle();
    expect((await workspacePlan(ws.id)).id).toBe('lab');
  });

  it('card typos get a clear message from the form', async () => {
    const { owner } = await ownerWorkspace();
    const started = await startCheckout(owner.id, 'bench');
    const bad = await submitCard(started.body.url!, { ...SUCCESS_CARD, number: '4242 4242 4242 4241' });
    expect(bad.status).toBe(402);
    expect(await bad.text()).toContain('The card number is not valid.');
    const expired = await submitCard(started.body.url!, { ...SUCCESS_CARD, expiry: '01 / 20' });
    expect(await expired.text()).toContain('The card has expired.');
  });

  it('refuses a checkout for the free plan, a second checkout while subscribed, and other workspaces\' sessions', async () => {
    const { owner } = await ownerWorkspace();
    expect((await startCheckout(owner.id, 'sketch')).status).toBe(422);
    expect((await startCheckout(owner.id, 'gold')).status).toBe(422);
    const started = await startCheckout(owner.id, 'bench');
    await submitCard(started.body.url!, SUCCESS_CARD);
    await stack.fake.webhooks.idle();
    const again = await startCheckout(owner.id, 'lab');
    expect(again.status).toBe(409);
    expect(again.body.error!.message).toMatch(/already pays for Bench/);

    const { owner: stranger } = await ownerWorkspace();
    await startCheckout(stranger.id, 'bench'); // gives the stranger a customer of their own
    expect((await status(stranger.id, started.body.sessionId!)).code).toBe(404);
  });

  it('members and staff cannot start a checkout', async () => {
    const { member } = await ownerWorkspace();
    expect((await startCheckout(member.id, 'bench')).status).toBe(403);
  });
});
