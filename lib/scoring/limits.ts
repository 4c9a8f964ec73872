import type { LimitOptions } from '@/lib/rate-limit';

/**
 * Settings of the public calculator routes, from the environment: rate limits (fixed
 * windows of lib/rate-limit), how long embed and allowance lookups are remembered, and a
 * factor on the plans' calculator burst limits (the limits themselves are in lib/plans).
 * Read at most once a second (reading process.env on every answer shows up in
 * profiles of the scoring route); `rereadScoringSettings` (and clearScoringCaches)
 * make a test's or the benchmark's change count at once.
 */
function envNumber(name: string, fallback: number, allowZero = false): number {
  const v = Number(process.env[name]);
  return Number.isFinite(v) && (v > 0 || (allowZero && v === 0)) ? v : fallback;
}

export interface ScoringSettings {
  perAddress: LimitOptions;
  perToken: LimitOptions;
  /** How long a token's embed row is remembered (status changes in this process invalidate at once). */
  embedCacheMs: number;
  /** How long a workspace's answer allowance is remembered. */
  allowanceCacheMs: number;
  /** Factor on every plan's calculator burst limits (lib/plans); 1 in production, raised by load benchmarks. */
  burstScale: number;
}

function readSettings(): ScoringSettings {
  return {
    // A person trying values: 30 answers in any 30 seconds.
    perAddress: { limit: envNumber('PARTWISE_SCORE_ADDRESS_BURST', 30), windowMs: envNumber('PARTWISE_SCORE_ADDRESS_WINDOW_MS', 30_000) },
    // One calculator across all its visitors: 600 answers in any 6 seconds.
    perToken: { limit: envNumber('PARTWISE_SCORE_TOKEN_BURST', 600), windowMs: envNumber('PARTWISE_SCORE_TOKEN_WINDOW_MS', 6_000) },
    embedCacheMs: envNumber('PARTWISE_EMBED_CACHE_MS', 2000, true),
    allowanceCacheMs: envNumber('PARTWISE_ALLOWANCE_CACHE_MS', 2000, true),
    burstScale: envNumber('PARTWISE_SCORE_BURST_SCALE', 1),
  };
}

const REREAD_MS = 1000;
let snapshot: { readAt: number; settings: ScoringSettings } | null = null;

export function scoringSettings(now = Date.now()): ScoringSettings {
  if (!snapshot || now - snapshot.readAt >= REREAD_MS || now < snapshot.readAt) snapshot = { readAt: now, settings: readSettings() };
  return snapshot.settings;
}

export function rereadScoringSettings(): void {
  snapshot = null;
}

/** Abuse reports: five from one address in ten minutes. */
export function reportLimit(): LimitOptions {
  return { limit: envNumber('PARTWISE_REPORT_BURST', 5), windowMs: envNumber('PARTWISE_REPORT_WINDOW_MS', 10 * 60_000) };
}
