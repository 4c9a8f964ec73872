import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { consumeLimit, peekLimit, rateLimitTesting, resetLimit, sharedLimits } from '@/lib/rate-limit';

// rate-limiter-flexible's memory store reads Date.now and drops ended windows with
// setTimeout: both are the fake clock here.
beforeEach(() => {
  vi.useFakeTimers({ now: 1_000_000 });
  rateLimitTesting.clear();
});
afterEach(() => vi.useRealTimers());

describe('consumeLimit (memory store, no REDIS_URL)', () => {
  const opts = { limit: 3, windowMs: 60_000 };

  it('is the memory store when REDIS_URL is not set', () => {
    expect(sharedLimits()).toBe(false);
  });

  it('allows `limit` requests in a window, then refuses until the window ends', async () => {
    const first = await consumeLimit('k', opts);
    expect(first).toEqual({ ok: true, remaining: 2, retryAfterSeconds: 0 });
    expect((await Promise.all([2, 3].map(() => consumeLimit('k', opts)))).map((r) => r.ok)).toEqual([true, true]);
    vi.advanceTimersByTime(15_000);
    const refused = await consumeLimit('k', opts);
    expect(refused).toEqual({ ok: false, remaining: 0, retryAfterSeconds: 45 });
  });

  it('opens a new window once the old one has ended, not before', async () => {
    for (let i = 0; i < 3; i++) await consumeLimit('k', opts);
    vi.advanceTimersByTime(59_000);
    expect((await consumeLimit('k', opts)).retryAfterSeconds).toBe(1);
    vi.advanceTimersByTime(1_000);
    expect(await consumeLimit('k', opts)).toEqual({ ok: true, remaining: 2, retryAfterSeconds: 0 });
  });

  it('counts exactly when many requests arrive at once', async () => {
    const results = await Promise.all(Array.from({ length: 50 }, () => consumeLimit('crowd', { limit: 17, windowMs: 60_000 })));
    expect(results.filter((r) => r.ok).length).toBe(17);
  });

  it('keeps keys apart, peeks without counting, and resets', async () => {
    for (let i = 0; i < 3; i++) await consumeLimit('a', opts);
    expect((await consumeLimit('b', opts)).ok).toBe(true);
    expect((await peekLimit('a', opts)).ok).toBe(false);
    expect(await peekLimit('b', opts)).toMatchObject({ ok: true, remaining: 2 });
    expect(await peekLimit('b', opts)).toMatchObject({ ok: true, remaining: 2 });
    expect(await peekLimit('never', opts)).toEqual({ ok: true, remaining: 3, retryAfterSeconds: 0 });
    await resetLimit('a', opts);
    expect((await consumeLimit('a', opts)).ok).toBe(true);
  });

  it('peeks an ended window as empty', async () => {
    for (let i = 0; i < 3; i++) await consumeLimit('a', opts);
    vi.setSystemTime(Date.now() + 61_000); // the clock moves, the store's timer has not fired
    expect(await peekLimit('a', opts)).toEqual({ ok: true, remaining: 3, retryAfterSeconds: 0 });
  });

  it('counts a changed limit on its own', async () => {
    for (let i = 0; i < 3; i++) await consumeLimit('k', opts);
    expect((await consumeLimit('k', { limit: 4, windowMs: 60_000 })).ok).toBe(true);
  });

  it('drops ended windows from memory', async () => {
    await consumeLimit('k', opts);
    expect(vi.getTimerCount()).toBe(1);
    vi.advanceTimersByTime(60_000);
    expect(vi.getTimerCount()).toBe(0);
  });

  it('rejects nonsense options', async () => {
    await expect(consumeLimit('k', { limit: 0, windowMs: 1 })).rejects.toThrow(/limit >= 1/);
    await expect(consumeLimit('k', { limit: 1, windowMs: 0 })).rejects.toThrow(/window > 0/);
  });
});
