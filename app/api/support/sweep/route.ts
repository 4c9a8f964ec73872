import { requireStaff } from '@/lib/auth/guard';
import { route } from '@/lib/http/handler';
import { sweepForSpikes } from '@/lib/support';

/** Staff: run the spike check now instead of waiting for the timer. */
export const POST = route(async (request) => {
  await requireStaff(request);
  const { flagged, checked } = await sweepForSpikes();
  return Response.json({ flagged, checked: checked.length });
});
