import { requireStaff } from '@/lib/auth/guard';
import { parseWith, route } from '@/lib/http/handler';
import { auditQuerySchema, queryObject, searchAudit } from '@/lib/support';

/** Staff: the audit log of sensitive actions across the app, filtered and paged. */
export const GET = route(async (request) => {
  await requireStaff(request);
  const query = parseWith(auditQuerySchema, queryObject(new URL(request.url).searchParams), 'filter');
  return Response.json(await searchAudit(query), { headers: { 'Cache-Control': 'no-store' } });
});
