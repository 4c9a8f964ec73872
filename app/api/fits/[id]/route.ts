import { requireWorkspace } from '@/lib/auth/guard';
import { findFit } from '@/lib/fitting/jobs';
import { queuePositionOf } from '@/lib/fitting/queue';
import { fitView } from '@/lib/fitting/views';
import { idParam, readParams, route } from '@/lib/http/handler';

/** Polled by the progress page while a job runs; a waiting job also says how many fits start before it. */
export const GET = route<{ params: Promise<{ id: string }> }>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  const fit = await findFit(actor.workspace.id, id);
  return Response.json({ fit: fitView(fit, await queuePositionOf(fit)) }, { headers: { 'cache-control': 'no-store' } });
});
