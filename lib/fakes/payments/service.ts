import path from 'node:path';
import { KNOWN_PAYMENT_KEYS, KNOWN_WEBHOOK_SECRETS, isKnownSecret } from '@/lib/server/known-secrets';
import { startPaymentsFake } from './server';

/** The payment-service fake as an `npm start` / `npm test` service (see scripts/services.ts). */
export const WEBHOOK_ROUTE = '/api/webhooks/payments';

/** A key from the environment of the right kind, never one published in the source; undefined = random. */
function ownKey(value: string | undefined, prefix: string, known: readonly string[]): string | undefined {
  return value?.startsWith(prefix) && !isKnownSecret(known, value) ? value : undefined;
}

export const paymentsService = {
  name: 'payments',
  async start({ dataDir, appUrl }: { dataDir: string; appUrl: string }) {
    // PAYMENTS_FAKE=0: the STRIPE_* variables already point at a real payment service.
    if (process.env.PAYMENTS_FAKE === '0') return { name: 'payments', env: {}, stop: async () => undefined };
    const fake = await startPaymentsFake({
      port: Number(process.env.PAYMENTS_FAKE_PORT ?? 0),
      // New random keys each start unless the environment brings its own test keys: the app
      // gets them from fake.env() at every start, and the state file holds no key.
      secretKey: ownKey(process.env.STRIPE_SECRET_KEY, 'sk_test_', KNOWN_PAYMENT_KEYS),
      webhookSecret: ownKey(process.env.STRIPE_WEBHOOK_SECRET, 'whsec_', KNOWN_WEBHOOK_SECRETS),
      webhookUrl: new URL(WEBHOOK_ROUTE, appUrl).toString(),
      stateFile: path.join(dataDir, 'payments-fake.json'),
      retryBaseMs: 2000,
      maxAttempts: 10,
    });
    console.log(`[payments-fake] listening on ${fake.url}, webhooks to ${new URL(WEBHOOK_ROUTE, appUrl)}`);
    return { name: 'payments', env: fake.env(), stop: () => fake.stop() };
  },
};
