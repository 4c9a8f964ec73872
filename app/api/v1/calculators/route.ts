import { keyActing } from '@/lib/api/v1';
import { requireApiKey } from '@/lib/auth/api-keys';
import { describeEmbed, describeVersion, listEmbeds, publishNew, publishSchema } from '@/lib/embeds/service';
import { readJson, route } from '@/lib/http/handler';

/** The workspace's calculators [read]. */
export const GET = route(async (request) => {
  const actor = await requireApiKey(request, 'read');
  const embeds = await listEmbeds(keyActing(actor, request));
  return Response.json({ calculators: embeds.map(describeEmbed) });
});

/** Publish a model as a new calculator: its first version, served at once, and a new address [publish]. */
export const POST = route(async (request) => {
  const actor = await requireApiKey(request, 'publish');
  const input = await readJson(request, publishSchema);
  const { embed, version } = await publishNew(keyActing(actor, request), input);
  return Response.json({ calculator: describeEmbed(embed), version: describeVersion(version) }, { status: 201, headers: { location: `/api/v1/calculators/${embed.id}` } });
});
