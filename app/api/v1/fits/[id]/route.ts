import { fitWaitQuery, waitForFit } from '@/lib/api/v1';
import { requireApiKey } from '@/lib/auth/api-keys';
import { queuePositionOf } from '@/lib/fitting/queue';
import { fitView } from '@/lib/fitting/views';
import { idParam, parseWith, readParams, route } from '@/lib/http/handler';

type Ctx = { params: Promise<{ id: string }> };

/** A fit's status and progress; with ?wait=N, answers once it has finished or after N seconds (at most 60) [read]. */
export const GET = route<Ctx>(async (request, { params }) => {
  const actor = await requireApiKey(request, 'read');
  const { id } = await readParams(params, idParam);
  const { wait } = parseWith(fitWaitQuery, Object.fromEntries(new URL(request.url).searchParams), 'query');
  const fit = await waitForFit(actor.workspace.id, id, wait ?? 0, request.signal);
  return Response.json({ fit: fitView(fit, await queuePositionOf(fit)) }, { headers: { 'cache-control': 'no-store' } });
});
