import { z } from 'zod';
import { requireWorkspace } from '@/lib/auth/guard';
import { startCheckout } from '@/lib/billing/subscriptions';
import { readJson, route } from '@/lib/http/handler';
import { PLAN_IDS } from '@/lib/plans';

const body = z.object({ plan: z.enum(PLAN_IDS) });

/** Start a hosted checkout for a paid plan; the client goes to the returned URL. */
export const POST = route(async (request) => {
  const actor = await requireWorkspace(request, 'owner');
  const { plan } = await readJson(request, body);
  return Response.json(await startCheckout(actor, plan, request), { status: 201 });
});
