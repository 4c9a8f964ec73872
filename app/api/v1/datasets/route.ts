import { datasetUploadQuery, keyAuditWho } from '@/lib/api/v1';
import { requireApiKey } from '@/lib/auth/api-keys';
import { recordAudit } from '@/lib/audit';
import { createDataset, datasetSummary, listDatasets } from '@/lib/datasets';
import { readUpload } from '@/lib/datasets/upload';
import { discardBody } from '@/lib/http/body';
import { parseWith, route } from '@/lib/http/handler';

/** The workspace's datasets [read]. */
export const GET = route(async (request) => {
  const actor = await requireApiKey(request, 'read');
  return Response.json({ datasets: await listDatasets(actor.workspace.id) });
});

/** Upload a table as a text/csv body, named by ?name= [fit]. */
export const POST = route(async (request) => {
  const actor = await requireApiKey(request, 'fit');
  try {
    parseWith(datasetUploadQuery, Object.fromEntries(new URL(request.url).searchParams), 'query');
  } catch (error) {
    // Refused before the body is read: drain it, as readUpload does for its own refusals.
    await discardBody(request.body);
    throw error;
  }
  const upload = await readUpload(request, actor.workspace.id);
  const dataset = await createDataset({ workspaceId: actor.workspace.id, userId: null, ...upload });
  await recordAudit({ action: 'dataset.upload', ...keyAuditWho(actor), workspaceId: actor.workspace.id, targetType: 'dataset', targetId: dataset.id, detail: { rows: dataset.rowCount, bytes: upload.bytes.length }, request });
  return Response.json({ dataset: datasetSummary(dataset) }, { status: 201, headers: { location: `/api/v1/datasets/${dataset.id}` } });
});
