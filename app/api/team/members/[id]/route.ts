import { idParam, readJson, readParams, route } from '@/lib/http/handler';
import { requireWorkspace } from '@/lib/auth/guard';
import { changeRoleSchema } from '@/lib/accounts/schemas';
import { changeRole, removeMember } from '@/lib/accounts/team';

/** Owners change a member's role (the last owner stays an owner: 409). */
export const PATCH = route(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'owner');
  const { id } = await readParams(params, idParam);
  const { role } = await readJson(request, changeRoleSchema);
  return Response.json({ member: await changeRole(actor, id, role, request) });
});

/** Owners remove a member (never the last owner: 409). */
export const DELETE = route(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'owner');
  const { id } = await readParams(params, idParam);
  await removeMember(actor, id, request);
  return new Response(null, { status: 204 });
});
