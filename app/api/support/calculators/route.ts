import { requireStaff } from '@/lib/auth/guard';
import { parseWith, route } from '@/lib/http/handler';
import { queryObject, searchCalculators, searchQuerySchema } from '@/lib/support';

/** Staff: search every workspace's calculators; sorted and paged on the server. */
export const GET = route(async (request) => {
  await requireStaff(request);
  const query = parseWith(searchQuerySchema, queryObject(new URL(request.url).searchParams), 'search');
  const page = await searchCalculators(query);
  return Response.json(page, { headers: { 'Cache-Control': 'no-store' } });
});
