import { requireWorkspace } from '@/lib/auth/guard';
import { findModel, modelDownload } from '@/lib/fitting/models';
import { idParam, readParams, route } from '@/lib/http/handler';

/** The model as the documented JSON (format partwise.mixture-model, version 1). */
export const GET = route<{ params: Promise<{ id: string }> }>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  const { body, filename } = modelDownload(await findModel(actor.workspace.id, id));
  return new Response(body, { headers: { 'content-type': 'application/json; charset=utf-8', 'content-disposition': `attachment; filename="${filename}"`, 'cache-control': 'no-store' } });
});
