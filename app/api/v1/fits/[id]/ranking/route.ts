import { rankingView } from '@/lib/api/v1';
import { requireApiKey } from '@/lib/auth/api-keys';
import { findFit } from '@/lib/fitting/jobs';
import { idParam, readParams, route } from '@/lib/http/handler';

type Ctx = { params: Promise<{ id: string }> };

/** A finished fit's candidates, ranked by BIC with AIC beside it; 409 while it runs [read]. */
export const GET = route<Ctx>(async (request, { params }) => {
  const actor = await requireApiKey(request, 'read');
  const { id } = await readParams(params, idParam);
  return Response.json({ ranking: rankingView(await findFit(actor.workspace.id, id)) });
});
