import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { expect } from 'vitest';
import { startPaymentsFake, type PaymentsFake } from '@/lib/fakes/payments';
import { Membership, Subscription, User, Workspace } from '@/models';
import { POST as webhookPOST } from '@/app/api/webhooks/payments/route';
import { POST as checkoutPOST } from '@/app/api/billing/checkout/route';
import { makeRequest } from '../../helpers/auth';

/**
 * The payment fake in-process on a random port, posting its webhooks over real HTTP
 * to a tiny bridge server that hands them to Partwise's webhook route handler.
 */
export interface BillingStack {
  fake: PaymentsFake;
  webhookUrl: string;
  /** Status codes the route answered, in order. */
  webhookStatuses: number[];
  stop(): Promise<void>;
}

export async function startBillingStack(opts: { retryBaseMs?: number } = {}): Promise<BillingStack> {
  const webhookStatuses: number[] = [];
  const bridge = http.createServer(async (req, res) => {
    const chunks: Buffer[] = [];
    for await (const c of req) chunks.push(c as Buffer);
    const headers: Record<string, string> = {};
    for (const [k, v] of Object.entries(req.headers)) if (typeof v === 'string') headers[k] = v;
    const request = new Request(`http://localhost:3000${req.url}`, { method: req.method, headers, body: Buffer.concat(chunks) });
    const response = await webhookPOST(request, { params: Promise.resolve({}) });
    webhookStatuses.push(response.status);
    res.writeHead(response.status, { 'content-type': 'application/json' });
    res.end(await response.text());
  });
  await new Promise<void>((r) => bridge.listen(0, '127.0.0.1', () => r()));
  const webhookUrl = `http://127.0.0.1:${(bridge.address() as AddressInfo).port}/api/webhooks/payments`;
  const fake = await startPaymentsFake({ webhookUrl, retryBaseMs: opts.retryBaseMs ?? 50, maxAttempts: 5 });
  Object.assign(process.env, fake.env());
  return {
    fake,
    webhookUrl,
    webhookStatuses,
    async stop() {
      await fake.webhooks.idle(5000);
      await fake.stop();
      bridge.closeAllConnections();
      await new Promise<void>((r) => bridge.close(() => r()));
    },
  };
}

let n = 0;
export async function ownerWorkspace() {
  n++;
  const ws = await Workspace.create({ name: `Billing Club ${n}`, slug: `billing-club-${n}-${Date.now()}` });
  const owner = await User.create({ email: `owner${n}.${ws.id}@billing.test`, name: 'Owner', passwordHash: 'x' });
  const member = await User.create({ email: `member${n}.${ws.id}@billing.test`, name: 'Member', passwordHash: 'x' });
  await Membership.bulkCreate([
    { userId: owner.id, workspaceId: ws.id, role: 'owner' },
    { userId: member.id, workspaceId: ws.id, role: 'member' },
  ]);
  return { ws, owner, member };
}

export const SUCCESS_CARD = { number: '4242 4242 4242 4242', expiry: '12 / 34', cvc: '123', name: 'Maren Osei' };
export const DECLINED_CARD = { number: '4000 0000 0000 0002', expiry: '12 / 34', cvc: '123', name: 'Maren Osei' };

/** Submit the fake's hosted card form like a browser would. */
export async function submitCard(url: string, card: typeof SUCCESS_CARD): Promise<Response> {
  const page = await fetch(url);
  expect(page.status).toBe(200);
  return fetch(url, { method: 'POST', body: new URLSearchParams(card), redirect: 'manual', headers: { 'content-type': 'application/x-www-form-urlencoded' } });
}

export async function startCheckout(ownerId: number, plan: string): Promise<{ status: number; body: { url?: string; sessionId?: string; error?: { code: string; message: string } } }> {
  const res = await checkoutPOST(await makeRequest('/api/billing/checkout', { userId: ownerId, json: { plan } }), { params: Promise.resolve({}) });
  return { status: res.status, body: await res.json() };
}

/** Checkout and pay with the good card, then wait for the webhooks to land. */
export async function subscribe(stack: BillingStack, ownerId: number, workspaceId: number, plan: 'bench' | 'lab') {
  const started = await startCheckout(ownerId, plan);
  expect(started.status, JSON.stringify(started.body)).toBe(201);
  const paid = await submitCard(started.body.url!, SUCCESS_CARD);
  expect(paid.status).toBe(303);
  expect(await stack.fake.webhooks.idle()).toBe(true);
  const row = await Subscription.findOne({ where: { workspaceId } });
  expect(row?.plan).toBe(plan);
  return { sessionId: started.body.sessionId!, row: row! };
}
