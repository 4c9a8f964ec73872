import { requireStaff } from '@/lib/auth/guard';
import { idParam, readJson, readParams, route } from '@/lib/http/handler';
import { enableEmbed, reasonBody } from '@/lib/support';

/** Staff: switch a disabled calculator back on, with a note for the owner. */
export const POST = route(async (request, { params }) => {
  const actor = await requireStaff(request);
  const { id } = await readParams(params, idParam);
  const input = await readJson(request, reasonBody);
  const { embed, notified } = await enableEmbed({ user: actor.user, request }, id, input);
  return Response.json({ calculator: { id: embed.id, status: embed.status }, ownersNotified: notified.length });
});
