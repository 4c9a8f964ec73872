import { requireStaff } from '@/lib/auth/guard';
import { idParam, readJson, readParams, route } from '@/lib/http/handler';
import { reasonBody, suspendWorkspace } from '@/lib/support';

/** Staff: silence every calculator of a workspace at once, with a reason. */
export const POST = route(async (request, { params }) => {
  const actor = await requireStaff(request);
  const { id } = await readParams(params, idParam);
  const input = await readJson(request, reasonBody);
  const { workspace, notified } = await suspendWorkspace({ user: actor.user, request }, id, input);
  return Response.json({ workspace: { id: workspace.id, suspendedAt: workspace.suspendedAt, suspendedReason: workspace.suspendedReason }, ownersNotified: notified.length });
});
