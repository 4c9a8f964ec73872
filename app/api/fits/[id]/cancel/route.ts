import { requireWorkspace } from '@/lib/auth/guard';
import { cancelFit } from '@/lib/fitting/jobs';
import { fitView } from '@/lib/fitting/views';
import { idParam, readParams, route } from '@/lib/http/handler';

export const POST = route<{ params: Promise<{ id: string }> }>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  return Response.json({ fit: fitView(await cancelFit(actor.workspace.id, id)) }, { status: 202 });
});
