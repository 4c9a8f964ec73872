import type { IncomingHttpHeaders, IncomingMessage, ServerResponse } from 'node:http';
import { AppError } from '@/lib/errors';
import { parseWith, toAppError } from '@/lib/http/handler';
import { apiHeaders } from '@/lib/http/security-headers.mjs';
import { corsHeaders, loadServedEmbed, MAX_SCORE_BODY_BYTES, scoreForToken, scoreTokenParam, type ScoreCall } from '@/lib/scoring';
import { requestOrigin, type ClientView } from './forwarding';

/**
 * The public scoring route answered straight from node:http, in front of Next's router.
 * It is the product's hottest path (every visitor's every answer), and Next's per-request
 * routing costs far more than the answer itself. The flow is the same `scoreForToken` the
 * Next route handler (app/api/score/[token]/route.ts) runs; only the adapter differs.
 */
const SCORE_PATH = /^\/api\/score\/([^/?#]*)\/?(?:\?.*)?$/;

/** The token when this is a scoring POST; null for everything Next should serve. */
export function scoringToken(req: IncomingMessage): string | null {
  if (req.method !== 'POST' || !req.url) return null;
  const m = SCORE_PATH.exec(req.url);
  if (!m) return null;
  try {
    return decodeURIComponent(m[1]);
  } catch {
    return '';
  }
}

// Flat [name, value, …] list: node writes it without building a header object per response.
const BASE_HEADERS: string[] = [...apiHeaders().flatMap((h) => [h.key, h.value]), 'Cache-Control', 'no-store', 'Vary', 'Origin', 'Content-Type', 'application/json'];

/**
 * The scoring flow's view of a node request. A class rather than an object of arrow
 * functions: nothing is allocated per request but this one object.
 */
class NodeScoreCall implements ScoreCall {
  readonly headers: { get(name: string): string | null };
  readonly address: string | null;
  readonly requestOrigin: string;

  constructor(
    private readonly req: IncomingMessage,
    client: ClientView,
  ) {
    this.headers = this;
    this.address = client.address;
    this.requestOrigin = requestOrigin(req, client);
  }

  get(name: string): string | null {
    const v = (this.req.headers as IncomingHttpHeaders)[name.toLowerCase()];
    if (v === undefined) return null;
    return Array.isArray(v) ? v.join(', ') : v;
  }

  text(): Promise<string> {
    return readBody(this.req, MAX_SCORE_BODY_BYTES);
  }
}

function nothing(): null {
  return null;
}

/** The body as text, refused (413) as soon as it passes `max` bytes, whatever Content-Length said. */
function readBody(req: IncomingMessage, max: number): Promise<string> {
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = [];
    let size = 0;
    let done = false;
    req.on('data', (chunk: Buffer) => {
      if (done) return;
      size += chunk.length;
      if (size > max) {
        done = true;
        reject(new AppError('payload_too_large', `The body is larger than ${max} bytes.`));
        return;
      }
      chunks.push(chunk);
    });
    req.on('end', () => {
      if (!done) resolve(Buffer.concat(chunks).toString('utf8'));
    });
    req.on('error', (e) => {
      if (!done) reject(e);
      done = true;
    });
  });
}

function send(res: ServerResponse, status: number, body: string, extra: Record<string, string> | null): void {
  const headers = [...BASE_HEADERS, 'Content-Length', String(Buffer.byteLength(body))];
  if (extra) for (const key in extra) headers.push(key, extra[key]);
  res.writeHead(status, headers);
  res.end(body);
}

export async function answerScore(req: IncomingMessage, res: ServerResponse, token: string, client: ClientView): Promise<void> {
  const call = new NodeScoreCall(req, client);
  let allowOrigin: string | undefined;
  try {
    // The same check and message as the route's params (only a long token can fail it).
    if (token.length > 64) parseWith(scoreTokenParam, { token }, 'address');
    // Browsers send Origin: known first, so an allowed host page can read refusals too.
    if (req.headers.origin) allowOrigin = corsHeaders(call, await loadServedEmbed(token).catch(nothing))['Access-Control-Allow-Origin'];
    const { answer } = await scoreForToken(token, call);
    send(res, 200, JSON.stringify(answer), allowOrigin ? { 'Access-Control-Allow-Origin': allowOrigin } : null);
  } catch (error) {
    const e = toAppError(error, `POST /api/score (fast path)`);
    send(res, e.status, JSON.stringify(e.toJSON()), allowOrigin ? { ...e.headers, 'Access-Control-Allow-Origin': allowOrigin } : e.headers);
    // Whatever of the body was not read is not worth reading.
    if (!req.readableEnded) req.resume();
  }
}
