import type { LimitOptions } from '@/lib/rate-limit';

/**
 * Rate limits of the public calculator routes, for lib/rate-limit's buckets. Read at
 * call time so a test or the benchmark can set them in the environment.
 */
function envNumber(name: string, fallback: number): number {
  const v = Number(process.env[name]);
  return Number.isFinite(v) && v > 0 ? v : fallback;
}

export function scoringLimits(): { perAddress: LimitOptions; perToken: LimitOptions } {
  return {
    // A person trying values: a burst of 30, then one answer a second.
    perAddress: { limit: envNumber('PARTWISE_SCORE_ADDRESS_BURST', 30), windowMs: envNumber('PARTWISE_SCORE_ADDRESS_WINDOW_MS', 30_000) },
    // One calculator across all its visitors: a burst of 600, then 100 a second.
    perToken: { limit: envNumber('PARTWISE_SCORE_TOKEN_BURST', 600), windowMs: envNumber('PARTWISE_SCORE_TOKEN_WINDOW_MS', 6_000) },
  };
}

/** Abuse reports: five from one address, then one every two minutes. */
export function reportLimit(): LimitOptions {
  return { limit: envNumber('PARTWISE_REPORT_BURST', 5), windowMs: envNumber('PARTWISE_REPORT_WINDOW_MS', 10 * 60_000) };
}
