import { z } from 'zod';
import { requireWorkspace } from '@/lib/auth/guard';
import { previewPlanChange } from '@/lib/billing/subscriptions';
import { parseWith, route } from '@/lib/http/handler';
import { PLAN_IDS } from '@/lib/plans';

const query = z.object({ plan: z.enum(PLAN_IDS, { error: `Name a plan: ${PLAN_IDS.join(', ')}.` }) });

/** What switching to `plan` would charge now and what credit it leaves; changes nothing. */
export const GET = route(async (request) => {
  const actor = await requireWorkspace(request, 'owner');
  const { plan } = parseWith(query, Object.fromEntries(new URL(request.url).searchParams), 'address');
  return Response.json({ preview: await previewPlanChange(actor, plan) });
});
