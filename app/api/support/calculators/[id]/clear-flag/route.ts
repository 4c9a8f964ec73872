import { requireStaff } from '@/lib/auth/guard';
import { idParam, readJson, readParams, route } from '@/lib/http/handler';
import { clearFlag, clearFlagBody } from '@/lib/support';

/** Staff: a flagged spike was reviewed and is fine; take it off the top of the console. */
export const POST = route(async (request, { params }) => {
  const actor = await requireStaff(request);
  const { id } = await readParams(params, idParam);
  const input = await readJson(request, clearFlagBody);
  const embed = await clearFlag({ user: actor.user, request }, id, input);
  return Response.json({ calculator: { id: embed.id, flaggedAt: embed.flaggedAt } });
});
