import { keyActing } from '@/lib/api/v1';
import { requireApiKey } from '@/lib/auth/api-keys';
import { describeEmbed, describeVersion, findEmbed, listVersions } from '@/lib/embeds/service';
import { idParam, readParams, route } from '@/lib/http/handler';

type Ctx = { params: Promise<{ id: string }> };

/** One calculator with its versions, newest first; activeVersionId is the one served [read]. */
export const GET = route<Ctx>(async (request, { params }) => {
  const actor = await requireApiKey(request, 'read');
  const { id } = await readParams(params, idParam);
  const acting = keyActing(actor, request);
  const embed = await findEmbed(acting, id);
  const versions = await listVersions(acting, id);
  return Response.json({ calculator: describeEmbed(embed), versions: versions.map(describeVersion) });
});
