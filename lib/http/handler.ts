import { ZodError, type ZodType, z } from 'zod';
import { AppError, type FieldIssue } from '@/lib/errors';
import { decimalId } from './ids';
import { declaredLength, discardBody, readTextCapped } from './body';
import { assertSameOrigin } from './origin';

/** zod issues → our field issues, with dotted paths a form can map back to fields. */
export function zodIssues(error: ZodError): FieldIssue[] {
  return error.issues.flatMap((i) => {
    const at = i.path.map(String);
    // A strict object's unknown keys: one issue per key, named by its own path.
    if (i.code === 'unrecognized_keys') return i.keys.map((k) => ({ field: [...at, k].join('.'), message: `is not a field here (${i.message}).` }));
    return [{ field: at.join('.') || '(body)', message: i.message }];
  });
}

export function parseWith<T>(schema: ZodType<T>, value: unknown, what = 'input'): T {
  const result = schema.safeParse(value);
  if (!result.success) {
    const issues = zodIssues(result.error);
    throw new AppError('invalid_input', `The ${what} has ${issues.length} problem${issues.length === 1 ? '' : 's'}: ${issues.map((i) => `${i.field}: ${i.message}`).join('; ')}`, { issues });
  }
  return result.data;
}

const MAX_JSON_BYTES = 64 * 1024;

/**
 * The parts of a request a JSON body is read from: a web Request (its `body` stream is
 * read here, stopping past the cap), or a source that reads its own text and stops past
 * the cap itself (the server's scoring fast path).
 */
export interface BodySource {
  headers: { get(name: string): string | null };
  body?: ReadableStream<Uint8Array> | null;
  text(): Promise<string>;
}

/** Read a JSON body with a size cap (kept while it streams) and content-type check, then validate it. */
export async function readJson<T>(request: BodySource, schema: ZodType<T>, opts: { maxBytes?: number } = {}): Promise<T> {
  const max = opts.maxBytes ?? MAX_JSON_BYTES;
  const tooLarge = () => new AppError('payload_too_large', `The body is larger than ${max} bytes.`);
  const type = request.headers.get('content-type') ?? '';
  if (!/^application\/json\b/i.test(type)) {
    await discardBody(request.body);
    throw new AppError('unsupported_media_type', 'Send the body as JSON (Content-Type: application/json).');
  }
  if ((declaredLength(request.headers) ?? 0) > max) {
    await discardBody(request.body);
    throw tooLarge();
  }
  const text = request.body !== undefined ? await readTextCapped(request.body, max, tooLarge) : await request.text();
  if (Buffer.byteLength(text) > max) throw tooLarge();
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch {
    throw new AppError('bad_request', 'The body is not valid JSON.');
  }
  return parseWith(schema, value, 'request body');
}

/** Route params arrive as a promise in the App Router; validate them like a body. */
export async function readParams<T>(params: Promise<unknown> | unknown, schema: ZodType<T>): Promise<T> {
  return parseWith(schema, await params, 'address');
}

/** `[id]` segments: decimal digits only (see ids.ts); "0x6", "1e1", "Infinity" are refused, not read as numbers. */
export const idParam = z.object({ id: decimalId() });

/** Anything thrown below a route → the AppError it answers with; unexpected ones are logged here, never shown. */
export function toAppError(error: unknown, where: string): AppError {
  if (error instanceof ZodError) return new AppError('invalid_input', 'The input is not valid.', { issues: zodIssues(error) });
  const appError = AppError.from(error);
  if (appError.code === 'internal') console.error('[partwise] unhandled error in', where, error);
  return appError;
}

type Handler<C> = (request: Request, context: C) => Promise<Response> | Response;

export interface RouteOptions {
  /**
   * 'same' (default): state-changing methods from another site's pages are refused (403).
   * 'any': the route is meant to be called cross-site (public scoring, abuse reports,
   * server-to-server webhooks) and applies its own rules.
   */
  origin?: 'same' | 'any';
}

/**
 * Wrap a route handler: cross-site writes refused, AppError → its status, ZodError → 422,
 * anything else → a 500 that logs the cause on the server and tells the client nothing internal.
 */
export function route<C = { params: Promise<Record<string, string>> }>(fn: Handler<C>, opts: RouteOptions = {}): Handler<C> {
  return async (request, context) => {
    try {
      if (opts.origin !== 'any') assertSameOrigin(request);
      return await fn(request, context);
    } catch (error) {
      return toAppError(error, `${request.method} ${new URL(request.url).pathname}`).toResponse();
    }
  };
}
