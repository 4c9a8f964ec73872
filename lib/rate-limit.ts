import { RateLimiterMemory, RateLimiterRedis, RateLimiterRes, type RateLimiterAbstract } from 'rate-limiter-flexible';
import { redisClient, redisUrl } from '@/lib/shared/redis';

/**
 * Every rate limit of the app (failed sign-ins, sign-up, account mails, reports,
 * public scoring) goes through rate-limiter-flexible: its Redis store when REDIS_URL
 * is set, so every app instance counts in the same keys, and its memory store
 * otherwise (one process, as `npm start` runs).
 *
 * A limit is a fixed window: `limit` requests per `windowMs`, the window starting at
 * the key's first request. A refused request waits until that window ends. Memory
 * counts are a cache safe to lose: a restart only forgets recent attempts.
 *
 *   const r = await consumeLimit(`signin:acct:${email}`, { limit: 5, windowMs: 15 * 60_000 });
 *   if (!r.ok) throw new AppError('rate_limited', '…', { headers: { 'Retry-After': String(r.retryAfterSeconds) } });
 *
 * The memory store counts synchronously inside `consume`, so concurrent requests of one
 * process are counted exactly, in the order they called.
 */
export interface LimitOptions {
  /** Requests allowed in one window. */
  limit: number;
  /** The window's length. */
  windowMs: number;
}

export interface LimitResult {
  ok: boolean;
  /** Requests left in the current window after this call. */
  remaining: number;
  /** Seconds until one more request would be allowed (0 when ok). */
  retryAfterSeconds: number;
}

/** The result of `consumeLimits`: `blocked` is the index of the first limit that refused (-1 when ok). */
export interface MultiLimitResult extends LimitResult {
  blocked: number;
}

export interface KeyedLimit {
  key: string;
  opts: LimitOptions;
}

let storeChoice = { readAt: -Infinity, shared: false };

/** Are the limits counted in Redis, across every instance, in this process? */
export function sharedLimits(): boolean {
  // REDIS_URL looked up at most once a second (reading process.env per answer shows in profiles).
  const now = Date.now();
  if (now - storeChoice.readAt >= 1000 || now < storeChoice.readAt) storeChoice = { readAt: now, shared: redisUrl() !== null };
  return storeChoice.shared;
}

// One limiter per (store, limit, window), kept on globalThis so every bundle of the server shares them.
const limiters = ((globalThis as Record<symbol, unknown>)[Symbol.for('partwise.limiters')] ??= new Map<string, RateLimiterAbstract>()) as Map<string, RateLimiterAbstract>;

function checkOptions(opts: LimitOptions): void {
  if (!(opts.limit >= 1) || !(opts.windowMs > 0)) {
    throw new Error(`A rate limit needs a limit >= 1 and a window > 0 ms (got ${opts.limit} per ${opts.windowMs} ms).`);
  }
}

function limiterFor(opts: LimitOptions): RateLimiterAbstract {
  const shared = sharedLimits();
  const id = `${shared ? 'redis' : 'memory'}:${opts.limit}:${opts.windowMs}`;
  let limiter = limiters.get(id);
  if (limiter) return limiter;
  checkOptions(opts);
  // The options are in the prefix: a changed limit starts its own count instead of reading another's.
  const name = `${opts.limit}:${opts.windowMs}`;
  // Redis keeps whole seconds; the memory store would take fractions, but both count alike.
  const duration = Math.max(1, Math.ceil(opts.windowMs / 1000));
  const local = new RateLimiterMemory({ keyPrefix: `partwise:rl-local:${name}`, points: opts.limit, duration });
  limiter = shared
    ? new RateLimiterRedis({
        storeClient: redisClient()!,
        keyPrefix: `partwise:rl:${name}`,
        points: opts.limit,
        duration,
        // Redis away: answer at once from this process's own count instead of waiting for it.
        rejectIfRedisNotReady: true,
        insuranceLimiter: local,
      })
    : local;
  limiters.set(id, limiter);
  return limiter;
}

function fromRes(res: RateLimiterRes, ok: boolean): LimitResult {
  return { ok, remaining: Math.max(0, res.remainingPoints), retryAfterSeconds: ok ? 0 : Math.max(1, Math.ceil(res.msBeforeNext / 1000)) };
}

const granted = (res: RateLimiterRes): LimitResult => fromRes(res, true);
function refused(refusal: unknown): LimitResult {
  if (refusal instanceof RateLimiterRes) return fromRes(refusal, false);
  throw refusal;
}

/** Count one request against `key`; `ok: false` when its window is already full. */
export async function consumeLimit(key: string, opts: LimitOptions): Promise<LimitResult> {
  try {
    return granted(await limiterFor(opts).consume(key, 1));
  } catch (refusal) {
    return refused(refusal);
  }
}

/**
 * Count one request against every limit, or in effect against none. For limits that
 * stack (a calculator's minute, hour and day), given shortest first: they are taken in
 * that order and the first that refuses stops the rest, so a refusal by the minute
 * spends nothing of the hour or the day; one refused later gives back the points taken
 * before it. (Taking them all at once and giving back afterwards would let a crowd
 * refused by the minute fill the day for a moment, and refuse others by it.)
 * `retryAfterSeconds` is that of the full limit that will take longest to allow a request.
 */
export async function consumeLimits(limits: readonly KeyedLimit[]): Promise<MultiLimitResult> {
  let remaining = Infinity;
  for (let i = 0; i < limits.length; i++) {
    // The store's own promise awaited here, not wrapped: this runs on every scored answer.
    let r: LimitResult;
    try {
      r = granted(await limiterFor(limits[i].opts).consume(limits[i].key, 1));
    } catch (refusal) {
      r = refused(refusal);
    }
    if (r.ok) {
      remaining = Math.min(remaining, r.remaining);
      continue;
    }
    const later = await Promise.all(limits.slice(i + 1).map((l) => peekLimit(l.key, l.opts)));
    await refundLimits(limits.slice(0, i));
    const wait = Math.max(r.retryAfterSeconds, ...later.map((p) => p.retryAfterSeconds));
    return { ok: false, remaining: 0, retryAfterSeconds: wait, blocked: i };
  }
  return { ok: true, remaining: Number.isFinite(remaining) ? remaining : 0, retryAfterSeconds: 0, blocked: -1 };
}

/** Give one request back to each limit (one refused later, after its points were taken). */
export async function refundLimits(limits: readonly KeyedLimit[]): Promise<void> {
  await Promise.all(limits.map((l) => limiterFor(l.opts).reward(l.key, 1).catch(() => {})));
}

/** Would `consumeLimit` succeed now? Counts nothing. */
export async function peekLimit(key: string, opts: LimitOptions): Promise<LimitResult> {
  const res = await limiterFor(opts).get(key);
  // An ended window the memory store has not dropped yet counts as none.
  if (!res || res.msBeforeNext <= 0) return { ok: true, remaining: opts.limit, retryAfterSeconds: 0 };
  const ok = res.consumedPoints < opts.limit;
  return fromRes(res, ok);
}

/** Forget a key's count (e.g. a successful sign-in clears the failed attempts). */
export async function resetLimit(key: string, opts: LimitOptions): Promise<void> {
  await limiterFor(opts).delete(key);
}

/** Tests: start from empty counts (fresh memory stores; Redis limiters bound to the current connection). */
export const rateLimitTesting = {
  clear() {
    limiters.clear();
    storeChoice = { readAt: -Infinity, shared: false };
  },
};
