import { requireApiKey } from '@/lib/auth/api-keys';
import { findModel, modelView, updateModel, updateModelSchema } from '@/lib/fitting/models';
import { idParam, readJson, readParams, route } from '@/lib/http/handler';

type Ctx = { params: Promise<{ id: string }> };

/** A named model: clusters, calculator fields, caution and the model itself [read]. */
export const GET = route<Ctx>(async (request, { params }) => {
  const actor = await requireApiKey(request, 'read');
  const { id } = await readParams(params, idParam);
  return Response.json({ model: modelView(await findModel(actor.workspace.id, id)) });
});

/** Cluster labels, descriptions and colours; calculator fields; caution; name (the studio's schema) [fit]. */
export const PATCH = route<Ctx>(async (request, { params }) => {
  const actor = await requireApiKey(request, 'fit');
  const { id } = await readParams(params, idParam);
  const body = await readJson(request, updateModelSchema);
  return Response.json({ model: modelView(await updateModel(actor.workspace.id, id, body)) });
});
