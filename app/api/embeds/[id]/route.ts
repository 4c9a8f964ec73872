import { requireWorkspace } from '@/lib/auth/guard';
import { describeEmbed, describeVersion, embedSettingsSchema, findEmbed, listVersions, updateSettings } from '@/lib/embeds/service';
import { idParam, readJson, readParams, route } from '@/lib/http/handler';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  const embed = await findEmbed(actor, id);
  const versions = await listVersions(actor, id);
  return Response.json({ embed: describeEmbed(embed), versions: versions.map(describeVersion) });
});

/** Title, allowed origins, theme, accent colour and the typicality threshold. */
export const PATCH = route<Ctx>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  const settings = await readJson(request, embedSettingsSchema);
  const embed = await updateSettings({ ...actor, request }, id, settings);
  return Response.json({ embed: describeEmbed(embed) });
});
