import { requireApiKey } from '@/lib/auth/api-keys';
import { discardBody } from '@/lib/http/body';
import { idParam, parseWith, readParams, route } from '@/lib/http/handler';
import { batchFormat, batchQuery, scoreBatchRequest } from '@/lib/scoring/batch-service';

type Ctx = { params: Promise<{ id: string }> };

/** Score a batch of rows against the calculator's served version, one metered answer per row [score]. */
export const POST = route<Ctx>(async (request, { params }) => {
  const actor = await requireApiKey(request, 'score');
  let query;
  let id;
  try {
    ({ id } = await readParams(params, idParam));
    query = parseWith(batchQuery, Object.fromEntries(new URL(request.url).searchParams), 'query');
  } catch (error) {
    await discardBody(request.body);
    throw error;
  }
  const answer = await scoreBatchRequest({
    workspaceId: actor.workspace.id,
    embedId: id,
    body: request.body,
    contentType: request.headers.get('content-type') ?? '',
    format: batchFormat(query.format, request.headers.get('accept')),
  });
  return new Response(answer.stream, {
    headers: { 'content-type': answer.contentType, 'cache-control': 'no-store', 'x-partwise-rows': String(answer.rows), 'x-partwise-version': String(answer.version) },
  });
});
