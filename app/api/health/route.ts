import { checkHealth } from '@/lib/health';
import { route } from '@/lib/http/handler';

export const dynamic = 'force-dynamic';

export const GET = route(async () => {
  const report = await checkHealth();
  return Response.json(report, { status: report.ok ? 200 : 503, headers: { 'Cache-Control': 'no-store' } });
});
