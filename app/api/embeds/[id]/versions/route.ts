import { requireWorkspace } from '@/lib/auth/guard';
import { describeEmbed, describeVersion, listVersions, publishVersion, publishVersionSchema } from '@/lib/embeds/service';
import { idParam, readJson, readParams, route } from '@/lib/http/handler';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  const versions = await listVersions(actor, id);
  return Response.json({ versions: versions.map(describeVersion) });
});

/** Publish again: a new immutable version, served at once unless `activate: false`. */
export const POST = route<Ctx>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  const input = await readJson(request, publishVersionSchema);
  const { embed, version } = await publishVersion({ ...actor, request }, id, input);
  return Response.json({ embed: describeEmbed(embed), version: describeVersion(version) }, { status: 201 });
});
