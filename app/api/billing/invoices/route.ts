import { requireWorkspace } from '@/lib/auth/guard';
import { listInvoices } from '@/lib/billing/summary';
import { route } from '@/lib/http/handler';

/** The workspace's invoices, newest first, as the webhooks recorded them. */
export const GET = route(async (request) => {
  const actor = await requireWorkspace(request, 'owner');
  return Response.json({ invoices: await listInvoices(actor.workspace.id) }, { headers: { 'cache-control': 'no-store' } });
});
