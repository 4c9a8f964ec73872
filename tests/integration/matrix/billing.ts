import type { MatrixRow } from './types';

/**
 * Billing: owners only; staff never reach billing (they belong to no workspace).
 * Owner rows that call the payment service accept 503 too: this matrix runs both
 * with the test stack's fake (npm test) and without any payment service configured.
 */
const ownersOnly = (owner: number | number[]) => ({ visitor: 401, member: 403, owner, staff: 403, outsider: owner });

export const rows: MatrixRow[] = [
  {
    file: 'app/api/billing/checkout/route.ts',
    method: 'POST',
    url: () => '/api/billing/checkout',
    body: () => ({ plan: 'bench' }),
    expect: ownersOnly([201, 503]),
    note: 'starts a hosted checkout; 503 when no payment service is configured',
  },
  {
    file: 'app/api/billing/checkout/[sessionId]/route.ts',
    method: 'GET',
    url: () => '/api/billing/checkout/cs_test_matrixnotasession',
    params: () => ({ sessionId: 'cs_test_matrixnotasession' }),
    expect: ownersOnly(404),
    note: 'a session of no customer of the caller is not found',
  },
  {
    file: 'app/api/billing/plan/route.ts',
    method: 'POST',
    url: () => '/api/billing/plan',
    body: () => ({ plan: 'bench' }),
    expect: ownersOnly(409),
    note: 'the world has no paid subscription, so a change is a conflict after the role check',
  },
  {
    file: 'app/api/billing/plan/preview/route.ts',
    method: 'GET',
    url: () => '/api/billing/plan/preview?plan=bench',
    expect: ownersOnly(200),
    note: 'without a paid subscription the preview is the checkout price, read without the payment service',
  },
  {
    file: 'app/api/billing/cancel/route.ts',
    method: 'POST',
    url: () => '/api/billing/cancel',
    expect: ownersOnly(409),
    note: 'nothing to cancel in the world',
  },
  {
    file: 'app/api/billing/resume/route.ts',
    method: 'POST',
    url: () => '/api/billing/resume',
    expect: ownersOnly(409),
    note: 'nothing to resume in the world',
  },
  {
    file: 'app/api/billing/self-service/route.ts',
    method: 'POST',
    url: () => '/api/billing/self-service',
    expect: ownersOnly([201, 409, 503]),
    note: '409 without a customer yet; 201 once the checkout row above made one (with the stack fake), 503 without a payment service',
  },
  { file: 'app/api/billing/invoices/route.ts', method: 'GET', url: () => '/api/billing/invoices', expect: ownersOnly(200) },
  { file: 'app/api/billing/usage/route.ts', method: 'GET', url: () => '/api/billing/usage', expect: ownersOnly(200) },
  {
    file: 'app/api/webhooks/payments/route.ts',
    method: 'POST',
    url: () => '/api/webhooks/payments',
    body: () => ({ id: 'evt_unsigned', type: 'invoice.paid' }),
    expect: { visitor: 400, member: 400, owner: 400, staff: 400, outsider: 400 },
    note: 'public endpoint for the payment service; the signature, not a session, decides, so unsigned is 400 for everyone',
  },
];
