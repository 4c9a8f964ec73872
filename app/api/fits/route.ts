import { z } from 'zod';
import { requireWorkspace } from '@/lib/auth/guard';
import { startFit } from '@/lib/fitting/jobs';
import { fitView } from '@/lib/fitting/views';
import { parseWith, readJson, route } from '@/lib/http/handler';
import { decimalId } from '@/lib/http/ids';
import { Fit } from '@/models';

const listQuery = z.object({ datasetId: decimalId().optional() });

export const GET = route(async (request) => {
  const actor = await requireWorkspace(request, 'member');
  const q = parseWith(listQuery, Object.fromEntries(new URL(request.url).searchParams), 'query');
  const fits = await Fit.findAll({ where: { workspaceId: actor.workspace.id, ...(q.datasetId ? { datasetId: q.datasetId } : {}) }, order: [['id', 'DESC']], limit: 100, attributes: { exclude: ['result'] } });
  return Response.json({ fits: fits.map((f) => ({ ...fitView(f), result: undefined })) });
});

export const POST = route(async (request) => {
  const actor = await requireWorkspace(request, 'member');
  const body = await readJson(request, z.record(z.string(), z.unknown()));
  const fit = await startFit(actor.workspace.id, actor.user.id, body);
  return Response.json({ fit: fitView(fit) }, { status: 202, headers: { location: `/api/fits/${fit.id}` } });
});
