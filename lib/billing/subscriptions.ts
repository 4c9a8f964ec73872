import { recordAudit } from '@/lib/audit';
import type { WorkspaceActor } from '@/lib/auth/guard';
import { AppError } from '@/lib/errors';
import { DEFAULT_PLAN, PLANS, type PlanId } from '@/lib/plans';
import { Subscription } from '@/models';
import { callPayments } from './client';
import { PAID_PLANS, priceIdForPlan } from './catalog';
import { syncInvoice, syncSubscription } from './sync';

/**
 * What an owner can do to the workspace's plan: start a checkout for a paid plan,
 * switch between paid plans (the payment service prorates), move to the free plan
 * (the subscription ends with its period), or take that back.
 */
const IN_FORCE = new Set(['active', 'trialing', 'past_due']);

export function appBaseUrl(request: Request): string {
  return (process.env.NEXTAUTH_URL ?? new URL(request.url).origin).replace(/\/$/, '');
}

async function subscriptionRow(workspaceId: number): Promise<Subscription> {
  const row = await Subscription.findOne({ where: { workspaceId } });
  if (row) return row;
  try {
    return await Subscription.create({ workspaceId, plan: DEFAULT_PLAN, status: 'active' });
  } catch {
    return (await Subscription.findOne({ where: { workspaceId } }))!;
  }
}

function hasPaidSubscription(row: Subscription): boolean {
  return !!row.subscriptionRef && IN_FORCE.has(row.status) && row.plan !== DEFAULT_PLAN;
}

/** The payment-service customer of a workspace, created on first checkout. */
async function ensureCustomer(actor: WorkspaceActor, row: Subscription): Promise<string> {
  if (row.customerRef) return row.customerRef;
  const customer = await callPayments('setting up billing', (client) =>
    client.customers.create({ email: actor.user.email, name: actor.workspace.name, metadata: { workspaceId: String(actor.workspace.id) } }, { idempotencyKey: `partwise-customer-ws-${actor.workspace.id}-${row.id}` }),
  );
  const [updated] = await Subscription.update({ customerRef: customer.id }, { where: { id: row.id, customerRef: null } });
  if (updated === 1) return customer.id;
  await row.reload();
  return row.customerRef!;
}

export async function startCheckout(actor: WorkspaceActor, plan: PlanId, request: Request): Promise<{ url: string; sessionId: string }> {
  if (!PAID_PLANS.includes(plan)) throw new AppError('invalid_input', `${PLANS[plan].name} is free: choose it with "Change plan" instead of a checkout.`, { issues: [{ field: 'plan', message: 'Choose a paid plan.' }] });
  const row = await subscriptionRow(actor.workspace.id);
  if (hasPaidSubscription(row)) {
    throw new AppError('conflict', `This workspace already pays for ${PLANS[row.plan as PlanId]?.name ?? row.plan}; switch plans from the billing page instead of starting a new checkout.`);
  }
  const customer = await ensureCustomer(actor, row);
  const price = await priceIdForPlan(plan);
  const base = appBaseUrl(request);
  const session = await callPayments('starting the checkout', (client) =>
    client.checkout.sessions.create({
      mode: 'subscription',
      customer,
      line_items: [{ price, quantity: 1 }],
      client_reference_id: String(actor.workspace.id),
      metadata: { workspaceId: String(actor.workspace.id), plan },
      subscription_data: { metadata: { workspaceId: String(actor.workspace.id), plan } },
      success_url: `${base}/studio/billing/return?session_id={CHECKOUT_SESSION_ID}`,
      cancel_url: `${base}/studio/billing?checkout=cancelled`,
    }),
  );
  if (!session.url) throw new AppError('upstream_failed', 'The payment service did not return a checkout page. Nothing was charged and your plan is unchanged.');
  await recordAudit({ action: 'billing.checkout_started', actor: actor.user, workspaceId: actor.workspace.id, targetType: 'checkout_session', targetId: session.id, detail: { plan }, request });
  return { url: session.url, sessionId: session.id };
}

export type CheckoutState = 'open' | 'processing' | 'confirmed' | 'expired';

/**
 * Where a checkout stands, for the return page. "confirmed" only once our own
 * records (written by the webhook) show the subscription the checkout created —
 * the redirect back from the checkout page proves nothing by itself.
 */
export async function checkoutStatus(actor: WorkspaceActor, sessionId: string): Promise<{ state: CheckoutState; plan: string; wantedPlan: string | null }> {
  const row = await subscriptionRow(actor.workspace.id);
  if (!row.customerRef) throw new AppError('not_found', 'No such checkout for this workspace.');
  const session = await callPayments('checking the checkout', (client) => client.checkout.sessions.retrieve(sessionId)).catch((e: AppError) => {
    const cause = e.cause as { statusCode?: number } | undefined;
    if (cause?.statusCode === 404) throw new AppError('not_found', 'No such checkout for this workspace.');
    throw e;
  });
  const customer = typeof session.customer === 'string' ? session.customer : session.customer?.id;
  if (customer !== row.customerRef) throw new AppError('not_found', 'No such checkout for this workspace.');
  const subId = typeof session.subscription === 'string' ? session.subscription : (session.subscription?.id ?? null);
  let state: CheckoutState;
  if (session.status === 'expired') state = 'expired';
  else if (session.status !== 'complete') state = 'open';
  else state = subId && row.subscriptionRef === subId && IN_FORCE.has(row.status) ? 'confirmed' : 'processing';
  return { state, plan: row.plan, wantedPlan: session.metadata?.plan ?? null };
}

async function currentSubscription(actor: WorkspaceActor) {
  const row = await subscriptionRow(actor.workspace.id);
  if (!hasPaidSubscription(row)) return { row, remote: null };
  const remote = await callPayments('reading the subscription', (client) => client.subscriptions.retrieve(row.subscriptionRef!));
  return { row, remote };
}

/** Switch to another plan. Paid → paid changes the price now (prorated); paid → free ends the subscription with its period. */
export async function changePlan(actor: WorkspaceActor, plan: PlanId, request: Request) {
  const { row, remote } = await currentSubscription(actor);
  if (!remote) {
    if (plan === DEFAULT_PLAN) throw new AppError('conflict', `This workspace is already on ${PLANS[DEFAULT_PLAN].name}.`);
    throw new AppError('conflict', `This workspace has no paid subscription yet: start a checkout for ${PLANS[plan].name}.`);
  }
  if (plan === DEFAULT_PLAN) return cancelAtPeriodEnd(actor, request);
  if (plan === row.plan && !row.cancelAtPeriodEnd) throw new AppError('conflict', `This workspace is already on ${PLANS[plan].name}.`);
  const price = await priceIdForPlan(plan);
  const item = remote.items.data[0];
  const updated = await callPayments('changing the plan', (client) =>
    client.subscriptions.update(remote.id, {
      items: [{ id: item.id, price }],
      proration_behavior: 'always_invoice',
      cancel_at_period_end: false,
      metadata: { plan },
    }),
  );
  await recordAudit({ action: 'billing.change_requested', actor: actor.user, workspaceId: actor.workspace.id, targetType: 'subscription', targetId: remote.id, detail: { from: row.plan, to: plan }, request });
  // The service's answer is authoritative (not a browser redirect); the webhook that follows changes nothing more.
  await syncSubscription(updated, { actor: actor.user, source: 'owner change', request });
  // The prorated invoice the change produced, so the page lists it without waiting for its webhook.
  const invoiceId = typeof updated.latest_invoice === 'string' ? updated.latest_invoice : updated.latest_invoice?.id;
  if (invoiceId && invoiceId !== (typeof remote.latest_invoice === 'string' ? remote.latest_invoice : remote.latest_invoice?.id)) {
    await syncInvoice(await callPayments('reading the new invoice', (client) => client.invoices.retrieve(invoiceId)));
  }
  return Subscription.findOne({ where: { workspaceId: actor.workspace.id } });
}

/** What a plan change would cost, before the owner confirms it (amounts in cents). */
export interface PlanChangePreview {
  /** checkout: a first paid plan, paid on the payment page; prorated: paid → paid now; ends: paid → free at the period's end. */
  kind: 'checkout' | 'prorated' | 'ends';
  plan: PlanId;
  lines: { description: string; amount: number }[];
  /** Credit on account taken first. */
  creditUsed: number;
  /** Charged to the card now. */
  amountDue: number;
  /** Credit left on account afterwards, used on later invoices. */
  creditAfter: number;
  /** The end of the period the change runs to (ISO), when there is a subscription. */
  periodEnd: string | null;
  currency: string;
}

/**
 * Ask the payment service what changePlan would invoice now, changing nothing, so the
 * confirm step shows the real prorated amount and any credit.
 */
export async function previewPlanChange(actor: WorkspaceActor, plan: PlanId): Promise<PlanChangePreview> {
  const { row, remote } = await currentSubscription(actor);
  const periodEnd = row.currentPeriodEnd?.toISOString() ?? null;
  const empty = { lines: [], creditUsed: 0, creditAfter: 0, currency: 'eur', periodEnd };
  if (!remote) {
    if (plan === DEFAULT_PLAN) throw new AppError('conflict', `This workspace is already on ${PLANS[DEFAULT_PLAN].name}.`);
    return { ...empty, kind: 'checkout', plan, amountDue: PLANS[plan].monthlyPrice, lines: [{ description: `${PLANS[plan].name}, first month`, amount: PLANS[plan].monthlyPrice }] };
  }
  if (plan === DEFAULT_PLAN) return { ...empty, kind: 'ends', plan, amountDue: 0 };
  if (plan === row.plan && !row.cancelAtPeriodEnd) throw new AppError('conflict', `This workspace is already on ${PLANS[plan].name}.`);
  const price = await priceIdForPlan(plan);
  const item = remote.items.data[0];
  const preview = await callPayments('working out the price of the change', (client) =>
    client.invoices.createPreview({
      customer: typeof remote.customer === 'string' ? remote.customer : remote.customer.id,
      subscription: remote.id,
      subscription_details: { items: [{ id: item.id, price }], proration_behavior: 'always_invoice' },
    }),
  );
  const before = Math.max(0, -(preview.starting_balance ?? 0));
  const after = Math.max(0, -(preview.ending_balance ?? 0));
  return {
    kind: 'prorated',
    plan,
    lines: (preview.lines?.data ?? []).map((l) => ({ description: l.description ?? '', amount: l.amount })),
    creditUsed: Math.max(0, before - after),
    amountDue: preview.amount_due,
    creditAfter: after,
    periodEnd,
    currency: preview.currency ?? 'eur',
  };
}

export async function cancelAtPeriodEnd(actor: WorkspaceActor, request: Request) {
  return setCancel(actor, true, request);
}

export async function resumeSubscription(actor: WorkspaceActor, request: Request) {
  return setCancel(actor, false, request);
}

async function setCancel(actor: WorkspaceActor, cancel: boolean, request: Request) {
  const { row, remote } = await currentSubscription(actor);
  if (!remote) throw new AppError('conflict', `This workspace has no paid subscription to ${cancel ? 'cancel' : 'resume'}.`);
  if (row.cancelAtPeriodEnd === cancel && remote.cancel_at_period_end === cancel) {
    throw new AppError('conflict', cancel ? 'The subscription already ends with the current period.' : 'The subscription is not set to end.');
  }
  const updated = await callPayments(cancel ? 'cancelling the subscription' : 'resuming the subscription', (client) => client.subscriptions.update(remote.id, { cancel_at_period_end: cancel }));
  await recordAudit({ action: cancel ? 'billing.cancel_requested' : 'billing.resume_requested', actor: actor.user, workspaceId: actor.workspace.id, targetType: 'subscription', targetId: remote.id, detail: { plan: row.plan }, request });
  await syncSubscription(updated, { actor: actor.user, source: cancel ? 'owner cancel' : 'owner resume', request });
  return Subscription.findOne({ where: { workspaceId: actor.workspace.id } });
}

/** A link to the payment service's self-service page (change the card, end or keep the subscription). */
export async function openSelfService(actor: WorkspaceActor, request: Request): Promise<{ url: string }> {
  const row = await subscriptionRow(actor.workspace.id);
  if (!row.customerRef) throw new AppError('conflict', 'There is no card on file yet: it is added with the first checkout.');
  const session = await callPayments('opening the payment settings', (client) =>
    client.billingPortal.sessions.create({ customer: row.customerRef!, return_url: `${appBaseUrl(request)}/studio/billing` }),
  );
  await recordAudit({ action: 'billing.self_service_opened', actor: actor.user, workspaceId: actor.workspace.id, targetType: 'customer', targetId: row.customerRef, request });
  return { url: session.url };
}
