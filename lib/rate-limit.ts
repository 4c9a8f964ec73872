import { RateLimiterMemory, RateLimiterRedis, RateLimiterRes } from 'rate-limiter-flexible';
import { redisClient, redisUrl } from '@/lib/shared/redis';

/**
 * A small token-bucket rate limiter shared by every route that needs one (failed
 * sign-ins, sign-up, password-reset mails, public scoring…).
 *
 * Buckets live in memory, per server process. That is a cache safe to lose: a
 * restart only forgets recent attempts (everyone gets a full bucket again), and
 * nothing durable depends on it. These synchronous buckets stay the limiter of one
 * process (and of sign-in, sign-up and mail limits everywhere).
 *
 * With REDIS_URL set, the public scoring limits that must hold across app instances
 * (per address, per calculator, the calculator's burst windows) go through
 * `takeSharedToken`/`takeSharedTokens`: rate-limiter-flexible's Redis store (a
 * fixed window of `limit` points per `windowMs`, counted atomically in Redis by every
 * instance), with its memory store as insurance while Redis cannot be reached (each
 * instance then limits on its own, as without Redis). Without REDIS_URL those two
 * answer from the synchronous buckets here, so one process behaves exactly as before.
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

// ---- Shared limits (REDIS_URL): rate-limiter-flexible's Redis store -------------------

/** Are the scoring limits shared through Redis in this process? */
export function sharedLimits(): boolean {
  return redisUrl() !== null;
}

const redisLimiters = ((globalThis as Record<symbol, unknown>)[Symbol.for('partwise.redisLimiters')] ??= new Map<string, RateLimiterRedis>()) as Map<string, RateLimiterRedis>;

function redisLimiter(opts: LimitOptions): RateLimiterRedis {
  check(opts);
  const name = `${opts.limit}:${opts.windowMs}`;
  let limiter = redisLimiters.get(name);
  if (!limiter) {
    const duration = Math.max(1, Math.ceil(opts.windowMs / 1000));
    limiter = new RateLimiterRedis({
      storeClient: redisClient()!,
      // Options in the prefix: a changed limit starts its own count instead of reading another's.
      keyPrefix: `partwise:rl:${name}`,
      points: opts.limit,
      duration,
      // Redis away: answer at once from this process's own count instead of waiting for it.
      rejectIfRedisNotReady: true,
      insuranceLimiter: new RateLimiterMemory({ keyPrefix: `partwise:rl-local:${name}`, points: opts.limit, duration }),
    });
    redisLimiters.set(name, limiter);
  }
  return limiter;
}

function fromRes(res: RateLimiterRes, ok: boolean): LimitResult {
  return { ok, remaining: Math.max(0, res.remainingPoints), retryAfterSeconds: ok ? 0 : Math.max(1, Math.ceil(res.msBeforeNext / 1000)) };
}

async function consumeShared(key: string, opts: LimitOptions): Promise<LimitResult> {
  try {
    return fromRes(await redisLimiter(opts).consume(key, 1), true);
  } catch (refusal) {
    if (refusal instanceof RateLimiterRes) return fromRes(refusal, false);
    throw refusal;
  }
}

/** `takeToken`, counted across every instance when REDIS_URL is set (else exactly `takeToken`). */
export async function takeSharedToken(key: string, opts: LimitOptions): Promise<LimitResult> {
  if (!sharedLimits()) return takeToken(key, opts);
  return consumeShared(key, opts);
}

/**
 * `takeTokens` across every instance: a point from every window or, in effect, from
 * none (a refusal by one gives back the points the others took). Without REDIS_URL,
 * exactly `takeTokens`.
 */
export async function takeSharedTokens(buckets: readonly { key: string; opts: LimitOptions }[]): Promise<MultiLimitResult> {
  if (!sharedLimits()) return takeTokens(buckets);
  const results = await Promise.all(buckets.map((b) => consumeShared(b.key, b.opts)));
  const blocked = results.findIndex((r) => !r.ok);
  if (blocked < 0) return { ok: true, remaining: Math.min(...results.map((r) => r.remaining)), retryAfterSeconds: 0, blocked: -1 };
  await giveBackShared(buckets.filter((_, i) => results[i].ok));
  return { ok: false, remaining: 0, retryAfterSeconds: Math.max(...results.map((r) => r.retryAfterSeconds)), blocked };
}

/** Return one point to each bucket (a request refused later, after its points were taken). */
export async function giveBackShared(buckets: readonly { key: string; opts: LimitOptions }[]): Promise<void> {
  if (!sharedLimits()) {
    for (const b of buckets) {
      const bucket = store.get(b.key);
      if (bucket) bucket.tokens = Math.min(bucket.limit, bucket.tokens + 1);
    }
    return;
  }
  await Promise.all(buckets.map((b) => redisLimiter(b.opts).reward(b.key, 1).catch(() => {})));
}

/** Tests: forget the shared limiters (their Redis connection may have changed). */
export function resetSharedLimiters(): void {
  redisLimiters.clear();
}
