/**
 * The payment fake as `npm start` runs it (lib/fakes/payments/service.ts) makes new
 * random keys each start instead of the fixed ones it once had, never adopts a key
 * published in the source from the environment, and a webhook signed with the old
 * fixed secret is refused by the app's webhook route.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { POST as webhookPOST } from '@/app/api/webhooks/payments/route';
import { signPayload } from '@/lib/fakes/payments';
import { paymentsService } from '@/lib/fakes/payments/service';
import { KNOWN_PAYMENT_KEYS, KNOWN_WEBHOOK_SECRETS } from '@/lib/server/known-secrets';

const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'partwise-fake-secrets-'));
const saved = { key: process.env.STRIPE_SECRET_KEY, webhook: process.env.STRIPE_WEBHOOK_SECRET };
afterAll(() => {
  fs.rmSync(dataDir, { recursive: true, force: true });
  if (saved.key === undefined) delete process.env.STRIPE_SECRET_KEY;
  else process.env.STRIPE_SECRET_KEY = saved.key;
  if (saved.webhook === undefined) delete process.env.STRIPE_WEBHOOK_SECRET;
  else process.env.STRIPE_WEBHOOK_SECRET = saved.webhook;
});

async function startOnce() {
  const running = await paymentsService.start({ dataDir, appUrl: 'http://127.0.0.1:9' });
  const env = { ...running.env };
  await running.stop();
  return env;
}

describe('the payment fake started by npm start', () => {
  it('makes new random keys each start, never the old fixed ones', async () => {
    delete process.env.STRIPE_SECRET_KEY;
    delete process.env.STRIPE_WEBHOOK_SECRET;
    const first = await startOnce();
    const second = await startOnce();
    for (const env of [first, second]) {
      expect(env.STRIPE_SECRET_KEY).toMatch(/^sk_test_[0-9a-f]{36}$/);
      expect(env.STRIPE_WEBHOOK_SECRET).toMatch(/^whsec_[0-9a-f]{48}$/);
      expect(KNOWN_PAYMENT_KEYS).not.toContain(env.STRIPE_SECRET_KEY);
      expect(KNOWN_WEBHOOK_SECRETS).not.toContain(env.STRIPE_WEBHOOK_SECRET);
    }
    expect(second.STRIPE_SECRET_KEY).not.toBe(first.STRIPE_SECRET_KEY);
    expect(second.STRIPE_WEBHOOK_SECRET).not.toBe(first.STRIPE_WEBHOOK_SECRET);
  });

  it('keeps test keys of your own from the environment, but not ones published in the source', async () => {
    process.env.STRIPE_SECRET_KEY = 'sk_test_partwise_local_fake';
    process.env.STRIPE_WEBHOOK_SECRET = 'whsec_partwise_local_fake_signing_secret';
    const env = await startOnce();
    expect(env.STRIPE_SECRET_KEY).not.toBe('sk_test_partwise_local_fake');
    expect(env.STRIPE_WEBHOOK_SECRET).not.toBe('whsec_partwise_local_fake_signing_secret');
    process.env.STRIPE_SECRET_KEY = 'sk_test_mine_0123456789';
    process.env.STRIPE_WEBHOOK_SECRET = 'whsec_mine_0123456789';
    expect(await startOnce()).toMatchObject({ STRIPE_SECRET_KEY: 'sk_test_mine_0123456789', STRIPE_WEBHOOK_SECRET: 'whsec_mine_0123456789' });
  });

  it("leaves a webhook signed with the old fixed secret refused by the app", async () => {
    delete process.env.STRIPE_SECRET_KEY;
    delete process.env.STRIPE_WEBHOOK_SECRET;
    Object.assign(process.env, await startOnce());
    const payload = JSON.stringify({ id: 'evt_forged', object: 'event', type: 'customer.subscription.created', data: { object: { id: 'sub_forged', metadata: { workspaceId: '1', plan: 'lab' } } } });
    const res = await webhookPOST(
      new Request('http://localhost:3000/api/webhooks/payments', { method: 'POST', headers: { 'content-type': 'application/json', 'stripe-signature': signPayload(payload, 'whsec_partwise_local_fake_signing_secret') }, body: payload }),
      { params: Promise.resolve({}) },
    );
    expect(res.status).toBe(400);
  });
});
