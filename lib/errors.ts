/**
 * The app's one error type. Throw it anywhere below a route handler; the handler
 * wrapper turns it into a JSON response with the mapped status. Anything that is
 * not an AppError becomes a 500 whose body hides the internals.
 */
export const ERROR_STATUS = {
  bad_request: 400,
  invalid_input: 422,
  unauthenticated: 401,
  forbidden: 403,
  not_found: 404,
  method_not_allowed: 405,
  conflict: 409,
  gone: 410,
  payload_too_large: 413,
  unsupported_media_type: 415,
  rate_limited: 429,
  plan_limit: 402,
  unavailable: 503,
  upstream_failed: 502,
  internal: 500,
} as const;

export type ErrorCode = keyof typeof ERROR_STATUS;

/** One problem with one input: `field` is a dotted path, a column name, or "row 12, column speed". */
export interface FieldIssue {
  field: string;
  message: string;
  /** A value that would be accepted, when there is an obvious one (a form may offer it). */
  suggestion?: string;
}

export class AppError extends Error {
  readonly code: ErrorCode;
  readonly issues: FieldIssue[];
  readonly headers: Record<string, string>;

  constructor(code: ErrorCode, message: string, opts: { issues?: FieldIssue[]; headers?: Record<string, string>; cause?: unknown } = {}) {
    super(message, { cause: opts.cause });
    this.name = 'AppError';
    this.code = code;
    this.issues = opts.issues ?? [];
    this.headers = opts.headers ?? {};
  }

  get status(): number {
    return ERROR_STATUS[this.code];
  }

  toJSON() {
    return { error: { code: this.code, message: this.message, ...(this.issues.length ? { issues: this.issues } : {}) } };
  }

  toResponse(): Response {
    return Response.json(this.toJSON(), { status: this.status, headers: this.headers });
  }

  /** Wrap anything thrown into an AppError; unknown errors keep no detail for the client. */
  static from(error: unknown): AppError {
    if (error instanceof AppError) return error;
    // A write that waited out the busy timeout: the database is busy, not broken.
    if (isDatabaseBusy(error)) {
      return new AppError('unavailable', 'The service is busy right now. Please try again in a moment.', { cause: error, headers: { 'Retry-After': '2' } });
    }
    return new AppError('internal', 'Something went wrong on our side. Please try again.', { cause: error });
  }
}

function isDatabaseBusy(error: unknown): boolean {
  for (let e = error as { message?: string; code?: string; parent?: unknown; original?: unknown } | undefined, depth = 0; e && depth < 4; depth++) {
    if (e.code === 'SQLITE_BUSY' || e.code === 'SQLITE_LOCKED' || /SQLITE_BUSY|database is locked/i.test(String(e.message ?? ''))) return true;
    // PostgreSQL: a lock wait past lock_timeout, a deadlock, a serialization failure.
    if (e.code === '55P03' || e.code === '40P01' || e.code === '40001') return true;
    e = (e.parent ?? e.original) as typeof e;
  }
  return false;
}
