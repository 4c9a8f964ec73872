import type Stripe from 'stripe';
import { UniqueConstraintError } from 'sequelize';
import { recordAudit } from '@/lib/audit';
import { AppError } from '@/lib/errors';
import { WebhookEvent } from '@/models';
import { paymentsClient, paymentsError, webhookSecret } from './client';
import { syncInvoice, syncSubscription, type SyncOutcome } from './sync';

/**
 * Payment-service events → our subscription, plan and invoices. The signature is
 * checked against the raw body; each event id is claimed once in webhook_events, so
 * duplicates and replays are acknowledged without doing anything. Handlers fetch the
 * current object from the service rather than trusting the event's snapshot, which
 * also makes out-of-order deliveries harmless.
 */
export interface WebhookResult {
  received: true;
  eventId: string;
  type: string;
  duplicate: boolean;
  handled: boolean;
}

export function verifyEvent(rawBody: string, signature: string | null): Stripe.Event {
  if (!signature) throw new AppError('bad_request', 'The Stripe-Signature header is missing.');
  const secret = webhookSecret();
  try {
    return paymentsClient().webhooks.constructEvent(rawBody, signature, secret);
  } catch (e) {
    throw new AppError('bad_request', `The webhook signature could not be verified: ${(e as Error).message.split('\n')[0]}`, { cause: e });
  }
}

const SUBSCRIPTION_EVENTS = new Set(['customer.subscription.created', 'customer.subscription.updated', 'customer.subscription.deleted', 'customer.subscription.paused', 'customer.subscription.resumed']);
const INVOICE_EVENTS = new Set(['invoice.paid', 'invoice.payment_succeeded', 'invoice.payment_failed', 'invoice.finalized', 'invoice.voided', 'invoice.marked_uncollectible', 'invoice.updated']);

async function apply(event: Stripe.Event): Promise<{ handled: boolean; workspaceId: number | null; outcome?: SyncOutcome | null }> {
  const client = paymentsClient();
  const object = event.data.object as { id?: string; subscription?: unknown; object?: string };
  const source = `webhook ${event.type}`;
  try {
    if (event.type === 'checkout.session.completed') {
      const session = event.data.object as Stripe.Checkout.Session;
      const subId = typeof session.subscription === 'string' ? session.subscription : session.subscription?.id;
      if (!subId) return { handled: false, workspaceId: null };
      const outcome = await syncSubscription(await client.subscriptions.retrieve(subId), { source });
      await endReplaced(client, outcome);
      return { handled: !!outcome, workspaceId: outcome?.workspaceId ?? null, outcome };
    }
    if (SUBSCRIPTION_EVENTS.has(event.type) && object.id) {
      const outcome = await syncSubscription(await client.subscriptions.retrieve(object.id), { source });
      await endReplaced(client, outcome);
      return { handled: !!outcome, workspaceId: outcome?.workspaceId ?? null, outcome };
    }
    if (INVOICE_EVENTS.has(event.type) && object.id) {
      const invoice = await syncInvoice(await client.invoices.retrieve(object.id));
      return { handled: !!invoice, workspaceId: invoice?.workspaceId ?? null };
    }
  } catch (e) {
    throw paymentsError(e, `processing the ${event.type} event`);
  }
  return { handled: false, workspaceId: null };
}

/**
 * Two checkouts paid one after the other leave two live subscriptions; the newer one
 * is what the owner chose last, so the older one ends at once instead of billing on.
 */
async function endReplaced(client: Stripe, outcome: SyncOutcome | null) {
  if (!outcome?.replaced) return;
  try {
    await client.subscriptions.cancel(outcome.replaced);
    await recordAudit({ action: 'billing.subscription_replaced', workspaceId: outcome.workspaceId, targetType: 'subscription', targetId: outcome.replaced, detail: { plan: outcome.to } });
  } catch (e) {
    // The newer plan is already in force; support sees the audit entry and ends the old one by hand.
    console.error('[billing] could not end replaced subscription', outcome.replaced, e);
    await recordAudit({ action: 'billing.subscription_replace_failed', workspaceId: outcome.workspaceId, targetType: 'subscription', targetId: outcome.replaced, detail: { error: String((e as Error).message).slice(0, 200) } });
  }
}

export async function processWebhook(rawBody: string, signature: string | null, request?: Request): Promise<WebhookResult> {
  const event = verifyEvent(rawBody, signature);
  const base = { received: true as const, eventId: event.id, type: event.type };
  // Claim the event id first; whoever inserts the row does the work.
  let claim: WebhookEvent;
  try {
    claim = await WebhookEvent.create({ eventRef: event.id, type: event.type, processedAt: new Date() });
  } catch (e) {
    if (e instanceof UniqueConstraintError) return { ...base, duplicate: true, handled: false };
    throw e;
  }
  let result: Awaited<ReturnType<typeof apply>>;
  try {
    result = await apply(event);
  } catch (e) {
    // Give the claim back so the service's retry can do the work.
    await claim.destroy().catch(() => undefined);
    throw e;
  }
  await claim.update({ processedAt: new Date() });
  await recordAudit({
    action: 'billing.webhook_processed',
    workspaceId: result.workspaceId,
    targetType: 'webhook_event',
    targetId: event.id,
    detail: { type: event.type, handled: result.handled, ...(result.outcome ? { plan: result.outcome.to, planChanged: result.outcome.from !== result.outcome.to } : {}) },
    request,
  });
  return { ...base, duplicate: false, handled: result.handled };
}
