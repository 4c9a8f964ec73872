import type Stripe from 'stripe';
import { PLAN_IDS, PLANS, type PlanId } from '@/lib/plans';
import { callPayments, paymentsConfig } from './client';

/**
 * Plan ↔ price mapping. Each paid plan in lib/plans.ts has one monthly euro price in
 * the payment service, found by its lookup key and created on first use, so the
 * prices there always mirror the plans here. The free plan has no price.
 */
export const PAID_PLANS = PLAN_IDS.filter((id) => PLANS[id].monthlyPrice > 0);

export function lookupKey(plan: PlanId): string {
  // The amount is in the key: changing a plan's price makes a new price, never edits an old one.
  return `partwise_${plan}_monthly_eur_${PLANS[plan].monthlyPrice}`;
}

/** The plan a price stands for, from its lookup key or metadata; null for prices that are not ours. */
export function planForPrice(price: Pick<Stripe.Price, 'lookup_key' | 'metadata'> | null | undefined): PlanId | null {
  if (!price) return null;
  const fromKey = /^partwise_([a-z]+)_monthly_eur_\d+$/.exec(price.lookup_key ?? '')?.[1];
  const candidate = fromKey ?? price.metadata?.partwise_plan;
  return candidate && (PLAN_IDS as readonly string[]).includes(candidate) ? (candidate as PlanId) : null;
}

// Price ids per configuration (safe to lose: the service is asked again).
const known = new Map<string, string>();

export async function priceIdForPlan(plan: PlanId): Promise<string> {
  if (!PAID_PLANS.includes(plan)) throw new Error(`The ${plan} plan has no price.`);
  const cacheKey = `${paymentsConfig()?.host}:${paymentsConfig()?.port}:${lookupKey(plan)}`;
  const cached = known.get(cacheKey);
  if (cached) return cached;
  // Concurrent first calls share one look-up, so a price is never created twice.
  let pending = inflight.get(cacheKey);
  if (!pending) {
    pending = findOrCreatePrice(plan).finally(() => inflight.delete(cacheKey));
    inflight.set(cacheKey, pending);
  }
  const id = await pending;
  known.set(cacheKey, id);
  return id;
}

const inflight = new Map<string, Promise<string>>();

function findOrCreatePrice(plan: PlanId): Promise<string> {
  return callPayments('looking up the plan prices', async (client) => {
    const found = await client.prices.list({ lookup_keys: [lookupKey(plan)], active: true, limit: 1 });
    if (found.data[0]) return found.data[0].id;
    const p = PLANS[plan];
    const product = await client.products.create({ name: `Partwise ${p.name}`, metadata: { partwise_plan: plan } });
    const price = await client.prices.create({
      product: product.id,
      currency: 'eur',
      unit_amount: p.monthlyPrice,
      recurring: { interval: 'month' },
      lookup_key: lookupKey(plan),
      nickname: `${p.name} monthly`,
      metadata: { partwise_plan: plan },
    });
    return price.id;
  });
}
