import { formatMoney } from '@/lib/format';

/**
 * The one place that knows Partwise's plans and their limits. Every limit check in
 * the app asks this module; prices here are shown on the pricing section and are
 * mirrored as prices in the payment service by the billing setup.
 */
export const PLAN_IDS = ['sketch', 'bench', 'lab'] as const;
export type PlanId = (typeof PLAN_IDS)[number];

export interface PlanLimits {
  /** Calculators published and not retired at once. */
  calculators: number;
  /** Scored answers per calendar month, across all calculators. */
  answersPerMonth: number;
  /** Rows (after dropping incomplete ones) in one uploaded dataset. */
  datasetRows: number;
  /** Upload size in bytes. */
  uploadBytes: number;
  /** People in the workspace, owners included (open invitations hold a seat too). */
  seats: number;
}

export interface Plan {
  id: PlanId;
  name: string;
  tagline: string;
  /** Monthly price in euro cents. */
  monthlyPrice: number;
  limits: PlanLimits;
}

export const PLANS: Record<PlanId, Plan> = {
  sketch: {
    id: 'sketch',
    name: 'Sketch',
    tagline: 'Try an idea on a small table and share one calculator.',
    monthlyPrice: 0,
    limits: { calculators: 1, answersPerMonth: 500, datasetRows: 2_000, uploadBytes: 2 * 1024 * 1024, seats: 2 },
  },
  bench: {
    id: 'bench',
    name: 'Bench',
    tagline: 'For one analyst, and a colleague who reviews, publishing calculators people rely on.',
    monthlyPrice: 1900,
    limits: { calculators: 5, answersPerMonth: 20_000, datasetRows: 50_000, uploadBytes: 20 * 1024 * 1024, seats: 2 },
  },
  lab: {
    id: 'lab',
    name: 'Lab',
    tagline: 'A shared workspace for a team and its busier calculators.',
    monthlyPrice: 7900,
    limits: { calculators: 25, answersPerMonth: 250_000, datasetRows: 250_000, uploadBytes: 60 * 1024 * 1024, seats: 10 },
  },
};

export const DEFAULT_PLAN: PlanId = 'sketch';

/** Answers past the monthly limit still served before calculators pause, as a share of the limit. */
export const ANSWER_GRACE = 0.05;
/** Shares of the monthly answer limit at which the owner is e-mailed. */
export const ANSWER_ALERT_THRESHOLDS = [0.8, 1] as const;

/**
 * Fits a workspace may have waiting or running at once (lib/fitting/jobs.ts counts
 * and inserts in one transaction). Enough to compare a few settings side by side;
 * a workspace cannot fill the shared fitting queue with its own work.
 */
export const FIT_QUEUE_LIMITS: Record<PlanId, number> = { sketch: 2, bench: 4, lab: 10 };

/**
 * Rows one batch-scoring request may send (POST /api/v1/calculators/{id}/scores). Each
 * row is one metered answer, so a batch also needs that many answers left this month.
 */
export const BATCH_ROWS_PER_REQUEST: Record<PlanId, number> = { sketch: 500, bench: 10_000, lab: 100_000 };

/** Bytes a batch body may have: room for the plan's rows at a generous width per row. */
export function batchBodyBytes(plan: PlanId): number {
  return 64 * 1024 + BATCH_ROWS_PER_REQUEST[plan] * 512;
}

export function fitQueueLimit(plan: PlanId): number {
  return FIT_QUEUE_LIMITS[plan];
}

export function getPlan(id: string | null | undefined): Plan {
  return PLANS[(PLAN_IDS as readonly string[]).includes(id ?? '') ? (id as PlanId) : DEFAULT_PLAN];
}

export function isPlanId(id: string): id is PlanId {
  return (PLAN_IDS as readonly string[]).includes(id);
}

export function formatPrice(cents: number): string {
  return cents === 0 ? 'Free' : formatMoney(cents, 'eur', { dropZeroCents: true });
}

// ---- Calculator burst limits (fair use of scoring) ----

/**
 * How fast one calculator may spend its workspace's monthly answers. Each window is a
 * fixed window per calculator (lib/rate-limit) whose size is a share of the plan's
 * monthly allowance, so a crowd of addresses (each under its own per-address limit)
 * cannot drain a month in an afternoon: 2 % of the month a minute, 10 % an hour, 25 % a
 * day (twice that where two windows meet), and using up a whole month this way takes
 * days, time enough for the owner, who is e-mailed on the first refusal, to react.
 */
export const CALCULATOR_BURST_SHARES = [
  { window: 'minute', windowMs: 60_000, share: 0.02 },
  { window: 'hour', windowMs: 3_600_000, share: 0.1 },
  { window: 'day', windowMs: 86_400_000, share: 0.25 },
] as const;

export type BurstWindow = (typeof CALCULATOR_BURST_SHARES)[number]['window'];

export interface BurstLimit {
  window: BurstWindow;
  /** Answers one calculator may give in one such window. */
  answers: number;
  /** The window's length. */
  windowMs: number;
}

function burstLimitsOf(answersPerMonth: number): readonly BurstLimit[] {
  return Object.freeze(CALCULATOR_BURST_SHARES.map((s) => ({ window: s.window, windowMs: s.windowMs, answers: Math.max(1, Math.floor(answersPerMonth * s.share)) })));
}

/** Burst limits of every plan, worked out once (Sketch: 10 a minute, 50 an hour, 125 a day). */
export const CALCULATOR_BURST_LIMITS: Record<PlanId, readonly BurstLimit[]> = {
  sketch: burstLimitsOf(PLANS.sketch.limits.answersPerMonth),
  bench: burstLimitsOf(PLANS.bench.limits.answersPerMonth),
  lab: burstLimitsOf(PLANS.lab.limits.answersPerMonth),
};

/** The burst limits one calculator of a workspace on `plan` answers under. */
export function calculatorBurstLimits(plan: PlanId): readonly BurstLimit[] {
  return CALCULATOR_BURST_LIMITS[plan] ?? CALCULATOR_BURST_LIMITS[DEFAULT_PLAN];
}
