import { requireStaff } from '@/lib/auth/guard';
import { idParam, readJson, readParams, route } from '@/lib/http/handler';
import { reasonBody, restoreWorkspace } from '@/lib/support';

/** Staff: lift a workspace's suspension, with a note for the owners. */
export const POST = route(async (request, { params }) => {
  const actor = await requireStaff(request);
  const { id } = await readParams(params, idParam);
  const input = await readJson(request, reasonBody);
  const { workspace, notified } = await restoreWorkspace({ user: actor.user, request }, id, input);
  return Response.json({ workspace: { id: workspace.id, suspendedAt: workspace.suspendedAt }, ownersNotified: notified.length });
});
