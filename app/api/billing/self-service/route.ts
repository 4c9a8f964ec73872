import { requireWorkspace } from '@/lib/auth/guard';
import { openSelfService } from '@/lib/billing/subscriptions';
import { route } from '@/lib/http/handler';

/** A short-lived link to the payment service's page for the card on file and cancellation. */
export const POST = route(async (request) => {
  const actor = await requireWorkspace(request, 'owner');
  return Response.json(await openSelfService(actor, request), { status: 201 });
});
