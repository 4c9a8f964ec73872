import path from 'node:path';
import { startPaymentsFake } from './server';

/** The payment-service fake as an `npm start` / `npm test` service (see scripts/services.ts). */
export const WEBHOOK_ROUTE = '/api/webhooks/payments';

export const paymentsService = {
  name: 'payments',
  async start({ dataDir, appUrl }: { dataDir: string; appUrl: string }) {
    // PAYMENTS_FAKE=0: the STRIPE_* variables already point at a real payment service.
    if (process.env.PAYMENTS_FAKE === '0') return { name: 'payments', env: {}, stop: async () => undefined };
    const fake = await startPaymentsFake({
      port: Number(process.env.PAYMENTS_FAKE_PORT ?? 0),
      // Stable keys across restarts of `npm start`, so the records in the state file stay usable.
      secretKey: process.env.STRIPE_SECRET_KEY?.startsWith('sk_test_') ? process.env.STRIPE_SECRET_KEY : 'sk_test_partwise_local_fake',
      webhookSecret: process.env.STRIPE_WEBHOOK_SECRET?.startsWith('whsec_') ? process.env.STRIPE_WEBHOOK_SECRET : 'whsec_partwise_local_fake_signing_secret',
      webhookUrl: new URL(WEBHOOK_ROUTE, appUrl).toString(),
      stateFile: path.join(dataDir, 'payments-fake.json'),
      retryBaseMs: 2000,
      maxAttempts: 10,
    });
    console.log(`[payments-fake] listening on ${fake.url}, webhooks to ${new URL(WEBHOOK_ROUTE, appUrl)}`);
    return { name: 'payments', env: fake.env(), stop: () => fake.stop() };
  },
};
