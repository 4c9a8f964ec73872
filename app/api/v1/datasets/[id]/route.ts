import { datasetPreviewQuery } from '@/lib/api/v1';
import { requireApiKey } from '@/lib/auth/api-keys';
import { datasetSummary, findDataset } from '@/lib/datasets';
import { idParam, parseWith, readParams, route } from '@/lib/http/handler';

type Ctx = { params: Promise<{ id: string }> };

/** One dataset: columns and the first rows (?preview=, default 20, at most 200) [read]. */
export const GET = route<Ctx>(async (request, { params }) => {
  const actor = await requireApiKey(request, 'read');
  const { id } = await readParams(params, idParam);
  const { preview } = parseWith(datasetPreviewQuery, Object.fromEntries(new URL(request.url).searchParams), 'query');
  return Response.json({ dataset: datasetSummary(await findDataset(actor.workspace.id, id), preview) });
});
