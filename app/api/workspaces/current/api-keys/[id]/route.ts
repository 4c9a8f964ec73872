import { revokeApiKey } from '@/lib/auth/api-keys';
import { requireWorkspace } from '@/lib/auth/guard';
import { idParam, readParams, route } from '@/lib/http/handler';

type Ctx = { params: Promise<{ id: string }> };

/** Revoke a key (owners only); calls with it answer 401 from now on. */
export const DELETE = route<Ctx>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'owner');
  const { id } = await readParams(params, idParam);
  return Response.json({ key: await revokeApiKey(actor, id, request) });
});
