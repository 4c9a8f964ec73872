import { z } from 'zod';
import { requireWorkspace } from '@/lib/auth/guard';
import { changePlan } from '@/lib/billing/subscriptions';
import { billingSummary } from '@/lib/billing/summary';
import { readJson, route } from '@/lib/http/handler';
import { PLAN_IDS } from '@/lib/plans';

const body = z.object({ plan: z.enum(PLAN_IDS) });

/** Switch a paid subscription to another plan (the free plan ends it with the period). */
export const POST = route(async (request) => {
  const actor = await requireWorkspace(request, 'owner');
  const { plan } = await readJson(request, body);
  await changePlan(actor, plan, request);
  return Response.json(await billingSummary(actor.workspace.id));
});
