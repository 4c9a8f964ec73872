import { z } from 'zod';
import { requireStaff } from '@/lib/auth/guard';
import { idParam, readJson, readParams, route } from '@/lib/http/handler';
import { setReportStatus } from '@/lib/support';

const body = z.object({ status: z.enum(['open', 'closed'], { error: 'status must be open or closed.' }) }).strict();

/** Staff: close an abuse report once dealt with, or open it again. */
export const PATCH = route(async (request, { params }) => {
  const actor = await requireStaff(request);
  const { id } = await readParams(params, idParam);
  const { status } = await readJson(request, body);
  const report = await setReportStatus({ user: actor.user, request }, id, status);
  return Response.json({ report: { id: report.id, status: report.status } });
});
