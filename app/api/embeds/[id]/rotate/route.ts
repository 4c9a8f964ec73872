import { requireWorkspace } from '@/lib/auth/guard';
import { describeEmbed, rotateToken } from '@/lib/embeds/service';
import { idParam, readParams, route } from '@/lib/http/handler';

type Ctx = { params: Promise<{ id: string }> };

/** A new token; the old one stops answering. */
export const POST = route<Ctx>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  const embed = await rotateToken({ ...actor, request }, id);
  return Response.json({ embed: describeEmbed(embed) });
});
