import { requireWorkspace } from '@/lib/auth/guard';
import { findFit } from '@/lib/fitting/jobs';
import { fitView } from '@/lib/fitting/views';
import { idParam, readParams, route } from '@/lib/http/handler';

/** Polled by the progress page while a job runs. */
export const GET = route<{ params: Promise<{ id: string }> }>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  return Response.json({ fit: fitView(await findFit(actor.workspace.id, id)) }, { headers: { 'cache-control': 'no-store' } });
});
