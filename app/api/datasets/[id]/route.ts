import { requireWorkspace } from '@/lib/auth/guard';
import { datasetSummary, datasetUpdateSchema, deleteDataset, findDataset, updateDataset } from '@/lib/datasets';
import { recordAudit } from '@/lib/audit';
import { z } from 'zod';
import { idParam, parseWith, readJson, readParams, route } from '@/lib/http/handler';
import { decimalIndex } from '@/lib/http/ids';

type Ctx = { params: Promise<{ id: string }> };

const previewQuery = z.object({ preview: decimalIndex().default(20) });

export const GET = route<Ctx>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  const { preview } = parseWith(previewQuery, Object.fromEntries(new URL(request.url).searchParams), 'query');
  return Response.json({ dataset: datasetSummary(await findDataset(actor.workspace.id, id), Math.min(200, preview)) });
});

export const PATCH = route<Ctx>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  const body = await readJson(request, datasetUpdateSchema);
  return Response.json({ dataset: datasetSummary(await updateDataset(actor.workspace.id, id, body)) });
});

export const DELETE = route<Ctx>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  await deleteDataset(actor.workspace.id, id);
  await recordAudit({ action: 'dataset.delete', actor: actor.user, workspaceId: actor.workspace.id, targetType: 'dataset', targetId: id, request });
  return new Response(null, { status: 204 });
});
