import { requireWorkspace } from '@/lib/auth/guard';
import { idParam, parseWith, readJson, readParams, route } from '@/lib/http/handler';
import { insightReport, reportQuery } from '@/lib/insight/report';
import { insightSwitchSchema, setInsightEnabled } from '@/lib/insight/settings';

type Ctx = { params: Promise<{ id: string }> };

/** The answer insight report (`?days=30&version=<id>`), as lib/insight/types.ts InsightReport. */
export const GET = route<Ctx>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  const query = parseWith(reportQuery, Object.fromEntries(new URL(request.url).searchParams), 'query');
  return Response.json(await insightReport(actor, id, query), { headers: { 'cache-control': 'no-store' } });
});

/** Switch counting on or off for the calculator (members, like its other settings). */
export const PUT = route<Ctx>(async (request, { params }) => {
  const actor = await requireWorkspace(request, 'member');
  const { id } = await readParams(params, idParam);
  const { enabled } = await readJson(request, insightSwitchSchema);
  return Response.json(await setInsightEnabled({ ...actor, request }, id, enabled));
});
