import { z } from 'zod';
import { requireWorkspace } from '@/lib/auth/guard';
import { findModel, modelView, updateModel } from '@/lib/fitting/models';
import { idParam, readJson, readParams, route } from '@/lib/http/handler';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  return Response.json({ model: modelView(await findModel(actor.workspace.id, id)) });
});

/** Cluster labels, descriptions and colours; calculator fields; caution text; name. */
export const PATCH = route<Ctx>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  const body = await readJson(request, z.record(z.string(), z.unknown()));
  return Response.json({ model: modelView(await updateModel(actor.workspace.id, id, body)) });
});
