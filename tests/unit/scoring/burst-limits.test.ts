import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { CALCULATOR_BURST_LIMITS, PLAN_IDS, PLANS, calculatorBurstLimits } from '@/lib/plans';
import { consumeLimits, peekLimit, rateLimitTesting } from '@/lib/rate-limit';

beforeEach(() => {
  vi.useFakeTimers({ now: 5_000_000 });
  rateLimitTesting.clear();
});
afterEach(() => vi.useRealTimers());

describe('consumeLimits (stacked windows of one calculator)', () => {
  const minute = { key: 'c:minute', opts: { limit: 3, windowMs: 60_000 } };
  const hour = { key: 'c:hour', opts: { limit: 5, windowMs: 3_600_000 } };

  it('counts in every window or in none', async () => {
    for (let i = 0; i < 3; i++) expect((await consumeLimits([minute, hour])).ok).toBe(true);
    vi.advanceTimersByTime(20_000);
    const refused = await consumeLimits([minute, hour]);
    expect(refused).toMatchObject({ ok: false, blocked: 0, retryAfterSeconds: 40 });
    // The refusal by the minute window spent nothing of the hour window: 2 of 5 left.
    expect(await peekLimit(hour.key, hour.opts)).toMatchObject({ ok: true, remaining: 2 });
    vi.advanceTimersByTime(40_000);
    expect([await consumeLimits([minute, hour]), await consumeLimits([minute, hour]), await consumeLimits([minute, hour])].map((r) => r.ok)).toEqual([true, true, false]);
  });

  it('waits for the slowest full window', async () => {
    for (let i = 0; i < 5; i++) {
      expect((await consumeLimits([minute, hour])).ok).toBe(true);
      vi.advanceTimersByTime(61_000);
    }
    // 5 × 61 s into the hour: the minute window is open, the hour window full.
    const refused = await consumeLimits([minute, hour]);
    expect(refused).toMatchObject({ ok: false, blocked: 1, retryAfterSeconds: 3600 - 5 * 61 });
    expect(await peekLimit(minute.key, minute.opts)).toMatchObject({ ok: true, remaining: 3 });
  });

  it('takes the longest wait when several windows refuse', async () => {
    const small = { key: 'c:small', opts: { limit: 1, windowMs: 10_000 } };
    const big = { key: 'c:big', opts: { limit: 1, windowMs: 100_000 } };
    await consumeLimits([small, big]);
    expect(await consumeLimits([small, big])).toMatchObject({ ok: false, blocked: 0, retryAfterSeconds: 100 });
  });
});

describe('calculator burst limits per plan', () => {
  it('are a minute, an hour and a day window, each a fixed small share of the month', () => {
    expect(calculatorBurstLimits('sketch').map((l) => [l.window, l.answers])).toEqual([['minute', 10], ['hour', 50], ['day', 125]]);
    expect(calculatorBurstLimits('bench').map((l) => l.answers)).toEqual([400, 2_000, 5_000]);
    expect(calculatorBurstLimits('lab').map((l) => l.answers)).toEqual([5_000, 25_000, 62_500]);
    for (const id of PLAN_IDS) {
      const month = PLANS[id].limits.answersPerMonth;
      const [m, h, d] = CALCULATOR_BURST_LIMITS[id];
      expect(m.answers).toBeLessThan(h.answers);
      expect(h.answers).toBeLessThan(d.answers);
      // Two full windows back to back (a window ending just as the next begins) stay well under the month.
      expect((2 * h.answers) / month).toBeLessThanOrEqual(0.2);
      expect((2 * d.answers) / month).toBeLessThanOrEqual(0.5);
    }
  });

  it('fall back to the free plan for an unknown plan', () => {
    expect(calculatorBurstLimits('nope' as never)).toBe(CALCULATOR_BURST_LIMITS.sketch);
  });
});
