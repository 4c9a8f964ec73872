import { requireStaff } from '@/lib/auth/guard';
import { idParam, readJson, readParams, route } from '@/lib/http/handler';
import { disableBody, disableEmbed } from '@/lib/support';

/** Staff: switch a calculator off with a reason; visitors see the unavailable notice at once. */
export const POST = route(async (request, { params }) => {
  const actor = await requireStaff(request);
  const { id } = await readParams(params, idParam);
  const input = await readJson(request, disableBody);
  const { embed, closedReports, notified } = await disableEmbed({ user: actor.user, request }, id, input);
  return Response.json({ calculator: { id: embed.id, status: embed.status, disabledReason: embed.disabledReason, disabledAt: embed.disabledAt }, closedReports, ownersNotified: notified.length });
});
