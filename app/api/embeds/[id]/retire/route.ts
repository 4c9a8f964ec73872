import { requireWorkspace } from '@/lib/auth/guard';
import { describeEmbed, retireEmbed } from '@/lib/embeds/service';
import { idParam, readParams, route } from '@/lib/http/handler';

type Ctx = { params: Promise<{ id: string }> };

/** Stop serving the calculator for good. */
export const POST = route<Ctx>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  const embed = await retireEmbed({ ...actor, request }, id);
  return Response.json({ embed: describeEmbed(embed) });
});
