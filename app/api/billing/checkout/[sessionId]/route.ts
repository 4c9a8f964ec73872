import { z } from 'zod';
import { requireWorkspace } from '@/lib/auth/guard';
import { checkoutStatus } from '@/lib/billing/subscriptions';
import { readParams, route } from '@/lib/http/handler';

const params = z.object({ sessionId: z.string().regex(/^cs_[A-Za-z0-9_]{8,120}$/, 'not a checkout id') });

/** Where a checkout stands, as confirmed by our own records (the return page polls this). */
export const GET = route<{ params: Promise<{ sessionId: string }> }>(async (request, { params: p }) => {
  const actor = await requireWorkspace(request, 'owner');
  const { sessionId } = await readParams(p, params);
  return Response.json(await checkoutStatus(actor, sessionId), { headers: { 'cache-control': 'no-store' } });
});
