import { requireApiKey } from '@/lib/auth/api-keys';
import { startFit } from '@/lib/fitting/jobs';
import { fitParamsSchema } from '@/lib/fitting/params';
import { queuePositionOf } from '@/lib/fitting/queue';
import { currentFit } from '@/lib/fitting/studio-queries';
import { fitView } from '@/lib/fitting/views';
import { readJson, route } from '@/lib/http/handler';

/** Start a fit of a dataset with the given settings; poll or wait with GET /api/v1/fits/{id} [fit]. */
export const POST = route(async (request) => {
  const actor = await requireApiKey(request, 'fit');
  const body = await readJson(request, fitParamsSchema);
  const created = await startFit(actor.workspace.id, null, body);
  const fit = await currentFit(created);
  return Response.json({ fit: fitView(fit, await queuePositionOf(fit)) }, { status: 202, headers: { location: `/api/v1/fits/${fit.id}` } });
});
