/**
 * A small token-bucket rate limiter shared by every route that needs one (failed
 * sign-ins, sign-up, password-reset mails, public scoring…).
 *
 * Buckets live in memory, per server process. That is a cache safe to lose: a
 * restart only forgets recent attempts (everyone gets a full bucket again), and
 * nothing durable depends on it. Several processes each limit on their own; behind a
 * load balancer, swap the Map for a shared store (Redis INCR/PEXPIRE) with the same
 * function signatures.
 *
 *   const r = takeToken(`signin:acct:${email}`, { limit: 5, windowMs: 15 * 60_000 });
 *   if (!r.ok) throw new AppError('rate_limited', '…', { headers: { 'Retry-After': String(r.retryAfterSeconds) } });
 */
export interface LimitOptions {
  /** Requests allowed in a burst (the bucket's size). */
  limit: number;
  /** Time in which a drained bucket refills completely. */
  windowMs: number;
}

export interface LimitResult {
  ok: boolean;
  /** Whole tokens left after this call. */
  remaining: number;
  /** Seconds until one more request would be allowed (0 when ok). */
  retryAfterSeconds: number;
}

interface Bucket {
  tokens: number;
  updatedAt: number;
  limit: number;
  windowMs: number;
}

// One map per process, kept on globalThis so every bundle of the server shares it.
const store: Map<string, Bucket> = ((globalThis as { __partwiseRateLimit?: Map<string, Bucket> }).__partwiseRateLimit ??= new Map());
const SWEEP_AT = 10_000;

let clock: () => number = () => Date.now();

function refill(bucket: Bucket, now: number): void {
  const rate = bucket.limit / bucket.windowMs;
  bucket.tokens = Math.min(bucket.limit, bucket.tokens + (now - bucket.updatedAt) * rate);
  bucket.updatedAt = now;
}

function bucketFor(key: string, opts: LimitOptions, now: number): Bucket {
  let bucket = store.get(key);
  if (!bucket || bucket.limit !== opts.limit || bucket.windowMs !== opts.windowMs) {
    if (!bucket && store.size >= SWEEP_AT) sweep(now);
    bucket = { tokens: opts.limit, updatedAt: now, limit: opts.limit, windowMs: opts.windowMs };
    store.set(key, bucket);
  } else {
    refill(bucket, now);
  }
  return bucket;
}

function result(bucket: Bucket, ok: boolean): LimitResult {
  const missing = Math.max(0, 1 - bucket.tokens);
  const retryAfterSeconds = ok ? 0 : Math.max(1, Math.ceil((missing * bucket.windowMs) / bucket.limit / 1000));
  return { ok, remaining: Math.floor(bucket.tokens), retryAfterSeconds };
}

function check(opts: LimitOptions) {
  if (!(opts.limit >= 1) || !(opts.windowMs > 0)) throw new Error('rate limit needs limit >= 1 and windowMs > 0');
}

/** Take one token for `key`; `ok: false` (and nothing taken) when the bucket is empty. */
export function takeToken(key: string, opts: LimitOptions): LimitResult {
  check(opts);
  const now = clock();
  const bucket = bucketFor(key, opts, now);
  if (bucket.tokens < 1) return result(bucket, false);
  bucket.tokens -= 1;
  return result(bucket, true);
}

/** The result of `takeTokens`: `blocked` is the index of the first bucket that refused. */
export interface MultiLimitResult extends LimitResult {
  blocked: number;
}

/**
 * Take one token from every bucket, or from none: `ok: false` when any of them is
 * empty, with `retryAfterSeconds` of the one that will take longest to allow a request.
 * For limits that stack (a minute, an hour and a day bucket of one calculator), so a
 * refusal by one bucket spends nothing of the others.
 */
export function takeTokens(buckets: readonly { key: string; opts: LimitOptions }[]): MultiLimitResult {
  const now = clock();
  const found: Bucket[] = [];
  let blocked = -1;
  let wait = 0;
  for (let i = 0; i < buckets.length; i++) {
    check(buckets[i].opts);
    const bucket = bucketFor(buckets[i].key, buckets[i].opts, now);
    found.push(bucket);
    if (bucket.tokens < 1) {
      if (blocked < 0) blocked = i;
      wait = Math.max(wait, result(bucket, false).retryAfterSeconds);
    }
  }
  if (blocked >= 0) return { ok: false, remaining: 0, retryAfterSeconds: wait, blocked };
  let remaining = Infinity;
  for (const bucket of found) {
    bucket.tokens -= 1;
    remaining = Math.min(remaining, Math.floor(bucket.tokens));
  }
  return { ok: true, remaining: Number.isFinite(remaining) ? remaining : 0, retryAfterSeconds: 0, blocked: -1 };
}

/** The limiter's clock (the test clock when one is set), for callers that label windows. */
export function limitClock(): number {
  return clock();
}

/** Would `takeToken` succeed now? Takes nothing. */
export function peekToken(key: string, opts: LimitOptions): LimitResult {
  check(opts);
  const now = clock();
  const bucket = store.get(key);
  if (!bucket) return { ok: true, remaining: opts.limit, retryAfterSeconds: 0 };
  const copy = { ...bucket };
  if (copy.limit === opts.limit && copy.windowMs === opts.windowMs) refill(copy, now);
  else return { ok: true, remaining: opts.limit, retryAfterSeconds: 0 };
  return result(copy, copy.tokens >= 1);
}

/** Forget a key (e.g. after a successful sign-in clears the failed-attempt count). */
export function resetLimit(key: string): void {
  store.delete(key);
}

/** Drop buckets that have refilled completely; they carry no information. */
function sweep(now: number) {
  for (const [key, bucket] of store) {
    refill(bucket, now);
    if (bucket.tokens >= bucket.limit) store.delete(key);
  }
}

/** Tests only: a controllable clock, and a way to start from empty buckets. */
export const rateLimitTesting = {
  setClock(fn: (() => number) | null) {
    clock = fn ?? (() => Date.now());
  },
  clear() {
    store.clear();
  },
  size: () => store.size,
};
