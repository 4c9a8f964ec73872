import type { IncomingMessage, ServerResponse } from 'node:http';
import { AppError } from '@/lib/errors';
import { apiHeaders } from '@/lib/http/security-headers.mjs';

/**
 * Requests Next's router answers badly, settled in front of it by the app server:
 * a path with broken percent-encoding ("/embed/%E0%A4%A", "/studio/models/%ZZ") made
 * Next's param decoding throw, and a method a route file does not export gets Next's
 * bare 405 (empty body). API clients get the app's JSON error for both; page visitors
 * get the HTML page-not-found.
 */

/** The path part of a request target, without the query. */
function pathOf(url: string): string {
  const q = url.indexOf('?');
  return q < 0 ? url : url.slice(0, q);
}

export function isApiPath(url: string): boolean {
  const path = pathOf(url);
  return path === '/api' || path.startsWith('/api/');
}

/** True when the path has a % escape that does not decode to UTF-8 text. */
export function hasMalformedEncoding(url: string): boolean {
  const path = pathOf(url);
  if (!path.includes('%')) return false;
  try {
    decodeURIComponent(path);
    return false;
  } catch {
    return true;
  }
}

/** No route can live here: folders starting with _ are private in the App Router. */
export const NOT_FOUND_PATH = '/_no-such-page';

function sendJson(res: ServerResponse, error: AppError, head: boolean): void {
  const body = JSON.stringify(error.toJSON());
  const headers: Record<string, string> = { 'Content-Type': 'application/json', 'Cache-Control': 'no-store', 'Content-Length': String(Buffer.byteLength(body)) };
  for (const h of apiHeaders()) headers[h.key] = h.value;
  res.writeHead(error.status, { ...headers, ...error.headers });
  res.end(head ? undefined : body);
}

/**
 * Settles a path with broken percent-encoding: API paths are answered here (400 JSON,
 * returns true); page paths are pointed at an address no page has, so Next renders
 * its HTML 404 (returns false: hand the request to Next).
 */
export function settleMalformedPath(req: IncomingMessage, res: ServerResponse): boolean {
  const url = req.url ?? '/';
  if (!hasMalformedEncoding(url)) return false;
  if (isApiPath(url)) {
    sendJson(res, new AppError('bad_request', 'The address is not valid: it has a % escape that is not UTF-8 text (like %ZZ or a cut-off %E0%A4).'), req.method === 'HEAD');
    req.resume();
    return true;
  }
  req.url = NOT_FOUND_PATH;
  return false;
}

/** An end() call that carries no body (Next ends bare answers with `end()`). */
function carriesNoBody(args: unknown[]): boolean {
  const chunk = args[0];
  return chunk === undefined || chunk === null || typeof chunk === 'function' || (chunk as { length?: number }).length === 0;
}

/**
 * Next answers a method a route file does not export with 405 and no body, and a
 * method name it does not know with 400 and no body. For /api paths such a bare answer
 * becomes the app's JSON error; answers our routes write (always with a Content-Type)
 * pass untouched. The headers are set in writeHead, which runs however the head goes
 * out (Next's compression layer writes it before passing end() on).
 */
export function jsonForBareApiErrors(req: IncomingMessage, res: ServerResponse): void {
  if (!isApiPath(req.url ?? '/')) return;
  let body: string | null = null;
  const isBare = (r: ServerResponse, status: number) => (status === 405 || status === 400) && !r.hasHeader('content-type');

  const writeHead = res.writeHead;
  res.writeHead = function patchedWriteHead(this: ServerResponse, status: number, ...rest: unknown[]) {
    // Headers passed here directly (not set before) are our own writers'; they always name a type.
    if (body === null && rest.length === 0 && isBare(this, status)) {
      const error =
        status === 405
          ? new AppError('method_not_allowed', `This address does not answer ${req.method} requests.`)
          : new AppError('bad_request', `${req.method} is not a request method this service answers.`);
      body = JSON.stringify(error.toJSON());
      this.setHeader('Content-Type', 'application/json');
      this.setHeader('Cache-Control', 'no-store');
      this.setHeader('Content-Length', String(Buffer.byteLength(body)));
    }
    return (writeHead as (...a: unknown[]) => ServerResponse).call(this, status, ...rest);
  } as ServerResponse['writeHead'];

  const end = res.end as (...a: unknown[]) => ServerResponse;
  res.end = function patchedEnd(this: ServerResponse, ...args: unknown[]) {
    if (!this.headersSent && carriesNoBody(args) && isBare(this, this.statusCode)) this.writeHead(this.statusCode);
    if (body !== null && carriesNoBody(args)) {
      const done = args.find((a) => typeof a === 'function') as (() => void) | undefined;
      const text = body;
      body = null;
      return req.method === 'HEAD' ? end.call(this, done) : end.call(this, text, 'utf8', done);
    }
    return end.apply(this, args);
  } as ServerResponse['end'];
}
