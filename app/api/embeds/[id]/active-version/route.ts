import { requireWorkspace } from '@/lib/auth/guard';
import { describeEmbed, servedVersionSchema, setActiveVersion } from '@/lib/embeds/service';
import { idParam, readJson, readParams, route } from '@/lib/http/handler';

type Ctx = { params: Promise<{ id: string }> };

/** Choose the version the token serves (roll back or forward). */
export const PUT = route<Ctx>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  const { versionId } = await readJson(request, servedVersionSchema);
  const embed = await setActiveVersion({ ...actor, request }, id, versionId);
  return Response.json({ embed: describeEmbed(embed) });
});
