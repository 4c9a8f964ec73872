import { requireWorkspace } from '@/lib/auth/guard';
import { cancelAtPeriodEnd } from '@/lib/billing/subscriptions';
import { billingSummary } from '@/lib/billing/summary';
import { route } from '@/lib/http/handler';

/** End the paid subscription when the current period ends (the plan stays until then). */
export const POST = route(async (request) => {
  const actor = await requireWorkspace(request, 'owner');
  await cancelAtPeriodEnd(actor, request);
  return Response.json(await billingSummary(actor.workspace.id));
});
