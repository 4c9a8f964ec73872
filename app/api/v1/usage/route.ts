import { usageReport } from '@/lib/api/v1';
import { requireApiKey } from '@/lib/auth/api-keys';
import { route } from '@/lib/http/handler';

/** This month's answers per calculator and the plan's allowance [read]. */
export const GET = route(async (request) => {
  const actor = await requireApiKey(request, 'read');
  return Response.json({ usage: await usageReport(actor.workspace.id) }, { headers: { 'cache-control': 'no-store' } });
});
