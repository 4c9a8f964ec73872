import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Invoice, MailMessage } from '@/models';
import { POST as planPOST } from '@/app/api/billing/plan/route';
import { GET as previewGET } from '@/app/api/billing/plan/preview/route';
import { billingSummary, findInvoice, listInvoices } from '@/lib/billing/summary';
import { receiptText } from '@/lib/billing/sync';
import { AppError } from '@/lib/errors';
import { makeRequest } from '../../helpers/auth';
import { ownerWorkspace, startBillingStack, subscribe, type BillingStack } from './stack';

/**
 * What an owner sees in money before and after a plan change: the prorated amount
 * before Confirm (from the payment service's own preview), the credit a downgrade
 * leaves, invoices with their lines, and receipts in the app's formats.
 */
let stack: BillingStack;
beforeAll(async () => {
  stack = await startBillingStack();
});
afterAll(async () => {
  await stack.stop();
});

const none = { params: Promise.resolve({}) };
async function preview(userId: number, plan: string) {
  const res = await previewGET(await makeRequest(`/api/billing/plan/preview?plan=${plan}`, { userId }), none);
  return { status: res.status, body: await res.json() };
}
async function change(userId: number, plan: string) {
  const res = await planPOST(await makeRequest('/api/billing/plan', { userId, method: 'POST', json: { plan } }), none);
  expect(res.status).toBe(200);
  await stack.fake.webhooks.idle();
}

describe('plan change amounts', () => {
  it('shows the prorated amount before confirming, changes nothing by asking, and charges what it showed', async () => {
    const { ws, owner, member } = await ownerWorkspace();
    await subscribe(stack, owner.id, ws.id, 'bench');
    const before = await Invoice.count({ where: { workspaceId: ws.id } });

    const up = await preview(owner.id, 'lab');
    expect(up.status).toBe(200);
    expect(up.body.preview.kind).toBe('prorated');
    // Nearly the whole month is left: about €79 − €19 (prices from lib/plans.ts).
    expect(up.body.preview.amountDue).toBeGreaterThan(5900);
    expect(up.body.preview.amountDue).toBeLessThanOrEqual(6000);
    expect(up.body.preview.lines).toHaveLength(2);
    expect(up.body.preview.lines[0].amount).toBeLessThan(0);
    expect(await Invoice.count({ where: { workspaceId: ws.id } })).toBe(before);
    // Members cannot see or change billing.
    expect((await preview(member.id, 'lab')).status).toBe(403);
    expect((await preview(owner.id, 'gold')).status).toBe(422);

    await change(owner.id, 'lab');
    const list = await listInvoices(ws.id);
    // Proration is by the second: the charge is the preview's amount, give or take a cent of elapsed time.
    expect(Math.abs(list[0].amountPaid - up.body.preview.amountDue)).toBeLessThanOrEqual(2);
  });

  it('a downgrade shows its credit before confirming, on the billing page, on the invoice and in the receipt', async () => {
    const { ws, owner } = await ownerWorkspace();
    await subscribe(stack, owner.id, ws.id, 'lab');

    const down = await preview(owner.id, 'bench');
    expect(down.body.preview.amountDue).toBe(0);
    expect(down.body.preview.creditAfter).toBeGreaterThan(5900);
    await change(owner.id, 'bench');

    const summary = await billingSummary(ws.id);
    expect(Math.abs(summary.credit - down.body.preview.creditAfter)).toBeLessThanOrEqual(2);
    const [latest] = await listInvoices(ws.id);
    const detail = await findInvoice(ws.id, latest.id);
    expect(detail.amountPaid).toBe(0);
    expect(detail.creditAdded).toBe(summary.credit);
    expect(detail.lines.map((l) => l.proration)).toEqual([true, true]);
    expect(detail.lines[0].description).toMatch(/^Unused time on Partwise Lab after \d{1,2} [A-Z][a-z]{2} \d{4}$/);

    const mails = await MailMessage.findAll({ where: { to: owner.email, kind: 'receipt' }, order: [['id', 'ASC']] });
    const receipt = mails[mails.length - 1];
    expect(receipt.subject).toMatch(/nothing to pay, €\d+\.\d\d credit$/);
    expect(receipt.subject).not.toContain('€0.00');
    expect(receipt.text).toContain('is kept as credit and is used first on your next invoices');
    expect(receipt.text).toMatch(/Unused time on Partwise Lab after .*: −€\d+\.\d\d/);
    // The app's formats: no ISO dates, no payment-service ids, no "€-".
    expect(receipt.text).not.toMatch(/\d{4}-\d{2}-\d{2}/);
    expect(receipt.text).not.toMatch(/\b(sub|cus|in|pi)_[A-Za-z0-9]/);
    expect(receipt.text).not.toContain('€-');
    expect(receipt.text).toContain(`/studio/billing/invoices/${latest.id}`);

    // The next change uses that credit first.
    const up = await preview(owner.id, 'lab');
    expect(up.body.preview.creditUsed).toBeGreaterThan(0);
    expect(up.body.preview.amountDue).toBeLessThan(100);
  });

  it('an invoice of another workspace is not found', async () => {
    const a = await ownerWorkspace();
    const b = await ownerWorkspace();
    await subscribe(stack, a.owner.id, a.ws.id, 'bench');
    const [invoice] = await listInvoices(a.ws.id);
    await expect(findInvoice(b.ws.id, invoice.id)).rejects.toSatisfy((e) => e instanceof AppError && e.code === 'not_found');
  });

  it('receipt wording for a paid invoice with credit left over (worked example, no service involved)', () => {
    const { subject, text } = receiptText(
      {
        number: 'AB12-0003',
        amountPaid: 1900,
        currency: 'eur',
        paidAt: new Date('2026-12-02T10:00:00Z'),
        periodStart: new Date('2026-12-02T10:00:00Z'),
        periodEnd: new Date('2027-01-02T10:00:00Z'),
        startingBalance: -5000,
        endingBalance: -1000,
        lines: [{ description: 'Bench', amount: 5900, proration: false, periodStart: null, periodEnd: null }],
      },
      { workspaceName: 'Riverside', planName: 'Bench', link: 'http://localhost:3000/studio/billing/invoices/7' },
    );
    expect(subject).toBe('Partwise receipt for invoice AB12-0003: €19.00 paid');
    expect(text).toContain('Invoice AB12-0003, settled on 2 Dec 2026, for 2 Dec 2026 to 2 Jan 2027.');
    expect(text).toContain('  Bench: €59.00');
    expect(text).toContain('Credit used: €40.00.');
    expect(text).toContain('Credit left for your next invoices: €10.00.');
  });
});
