import { keyAuditWho } from '@/lib/api/v1';
import { requireApiKey } from '@/lib/auth/api-keys';
import { recordAudit } from '@/lib/audit';
import { createModelFromFit, createModelSchema, modelView } from '@/lib/fitting/models';
import { readJson, route } from '@/lib/http/handler';

/** Keep a candidate of a finished fit as a named model (index from the ranking; not the BIC winner needs a note) [fit]. */
export const POST = route(async (request) => {
  const actor = await requireApiKey(request, 'fit');
  const body = await readJson(request, createModelSchema);
  const model = await createModelFromFit(actor.workspace.id, null, body);
  await recordAudit({ action: 'model.create', ...keyAuditWho(actor), workspaceId: actor.workspace.id, targetType: 'mixture_model', targetId: model.id, detail: { fitId: model.fitId, note: model.selectionNote || undefined }, request });
  return Response.json({ model: modelView(model) }, { status: 201, headers: { location: `/api/v1/models/${model.id}` } });
});
