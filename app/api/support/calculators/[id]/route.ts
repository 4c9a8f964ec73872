import { requireStaff } from '@/lib/auth/guard';
import { idParam, readParams, route } from '@/lib/http/handler';
import { calculatorDetail } from '@/lib/support';

/** Staff: one calculator's versions, origins, 30-day usage, reports and audit trail. */
export const GET = route(async (request, { params }) => {
  await requireStaff(request);
  const { id } = await readParams(params, idParam);
  return Response.json({ calculator: await calculatorDetail(id) }, { headers: { 'Cache-Control': 'no-store' } });
});
