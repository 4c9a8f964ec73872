import { requireWorkspace } from '@/lib/auth/guard';
import { datasetSummary, datasetUpdateSchema, deleteDataset, findDataset, updateDataset } from '@/lib/datasets';
import { recordAudit } from '@/lib/audit';
import { idParam, readJson, readParams, route } from '@/lib/http/handler';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  const preview = Number(new URL(request.url).searchParams.get('preview') ?? 20);
  return Response.json({ dataset: datasetSummary(await findDataset(actor.workspace.id, id), Math.min(200, Math.max(0, preview || 0))) });
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
