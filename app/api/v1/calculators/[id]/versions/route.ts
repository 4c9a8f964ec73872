import { keyActing } from '@/lib/api/v1';
import { requireApiKey } from '@/lib/auth/api-keys';
import { describeEmbed, describeVersion, publishVersion, publishVersionSchema } from '@/lib/embeds/service';
import { idParam, readJson, readParams, route } from '@/lib/http/handler';

type Ctx = { params: Promise<{ id: string }> };

/** Publish again: a new immutable version of this or another model, served at once unless activate is false [publish]. */
export const POST = route<Ctx>(async (request, { params }) => {
  const actor = await requireApiKey(request, 'publish');
  const { id } = await readParams(params, idParam);
  const input = await readJson(request, publishVersionSchema);
  const { embed, version } = await publishVersion(keyActing(actor, request), id, input);
  return Response.json({ calculator: describeEmbed(embed), version: describeVersion(version) }, { status: 201 });
});
