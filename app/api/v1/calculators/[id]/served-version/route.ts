import { keyActing } from '@/lib/api/v1';
import { requireApiKey } from '@/lib/auth/api-keys';
import { describeEmbed, servedVersionSchema, setActiveVersion } from '@/lib/embeds/service';
import { idParam, readJson, readParams, route } from '@/lib/http/handler';

type Ctx = { params: Promise<{ id: string }> };

/** Serve a version of this calculator (roll forward or back) [publish]. */
export const PUT = route<Ctx>(async (request, { params }) => {
  const actor = await requireApiKey(request, 'publish');
  const { id } = await readParams(params, idParam);
  const { versionId } = await readJson(request, servedVersionSchema);
  const embed = await setActiveVersion(keyActing(actor, request), id, versionId);
  return Response.json({ calculator: describeEmbed(embed) });
});
