import { requireWorkspace } from '@/lib/auth/guard';
import { describeEmbed, describeVersion, listEmbeds, publishNew, publishSchema } from '@/lib/embeds/service';
import { readJson, route } from '@/lib/http/handler';

/** The workspace's calculators. */
export const GET = route(async (request) => {
  const actor = await requireWorkspace(request, 'member');
  const embeds = await listEmbeds({ ...actor, request });
  return Response.json({ embeds: embeds.map(describeEmbed) });
});

/** Publish a model as a new calculator (first version, new token). */
export const POST = route(async (request) => {
  const actor = await requireWorkspace(request, 'member');
  const input = await readJson(request, publishSchema);
  const { embed, version } = await publishNew({ ...actor, request }, input);
  return Response.json({ embed: describeEmbed(embed), version: describeVersion(version) }, { status: 201 });
});
