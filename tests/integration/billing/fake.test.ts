import fs from 'node:fs';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import Stripe from 'stripe';
import { controlHeaders, parseForm, startPaymentsFake, type PaymentsFake } from '@/lib/fakes/payments';
import { addMonth, luhnValid } from '@/lib/fakes/payments/state';

/** The fake on its own: request decoding, auth, idempotency, webhook retries and controls. */
describe('form decoding as the SDK encodes', () => {
  it('turns bracketed keys into nested objects and arrays', () => {
    const body = 'mode=subscription&line_items[0][price]=price_1&line_items[0][quantity]=1&metadata[plan]=bench&subscription_data[metadata][workspaceId]=7&expand[0]=a&expand[1]=b';
    expect(parseForm(body)).toEqual({
      mode: 'subscription',
      line_items: [{ price: 'price_1', quantity: '1' }],
      metadata: { plan: 'bench' },
      subscription_data: { metadata: { workspaceId: '7' } },
      expand: ['a', 'b'],
    });
    expect(parseForm(new URLSearchParams({ 'a[b]': 'x y&z' }).toString())).toEqual({ a: { b: 'x y&z' } });
  });

  it('checks card numbers and adds calendar months', () => {
    expect(luhnValid('4242424242424242')).toBe(true);
    expect(luhnValid('4000000000000002')).toBe(true);
    expect(luhnValid('4242424242424241')).toBe(false);
    const jan31 = Date.UTC(2027, 0, 31) / 1000;
    expect(new Date(addMonth(jan31) * 1000).toISOString().slice(0, 10)).toBe('2027-02-28');
    expect(new Date(addMonth(Date.UTC(2027, 11, 15) / 1000) * 1000).toISOString().slice(0, 10)).toBe('2028-01-15');
  });
});

describe('the fake across restarts', () => {
  it('keeps customers, prices and subscriptions in its state file', async () => {
    const stateFile = path.join(os.tmpdir(), `payments-fake-${process.pid}-${Date.now()}.json`);
    const first = await startPaymentsFake({ stateFile, secretKey: 'sk_test_restart' });
    const client = new Stripe('sk_test_restart', { host: first.host, port: first.port, protocol: 'http', maxNetworkRetries: 0 });
    const customer = await client.customers.create({ email: 'kept@club.test' });
    const price = await client.prices.create({ currency: 'eur', unit_amount: 500, recurring: { interval: 'month' }, product_data: { name: 'Kept' }, lookup_key: 'kept' });
    await first.stop();
    const second = await startPaymentsFake({ stateFile, secretKey: 'sk_test_restart' });
    const again = new Stripe('sk_test_restart', { host: second.host, port: second.port, protocol: 'http', maxNetworkRetries: 0 });
    expect((await again.customers.retrieve(customer.id)) as { email: string }).toMatchObject({ email: 'kept@club.test' });
    expect((await again.prices.list({ lookup_keys: ['kept'] })).data[0].id).toBe(price.id);
    await second.stop();
    fs.rmSync(stateFile, { force: true });
  });
});

describe('the fake as an HTTP service', () => {
  let fake: PaymentsFake;
  let target: http.Server;
  const received: { signature: string; body: string }[] = [];
  let failFirst = 0;

  beforeAll(async () => {
    target = http.createServer(async (req, res) => {
      const chunks: Buffer[] = [];
      for await (const c of req) chunks.push(c as Buffer);
      if (failFirst > 0) {
        failFirst--;
        res.writeHead(500).end('down');
        return;
      }
      received.push({ signature: String(req.headers['stripe-signature']), body: Buffer.concat(chunks).toString() });
      res.writeHead(200).end('{}');
    });
    await new Promise<void>((r) => target.listen(0, '127.0.0.1', () => r()));
    fake = await startPaymentsFake({ webhookUrl: `http://localhost:${(target.address() as AddressInfo).port}/hook`, retryBaseMs: 30, maxAttempts: 4 });
  });
  afterAll(async () => {
    await fake.stop();
    target.close();
  });

  const sdk = () => new Stripe(fake.secretKey, { host: fake.host, port: fake.port, protocol: 'http', maxNetworkRetries: 0, telemetry: false });

  it('refuses a wrong API key the way the SDK understands', async () => {
    const wrong = new Stripe('sk_test_wrong', { host: fake.host, port: fake.port, protocol: 'http', maxNetworkRetries: 0 });
    await expect(wrong.customers.create({ email: 'a@b.test' })).rejects.toMatchObject({ type: 'StripeAuthenticationError' });
  });

  it('answers the SDK with objects it can use, and 404s unknown ids with resource_missing', async () => {
    const client = sdk();
    const customer = await client.customers.create({ email: 'rider@club.test', metadata: { workspaceId: '3' } });
    expect(customer).toMatchObject({ object: 'customer', email: 'rider@club.test', metadata: { workspaceId: '3' } });
    const price = await client.prices.create({ currency: 'eur', unit_amount: 1900, recurring: { interval: 'month' }, product_data: { name: 'Test plan' }, lookup_key: 'k1' });
    expect((await client.prices.list({ lookup_keys: ['k1'] })).data.map((p) => p.id)).toEqual([price.id]);
    await expect(client.prices.create({ currency: 'eur', unit_amount: 100, product_data: { name: 'x' }, lookup_key: 'k1' })).rejects.toMatchObject({ type: 'StripeInvalidRequestError' });
    await expect(client.subscriptions.retrieve('sub_nothing')).rejects.toMatchObject({ type: 'StripeInvalidRequestError', statusCode: 404, code: 'resource_missing' });
    const session = await client.checkout.sessions.create({ mode: 'subscription', customer: customer.id, line_items: [{ price: price.id, quantity: 1 }], success_url: 'http://x.test/ok?s={CHECKOUT_SESSION_ID}' });
    expect(session.url).toBe(`${fake.url}/pay/${session.id}`);
    expect(session.amount_total).toBe(1900);
  });

  it('replays a POST with the same idempotency key instead of acting twice', async () => {
    const client = sdk();
    const a = await client.customers.create({ email: 'once@club.test' }, { idempotencyKey: 'same-key' });
    const b = await client.customers.create({ email: 'once@club.test' }, { idempotencyKey: 'same-key' });
    expect(b.id).toBe(a.id);
    expect([...fake.state.customers.values()].filter((c) => c.email === 'once@club.test')).toHaveLength(1);
  });

  it('retries a failing webhook endpoint with backoff until it answers 2xx, signing every attempt', async () => {
    failFirst = 2;
    const before = received.length;
    const customer = await sdk().customers.create({ email: 'retry@club.test' });
    expect(await fake.webhooks.idle(5000)).toBe(true);
    const event = fake.state.events.find((e) => e.type === 'customer.created' && (e.data.object as { id: string }).id === customer.id)!;
    const delivery = fake.webhooks.deliveries.get(event.id)!;
    expect(delivery.state).toBe('delivered');
    expect(delivery.attempts.map((a) => a.status)).toEqual([500, 500, 200]);
    const gaps = delivery.attempts.slice(1).map((a, i) => Date.parse(a.at) - Date.parse(delivery.attempts[i].at));
    expect(gaps[1]).toBeGreaterThanOrEqual(gaps[0]);
    const got = received.slice(before).find((r) => r.body.includes(event.id))!;
    expect(Stripe.webhooks.constructEvent(got.body, got.signature, fake.webhookSecret).id).toBe(event.id);
  });

  it('gives up after the last attempt and records the failure; a replay can still deliver it', async () => {
    failFirst = 10;
    const customer = await sdk().customers.create({ email: 'gives-up@club.test' });
    await fake.webhooks.idle(5000);
    const event = fake.state.events.find((e) => (e.data.object as { id: string }).id === customer.id)!;
    expect(fake.webhooks.deliveries.get(event.id)!.state).toBe('failed');
    expect(fake.webhooks.deliveries.get(event.id)!.attempts).toHaveLength(4);
    failFirst = 0;
    const replay = await (await fetch(`${fake.url}/_test/events/${event.id}/replay`, { method: 'POST', headers: controlHeaders(fake.controlKey) })).json();
    expect(replay.attempt.status).toBe(200);
    expect(fake.webhooks.deliveries.get(event.id)!.state).toBe('delivered');
  });

  it('refuses every test control without the per-run control key, doing nothing', async () => {
    const customer = await sdk().customers.create({ email: 'locked@club.test' });
    const event = fake.state.events.find((e) => (e.data.object as { id: string }).id === customer.id)!;
    const price = await sdk().prices.create({ currency: 'eur', unit_amount: 500, recurring: { interval: 'month' }, product_data: { name: 'Locked plan' } });
    const session = await sdk().checkout.sessions.create({ mode: 'subscription', customer: customer.id, line_items: [{ price: price.id, quantity: 1 }], success_url: 'http://x.test/ok' });
    const card = JSON.stringify({ number: '4242 4242 4242 4242', expiry: '12 / 34', cvc: '123' });
    const calls: [string, string, string?][] = [
      ['GET', '/_test/events'],
      ['GET', `/_test/events/${event.id}`],
      ['POST', `/_test/events/${event.id}/replay`],
      ['POST', '/_test/fail-next', JSON.stringify({ count: 5 })],
      ['POST', '/_test/slow-next', JSON.stringify({ ms: 5000 })],
      ['POST', '/_test/webhooks/pause'],
      ['POST', `/_test/checkout/${session.id}/pay`, card],
      ['POST', '/_test/subscriptions/sub_anything/end-period'],
    ];
    const wrongKeys: Record<string, string>[] = [{}, controlHeaders('ctl_guess'), controlHeaders(`${fake.controlKey}x`), { authorization: `Bearer ${fake.secretKey}` }];
    for (const [method, path, body] of calls) {
      for (const headers of wrongKeys) {
        const res = await fetch(`${fake.url}${path}`, { method, headers, body });
        expect(res.status, `${method} ${path} with ${JSON.stringify(headers)}`).toBe(401);
        expect(JSON.stringify(await res.json())).not.toContain('"data"');
      }
    }
    // Nothing happened: the checkout is still open, API calls neither fail nor wait, webhooks flow.
    expect(fake.state.presentSession(fake.state.session(session.id)).status).toBe('open');
    const started = Date.now();
    await sdk().customers.create({ email: 'after@club.test' });
    expect(Date.now() - started).toBeLessThan(4000);
    expect(await fake.webhooks.idle(5000)).toBe(true);
    // With the key the same control answers.
    expect((await fetch(`${fake.url}/_test/events`, { headers: controlHeaders(fake.controlKey) })).status).toBe(200);
    expect(fake.env().PAYMENTS_FAKE_CONTROL_KEY).toBe(fake.controlKey);
    expect(fake.controlKey).toMatch(/^ctl_[0-9a-f]{48}$/);
  });

  it('test controls: failing and slow next calls, event list', async () => {
    await fetch(`${fake.url}/_test/fail-next`, { method: 'POST', headers: controlHeaders(fake.controlKey), body: JSON.stringify({ count: 1, status: 503 }) });
    await expect(sdk().customers.create({})).rejects.toMatchObject({ statusCode: 503 });
    await fetch(`${fake.url}/_test/slow-next`, { method: 'POST', headers: controlHeaders(fake.controlKey), body: JSON.stringify({ ms: 300 }) });
    const started = Date.now();
    await sdk().customers.create({});
    expect(Date.now() - started).toBeGreaterThanOrEqual(280);
    const list = await (await fetch(`${fake.url}/_test/events`, { headers: controlHeaders(fake.controlKey) })).json();
    expect(list.data.length).toBeGreaterThan(3);
    expect(list.data[0]).toHaveProperty('delivery');
  });
});
