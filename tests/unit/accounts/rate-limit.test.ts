import { afterEach, describe, expect, it } from 'vitest';
import { peekToken, rateLimitTesting, resetLimit, takeToken } from '@/lib/rate-limit';

let now = 1_000_000;
rateLimitTesting.setClock(() => now);
afterEach(() => rateLimitTesting.clear());

describe('takeToken', () => {
  const opts = { limit: 3, windowMs: 60_000 };

  it('allows a burst of `limit`, then refuses with a retry time', () => {
    expect([1, 2, 3].map(() => takeToken('k', opts).ok)).toEqual([true, true, true]);
    const refused = takeToken('k', opts);
    expect(refused.ok).toBe(false);
    expect(refused.remaining).toBe(0);
    // One token refills in windowMs / limit = 20 s.
    expect(refused.retryAfterSeconds).toBe(20);
  });

  it('refills over time, proportionally', () => {
    for (let i = 0; i < 3; i++) takeToken('k', opts);
    now += 10_000;
    expect(takeToken('k', opts).ok).toBe(false);
    expect(takeToken('k', opts).retryAfterSeconds).toBe(10);
    now += 10_000;
    expect(takeToken('k', opts).ok).toBe(true);
    expect(takeToken('k', opts).ok).toBe(false);
  });

  it('keeps keys apart, peeks without taking, and resets', () => {
    for (let i = 0; i < 3; i++) takeToken('a', opts);
    expect(takeToken('b', opts).ok).toBe(true);
    expect(peekToken('a', opts).ok).toBe(false);
    expect(peekToken('b', opts)).toMatchObject({ ok: true, remaining: 2 });
    expect(peekToken('b', opts)).toMatchObject({ ok: true, remaining: 2 });
    resetLimit('a');
    expect(takeToken('a', opts).ok).toBe(true);
  });

  it('rejects nonsense options', () => {
    expect(() => takeToken('k', { limit: 0, windowMs: 1 })).toThrow();
  });
});
