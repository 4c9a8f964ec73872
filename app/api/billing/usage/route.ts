import { requireWorkspace } from '@/lib/auth/guard';
import { billingSummary } from '@/lib/billing/summary';
import { route } from '@/lib/http/handler';
import { recentScoringAlerts } from '@/lib/scoring/alerts';

/** Plan in force, this month's usage against every limit, and recent scoring alerts (owners only, like all billing). */
export const GET = route(async (request) => {
  const actor = await requireWorkspace(request, 'owner');
  const [summary, alerts] = await Promise.all([billingSummary(actor.workspace.id), recentScoringAlerts(actor.workspace.id)]);
  return Response.json({ ...summary, alerts }, { headers: { 'cache-control': 'no-store' } });
});
