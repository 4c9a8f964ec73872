import type Stripe from 'stripe';
import { recordAudit } from '@/lib/audit';
import { enqueueMail } from '@/lib/mail';
import { DEFAULT_PLAN, getPlan } from '@/lib/plans';
import { formatDate as formatDay, formatMoney } from '@/lib/format';
import { Invoice, Subscription, Workspace } from '@/models';
import type { InvoiceLine } from '@/models/Invoice';
import { planForPrice } from './catalog';
import { ownerEmails } from './limits';

/**
 * Copies the payment service's view of a subscription or invoice into our tables.
 * Each function sets state from the object it is given (never adds to it), so
 * applying the same object twice changes nothing the second time.
 */

/** Subscription statuses after which the workspace is back on the free plan. */
const ENDED = new Set(['canceled', 'incomplete_expired', 'unpaid']);
const IN_FORCE = new Set(['active', 'trialing', 'past_due']);

type AnyRecord = Record<string, unknown>;
const toDate = (s: unknown) => (typeof s === 'number' ? new Date(s * 1000) : null);
const idOf = (v: unknown): string | null => (typeof v === 'string' ? v : v && typeof v === 'object' && 'id' in v ? String((v as { id: unknown }).id) : null);

/** The local subscription row a payment-service customer belongs to. */
export async function subscriptionRowForCustomer(customerRef: string | null, workspaceHint?: string | null): Promise<Subscription | null> {
  if (customerRef) {
    const row = await Subscription.findOne({ where: { customerRef } });
    if (row) return row;
  }
  // A customer we have not linked yet: trust the signed metadata only for a workspace without a customer.
  const workspaceId = Number(workspaceHint);
  if (!Number.isInteger(workspaceId) || workspaceId <= 0 || !(await Workspace.findByPk(workspaceId))) return null;
  const row = await Subscription.findOne({ where: { workspaceId } });
  if (row && row.customerRef && row.customerRef !== customerRef) return null;
  if (row) return row.update({ customerRef });
  return Subscription.create({ workspaceId, plan: DEFAULT_PLAN, status: 'active', customerRef });
}

export interface SyncOutcome {
  workspaceId: number;
  from: string;
  to: string;
  changed: boolean;
  ignored?: string;
  /** A different subscription that was in force and that this one replaced (to be ended). */
  replaced?: string;
}

export async function syncSubscription(sub: Stripe.Subscription, context: { actor?: { id: number; email: string } | null; source: string; request?: Request }): Promise<SyncOutcome | null> {
  const row = await subscriptionRowForCustomer(idOf(sub.customer), sub.metadata?.workspaceId);
  if (!row) return null;
  const item = sub.items?.data?.[0] as (Stripe.SubscriptionItem & AnyRecord) | undefined;
  const legacy = sub as unknown as AnyRecord;
  const pricePlan = planForPrice(item?.price);
  const ended = ENDED.has(sub.status);
  // The owner's request and the webhook it triggers may apply the same object at once:
  // update only from the state we read, so exactly one of them records the change.
  for (let attempt = 0; ; attempt++) {
    const from = { plan: row.plan, status: row.status };
    // An older subscription's news never overrides a newer one that is in force.
    if (row.subscriptionRef && row.subscriptionRef !== sub.id && IN_FORCE.has(row.status) && !IN_FORCE.has(sub.status)) {
      return { workspaceId: row.workspaceId, from: from.plan, to: from.plan, changed: false, ignored: 'an older subscription' };
    }
    const plan = ended ? DEFAULT_PLAN : pricePlan ?? row.plan;
    const replaced = row.subscriptionRef && row.subscriptionRef !== sub.id && IN_FORCE.has(row.status) && IN_FORCE.has(sub.status) ? row.subscriptionRef : undefined;
    const values = {
      plan,
      status: ended ? 'canceled' : sub.status,
      subscriptionRef: sub.id,
      currentPeriodStart: toDate(item?.current_period_start ?? legacy.current_period_start),
      currentPeriodEnd: toDate(item?.current_period_end ?? legacy.current_period_end),
      cancelAtPeriodEnd: !ended && Boolean(sub.cancel_at_period_end),
    };
    const [updated] = await Subscription.update(values, { where: { id: row.id, plan: from.plan, status: from.status } });
    if (updated !== 1 && attempt < 5) {
      await row.reload();
      continue;
    }
    await row.reload();
    const changed = updated === 1 && (from.plan !== plan || from.status !== values.status);
    if (updated === 1 && from.plan !== plan) {
      await recordAudit({
        action: 'billing.plan_changed',
        actor: context.actor ?? null,
        workspaceId: row.workspaceId,
        targetType: 'subscription',
        targetId: sub.id,
        detail: { from: from.plan, to: plan, status: sub.status, source: context.source },
        request: context.request,
      });
    }
    return { workspaceId: row.workspaceId, from: from.plan, to: plan, changed, ...(updated === 1 && replaced ? { replaced } : {}) };
  }
}

function invoiceSubscriptionRef(inv: Stripe.Invoice): string | null {
  const raw = inv as unknown as AnyRecord;
  const parent = raw.parent as { subscription_details?: { subscription?: unknown } } | null | undefined;
  return idOf(parent?.subscription_details?.subscription) ?? idOf(raw.subscription);
}

/** Upsert an invoice; a paid one gets its receipt e-mailed once. */
export async function syncInvoice(inv: Stripe.Invoice): Promise<Invoice | null> {
  const row = await subscriptionRowForCustomer(idOf(inv.customer), null);
  if (!row) return null;
  const values = {
    workspaceId: row.workspaceId,
    invoiceRef: inv.id!,
    number: inv.number ?? null,
    amountDue: inv.amount_due,
    amountPaid: inv.amount_paid,
    currency: inv.currency,
    status: inv.status ?? 'draft',
    periodStart: toDate(inv.period_start),
    periodEnd: toDate(inv.period_end),
    paidAt: toDate(inv.status_transitions?.paid_at),
    subtotal: inv.subtotal ?? null,
    startingBalance: inv.starting_balance ?? 0,
    endingBalance: inv.ending_balance ?? 0,
    lines: invoiceLines(inv),
  };
  const existing = await Invoice.findOne({ where: { invoiceRef: values.invoiceRef } });
  let invoice: Invoice;
  if (existing) invoice = await existing.update(values);
  else {
    try {
      invoice = await Invoice.create(values);
    } catch {
      // A concurrent delivery created it first.
      invoice = (await Invoice.findOne({ where: { invoiceRef: values.invoiceRef } }))!;
      await invoice.update(values);
    }
  }
  if (invoice.status === 'paid') await sendReceipt(invoice);
  return invoice;
}

/** The invoice's lines as we keep them (no payment-service ids). */
export function invoiceLines(inv: Stripe.Invoice): InvoiceLine[] {
  return (inv.lines?.data ?? []).map((l) => {
    const raw = l as unknown as { proration?: boolean; parent?: { subscription_item_details?: { proration?: boolean } } };
    return {
      description: l.description ?? '',
      amount: l.amount,
      proration: !!(raw.proration ?? raw.parent?.subscription_item_details?.proration),
      periodStart: toDate(l.period?.start)?.toISOString() ?? null,
      periodEnd: toDate(l.period?.end)?.toISOString() ?? null,
    };
  });
}

async function sendReceipt(invoice: Invoice): Promise<void> {
  // Claim first: only one delivery of the "paid" news sends the receipt.
  const [claimed] = await Invoice.update({ receiptSentAt: new Date() }, { where: { id: invoice.id, receiptSentAt: null } });
  if (claimed !== 1) return;
  const [workspace, sub, to] = await Promise.all([Workspace.findByPk(invoice.workspaceId), Subscription.findOne({ where: { workspaceId: invoice.workspaceId } }), ownerEmails(invoice.workspaceId)]);
  const { subject, text } = receiptText(invoice, { workspaceName: workspace?.name ?? 'your workspace', planName: getPlan(sub?.plan).name, link: appLink(`/studio/billing/invoices/${invoice.id}`) });
  for (const address of to) await enqueueMail({ to: address, subject, text, kind: 'receipt' });
}

function appLink(path: string): string {
  return new URL(path, process.env.NEXTAUTH_URL ?? 'http://localhost:3000').toString();
}

/**
 * The receipt in the app's own formats: amounts as "−€78.98", days as "2 Dec 2026",
 * no payment-service ids. An invoice that charged nothing says so and names the
 * credit it left instead of thanking for "€0.00".
 */
export function receiptText(invoice: Pick<Invoice, 'number' | 'amountPaid' | 'currency' | 'paidAt' | 'periodStart' | 'periodEnd' | 'startingBalance' | 'endingBalance' | 'lines'>, ctx: { workspaceName: string; planName: string; link: string }): { subject: string; text: string } {
  const money = (cents: number) => formatMoney(cents, invoice.currency);
  const number = invoice.number ? `invoice ${invoice.number}` : 'your invoice';
  const credit = -invoice.endingBalance;
  const creditUsed = Math.max(0, -invoice.startingBalance) - Math.max(0, credit);
  const lines = parseLines(invoice.lines);
  const body = [
    invoice.amountPaid > 0
      ? `Thank you — we received ${money(invoice.amountPaid)} for ${ctx.workspaceName}.`
      : `Nothing was charged for ${ctx.workspaceName}: ${credit > 0 ? `${money(credit)} is kept as credit and is used first on your next invoices.` : 'the amount due was zero.'}`,
    `${number[0].toUpperCase()}${number.slice(1)}, ${invoice.paidAt ? `settled on ${formatDay(invoice.paidAt)}, ` : ''}for ${formatDay(invoice.periodStart)} to ${formatDay(invoice.periodEnd)}.`,
    lines.length ? lines.map((l) => `  ${l.description}: ${money(l.amount)}`).join('\n') : '',
    creditUsed > 0 ? `Credit used: ${money(creditUsed)}.` : '',
    invoice.amountPaid > 0 && credit > 0 ? `Credit left for your next invoices: ${money(credit)}.` : '',
    `Plan: ${ctx.planName}.`,
    `The invoice with every line, ready to print or save as PDF: ${ctx.link}`,
  ]
    .filter(Boolean)
    .join('\n\n');
  const subject = invoice.amountPaid > 0 ? `Partwise receipt for ${number}: ${money(invoice.amountPaid)} paid` : `Partwise ${number}: nothing to pay${credit > 0 ? `, ${money(credit)} credit` : ''}`;
  return { subject, text: body };
}

function parseLines(lines: unknown): InvoiceLine[] {
  const value = typeof lines === 'string' ? JSON.parse(lines) : lines;
  return Array.isArray(value) ? (value as InvoiceLine[]) : [];
}
