import { requireWorkspace } from '@/lib/auth/guard';
import { idParam, readJson, readParams, route } from '@/lib/http/handler';
import { alertSettingsSchema, setAlertSettings } from '@/lib/insight/settings';

type Ctx = { params: Promise<{ id: string }> };

/** The signed-in member's weekly insight mail for this calculator. */
export const PUT = route<Ctx>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  const settings = await readJson(request, alertSettingsSchema);
  return Response.json({ alerts: await setAlertSettings({ ...actor, request }, id, settings) });
});
