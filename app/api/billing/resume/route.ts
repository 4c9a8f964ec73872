import { requireWorkspace } from '@/lib/auth/guard';
import { resumeSubscription } from '@/lib/billing/subscriptions';
import { billingSummary } from '@/lib/billing/summary';
import { route } from '@/lib/http/handler';

/** Take back a cancellation before the period ends. */
export const POST = route(async (request) => {
  const actor = await requireWorkspace(request, 'owner');
  await resumeSubscription(actor, request);
  return Response.json(await billingSummary(actor.workspace.id));
});
