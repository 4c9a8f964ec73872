import { z } from 'zod';
import { requireWorkspace } from '@/lib/auth/guard';
import { recordAudit } from '@/lib/audit';
import { createModelFromFit, listModels, modelView } from '@/lib/fitting/models';
import { readJson, route } from '@/lib/http/handler';

export const GET = route(async (request) => {
  const actor = await requireWorkspace(request, 'member');
  return Response.json({ models: await listModels(actor.workspace.id) });
});

export const POST = route(async (request) => {
  const actor = await requireWorkspace(request, 'member');
  const body = await readJson(request, z.record(z.string(), z.unknown()));
  const model = await createModelFromFit(actor.workspace.id, actor.user.id, body);
  await recordAudit({ action: 'model.create', actor: actor.user, workspaceId: actor.workspace.id, targetType: 'mixture_model', targetId: model.id, detail: { fitId: model.fitId, note: model.selectionNote || undefined }, request });
  return Response.json({ model: modelView(model) }, { status: 201 });
});
