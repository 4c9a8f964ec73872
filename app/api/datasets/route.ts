import { requireWorkspace } from '@/lib/auth/guard';
import { createDataset, datasetSummary, listDatasets } from '@/lib/datasets';
import { readUpload } from '@/lib/datasets/upload';
import { recordAudit } from '@/lib/audit';
import { route } from '@/lib/http/handler';

export const GET = route(async (request) => {
  const actor = await requireWorkspace(request, 'member');
  return Response.json({ datasets: await listDatasets(actor.workspace.id) });
});

export const POST = route(async (request) => {
  const actor = await requireWorkspace(request, 'member');
  const upload = await readUpload(request, actor.workspace.id);
  const dataset = await createDataset({ workspaceId: actor.workspace.id, userId: actor.user.id, ...upload });
  await recordAudit({ action: 'dataset.upload', actor: actor.user, workspaceId: actor.workspace.id, targetType: 'dataset', targetId: dataset.id, detail: { rows: dataset.rowCount, bytes: upload.bytes.length }, request });
  return Response.json({ dataset: datasetSummary(dataset) }, { status: 201 });
});
