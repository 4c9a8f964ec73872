import { requireWorkspace } from '@/lib/auth/guard';
import { idParam, readParams, route } from '@/lib/http/handler';
import { insightCsv } from '@/lib/insight/settings';

type Ctx = { params: Promise<{ id: string }> };

/** The daily aggregates as CSV, one row per day × version × counter. */
export const GET = route<Ctx>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  const { filename, csv } = await insightCsv(actor, id);
  return new Response(csv, { headers: { 'content-type': 'text/csv; charset=utf-8', 'content-disposition': `attachment; filename="${filename}"`, 'cache-control': 'no-store' } });
});
