import { z } from 'zod';
import { requireWorkspace } from '@/lib/auth/guard';
import { startFit } from '@/lib/fitting/jobs';
import { queuePositionOf, queuePositionsOf } from '@/lib/fitting/queue';
import { currentFit, listFits } from '@/lib/fitting/studio-queries';
import { fitView } from '@/lib/fitting/views';
import { parseWith, readJson, route } from '@/lib/http/handler';
import { decimalId } from '@/lib/http/ids';

const listQuery = z.object({ datasetId: decimalId().optional() });

export const GET = route(async (request) => {
  const actor = await requireWorkspace(request, 'member');
  const q = parseWith(listQuery, Object.fromEntries(new URL(request.url).searchParams), 'query');
  const fits = await listFits(actor.workspace.id, { datasetId: q.datasetId });
  const positions = await queuePositionsOf(fits);
  return Response.json({ fits: fits.map((f) => ({ ...fitView(f, positions.get(f.id) ?? null), result: undefined })) });
});

export const POST = route(async (request) => {
  const actor = await requireWorkspace(request, 'member');
  const body = await readJson(request, z.record(z.string(), z.unknown()));
  const created = await startFit(actor.workspace.id, actor.user.id, body);
  // The runner may have claimed it already: answer with the row as it is now.
  const fit = await currentFit(created);
  return Response.json({ fit: fitView(fit, await queuePositionOf(fit)) }, { status: 202, headers: { location: `/api/fits/${fit.id}` } });
});
