import { AppError } from '@/lib/errors';
import { readParams, route } from '@/lib/http/handler';
import { corsHeaders, loadServedEmbed, scoreCallFrom, scoreForToken, scoreTokenParam } from '@/lib/scoring';

type Ctx = { params: Promise<{ token: string }> };

/**
 * Public: score one visitor's values against the version the token serves. The app
 * server (lib/server) answers this path itself before Next's router, through the same
 * flow; this handler serves `next dev`, tests, and any host that runs plain `next start`.
 */
export async function POST(request: Request, context: Ctx): Promise<Response> {
  let cors: Record<string, string> = { Vary: 'Origin' };
  const response = await route<Ctx>(async (req, { params }) => {
    const { token } = await readParams(params, scoreTokenParam);
    // Headers first, so an allowed host page can read refusals too (the lookup is cached).
    cors = corsHeaders(req, await loadServedEmbed(token).catch(() => null));
    const { answer } = await scoreForToken(token, scoreCallFrom(req));
    return Response.json(answer, { headers: { 'Cache-Control': 'no-store' } });
  }, { origin: 'any' })(request, context);
  for (const [k, v] of Object.entries(cors)) response.headers.set(k, v);
  response.headers.set('Cache-Control', 'no-store');
  return response;
}

/** CORS preflight for host pages on the embed's allowed origins that call the route directly. */
export const OPTIONS = route<Ctx>(async (request, { params }) => {
  const { token } = await readParams(params, scoreTokenParam);
  const embed = await loadServedEmbed(token);
  if (!embed) throw new AppError('not_found', 'There is no calculator at this address.');
  const cors = corsHeaders(request, embed);
  if (!cors['Access-Control-Allow-Origin']) throw new AppError('forbidden', 'This calculator does not answer requests from this website.');
  return new Response(null, {
    status: 204,
    headers: { ...cors, 'Access-Control-Allow-Methods': 'POST', 'Access-Control-Allow-Headers': 'content-type', 'Access-Control-Max-Age': '600' },
  });
});
