import { requireWorkspace } from '@/lib/auth/guard';
import { billingSummary } from '@/lib/billing/summary';
import { route } from '@/lib/http/handler';

/** Plan in force and this month's usage against every limit (owners only, like all billing). */
export const GET = route(async (request) => {
  const actor = await requireWorkspace(request, 'owner');
  return Response.json(await billingSummary(actor.workspace.id), { headers: { 'cache-control': 'no-store' } });
});
