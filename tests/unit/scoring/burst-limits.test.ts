import { afterEach, describe, expect, it } from 'vitest';
import { CALCULATOR_BURST_LIMITS, PLAN_IDS, PLANS, calculatorBurstLimits } from '@/lib/plans';
import { rateLimitTesting, takeTokens } from '@/lib/rate-limit';

let now = 5_000_000;
rateLimitTesting.setClock(() => now);
afterEach(() => rateLimitTesting.clear());

describe('takeTokens (stacked buckets of one calculator)', () => {
  const minute = { key: 'c:minute', opts: { limit: 3, windowMs: 60_000 } };
  const hour = { key: 'c:hour', opts: { limit: 5, windowMs: 3_600_000 } };

  it('takes from every bucket or from none', () => {
    expect([1, 2, 3].map(() => takeTokens([minute, hour]).ok)).toEqual([true, true, true]);
    const refused = takeTokens([minute, hour]);
    expect(refused).toMatchObject({ ok: false, blocked: 0, retryAfterSeconds: 20 });
    // The refusal by the minute bucket spent nothing of the hour bucket: 2 of 5 left.
    now += 60_000;
    expect([1, 2, 3].map(() => takeTokens([minute, hour]).ok)).toEqual([true, true, false]);
  });

  it('waits for the slowest empty bucket', () => {
    for (let i = 0; i < 5; i++) {
      takeTokens([minute, hour]);
      now += 20_000;
    }
    const refused = takeTokens([minute, hour]);
    expect(refused.ok).toBe(false);
    expect(refused.blocked).toBe(1);
    // One hour token refills in 3600 / 5 = 720 s, less what has refilled since.
    expect(refused.retryAfterSeconds).toBeGreaterThan(600);
    expect(refused.retryAfterSeconds).toBeLessThanOrEqual(720);
  });
});

describe('calculator burst limits per plan', () => {
  it('are a minute, an hour and a day bucket, each a fixed small share of the month', () => {
    expect(calculatorBurstLimits('sketch').map((l) => [l.window, l.answers])).toEqual([['minute', 10], ['hour', 50], ['day', 125]]);
    expect(calculatorBurstLimits('bench').map((l) => l.answers)).toEqual([400, 2_000, 5_000]);
    expect(calculatorBurstLimits('lab').map((l) => l.answers)).toEqual([5_000, 25_000, 62_500]);
    for (const id of PLAN_IDS) {
      const month = PLANS[id].limits.answersPerMonth;
      const [m, h, d] = CALCULATOR_BURST_LIMITS[id];
      expect(m.answers).toBeLessThan(h.answers);
      expect(h.answers).toBeLessThan(d.answers);
      // Even a bucket drained and refilled in its window stays well under the month.
      expect((2 * h.answers) / month).toBeLessThanOrEqual(0.2);
      expect((2 * d.answers) / month).toBeLessThanOrEqual(0.5);
    }
  });

  it('fall back to the free plan for an unknown plan', () => {
    expect(calculatorBurstLimits('nope' as never)).toBe(CALCULATOR_BURST_LIMITS.sketch);
  });
});
