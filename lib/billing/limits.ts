import { formatBytes, formatCount } from '@/lib/format';
import { Op, QueryTypes, UniqueConstraintError, type Transaction } from 'sequelize';
import { AppError } from '@/lib/errors';
import { enqueueMail } from '@/lib/mail';
import { ANSWER_ALERT_THRESHOLDS, ANSWER_GRACE, DEFAULT_PLAN, PLAN_IDS, PLANS, getPlan, type Plan } from '@/lib/plans';
import { monthPeriod, workspaceMonthlyAnswers } from '@/lib/usage';
import { Embed, Membership, Subscription, User, Workspace, sequelize } from '@/models';
import { lockWorkspace } from '@/models/db';

/**
 * Limit checks that other features call before they do something a plan caps:
 * publishing a calculator, accepting an upload, scoring an answer. Limits come only
 * from lib/plans.ts; the plan of a workspace only from its Subscription row, which
 * only the payment webhooks change. Every refusal is a 402 `plan_limit` AppError
 * that names the plan and the upgrade that would allow it.
 */

/** Subscription states in which the paid plan is in force (past_due keeps it while the service retries the card). */
export const PLAN_IN_FORCE_STATUSES = ['active', 'trialing', 'past_due'] as const;
const PLAN_IN_FORCE = new Set<string>(PLAN_IN_FORCE_STATUSES);

/** The plan whose limits apply to a workspace right now. */
export async function workspacePlan(workspaceId: number, transaction?: Transaction): Promise<Plan> {
  // Read inside a write transaction, the plan comes with the workspace's turn (PostgreSQL; see lockWorkspace).
  await lockWorkspace(workspaceId, transaction);
  const sub = await Subscription.findOne({ where: { workspaceId }, attributes: ['plan', 'status'], transaction });
  if (!sub || !PLAN_IN_FORCE.has(sub.status)) return PLANS[DEFAULT_PLAN];
  return getPlan(sub.plan);
}

/** The smallest plan above `plan` whose limit passes `fits`, for the upgrade hint. */
export function upgradeFor(plan: Plan, fits: (p: Plan) => boolean): Plan | null {
  const from = PLAN_IDS.indexOf(plan.id);
  for (const id of PLAN_IDS.slice(from + 1)) if (fits(PLANS[id])) return PLANS[id];
  return null;
}

/**
 * The sentence after a refusal: the next plan that allows it, or, when none does, the
 * largest plan and its limit (never "the largest plan" said of a smaller one).
 */
export function upgradeHint(plan: Plan, next: Plan | null, limitOf: (p: Plan) => string): string {
  if (next) return `Upgrade to ${next.name} on the billing page: it ${limitOf(next)}.`;
  const largest = PLANS[PLAN_IDS[PLAN_IDS.length - 1]];
  if (largest.id === plan.id) return `${plan.name} is the largest plan; contact Partwise support for more.`;
  return `No plan allows that much: ${largest.name}, the largest, ${limitOf(largest)}. Contact Partwise support for more.`;
}

const fmt = formatCount;

/** Calculators that count against the limit: published and not retired (disabled ones still hold a place). */
export async function countLiveCalculators(workspaceId: number, transaction?: Transaction): Promise<number> {
  return Embed.count({ where: { workspaceId, status: { [Op.ne]: 'retired' } }, transaction });
}

/**
 * Call before publishing a NEW calculator (a new version of an existing one takes no
 * extra place). Throws plan_limit when the workspace already has as many live
 * calculators as its plan allows. Only a check made inside the write transaction that
 * creates the calculator holds under concurrency (one without is a cheap early refusal).
 */
export async function assertCanPublish(workspaceId: number, transaction?: Transaction): Promise<void> {
  const plan = await workspacePlan(workspaceId, transaction);
  const live = await countLiveCalculators(workspaceId, transaction);
  if (live < plan.limits.calculators) return;
  const next = upgradeFor(plan, (p) => p.limits.calculators > live);
  const upgrade = next ? `upgrade to ${next.name} on the billing page to publish more` : 'contact Partwise support for more';
  throw new AppError(
    'plan_limit',
    `The ${plan.name} plan allows ${fmt(plan.limits.calculators)} published calculator${plan.limits.calculators === 1 ? '' : 's'} and this workspace has ${fmt(live)}. Retire one first, or ${upgrade}.`,
  );
}

/**
 * Call before storing an upload: `rows` after dropping incomplete ones, `bytes` of the
 * file as received. Throws plan_limit naming the limit that was passed.
 */
export async function assertRowsAllowed(workspaceId: number, rows: number, bytes: number): Promise<void> {
  const plan = await workspacePlan(workspaceId);
  if (bytes > plan.limits.uploadBytes) {
    const next = upgradeFor(plan, (p) => p.limits.uploadBytes >= bytes);
    throw new AppError('plan_limit', `This file is ${formatBytes(bytes)}; the ${plan.name} plan accepts uploads up to ${formatBytes(plan.limits.uploadBytes)}. ${upgradeHint(plan, next, uploadLimitOf)}`);
  }
  if (rows > plan.limits.datasetRows) {
    const next = upgradeFor(plan, (p) => p.limits.datasetRows >= rows);
    throw new AppError('plan_limit', `This table has ${fmt(rows)} rows; the ${plan.name} plan accepts up to ${fmt(plan.limits.datasetRows)} rows per dataset. ${upgradeHint(plan, next, (p) => `accepts up to ${fmt(p.limits.datasetRows)} rows`)}`);
  }
}

const uploadLimitOf = (p: Plan) => `accepts uploads up to ${formatBytes(p.limits.uploadBytes)}`;

/**
 * An upload body over the plan's size, refused while it streams (413): named with the
 * plan, its limit and the plan that would take it. `bytes` is the declared size when
 * the request said one; a chunked body only tells us it passed the limit.
 */
export function uploadTooLarge(plan: Plan, bytes?: number): AppError {
  const limit = formatBytes(plan.limits.uploadBytes);
  const size = bytes === undefined ? `over ${limit}` : formatBytes(bytes);
  const next = upgradeFor(plan, (p) => p.limits.uploadBytes >= (bytes ?? plan.limits.uploadBytes + 1));
  return new AppError('payload_too_large', `This upload is ${size}; the ${plan.name} plan accepts uploads up to ${limit} per file. ${upgradeHint(plan, next, uploadLimitOf)}`);
}

export type AllowanceState = 'ok' | 'warned' | 'paused';

export interface AnswerAllowance {
  allowed: boolean;
  /** ok: below 80 %; warned: at or past 80 % and still answering (grace included); paused: past 100 % + grace. */
  state: AllowanceState;
  used: number;
  limit: number;
  /** Answers after which calculators pause for the rest of the month. */
  pauseAt: number;
  period: string;
  plan: Plan['id'];
}

/** The answer count at which calculators pause: the limit plus the grace share, rounded up. */
export function pauseThreshold(limit: number): number {
  return Math.ceil(limit * (1 + ANSWER_GRACE));
}

/** Pure state for `used` answers already counted this month against `limit`. */
export function allowanceState(used: number, limit: number): AllowanceState {
  if (used >= pauseThreshold(limit)) return 'paused';
  if (used >= Math.ceil(limit * ANSWER_ALERT_THRESHOLDS[0])) return 'warned';
  return 'ok';
}

/**
 * Ask before scoring one answer (then record it with lib/usage `recordAnswer`). `used`
 * counts answers already recorded this month, so the answer that would be number
 * pauseAt + 1 is the first refused. Crossing 80 % or 100 % e-mails the owners once
 * per threshold per month. A paused workspace answers again next month or as soon as
 * an upgrade raises the limit.
 */
export async function answerAllowance(workspaceId: number, at = new Date()): Promise<AnswerAllowance> {
  const period = monthPeriod(at);
  const [plan, used] = await Promise.all([workspacePlan(workspaceId), workspaceMonthlyAnswers(workspaceId, period)]);
  const limit = plan.limits.answersPerMonth;
  const state = allowanceState(used, limit);
  if (state !== 'ok') await sendUsageAlerts(workspaceId, plan, used, period);
  return { allowed: state !== 'paused', state, used, limit, pauseAt: pauseThreshold(limit), period, plan: plan.id };
}

/** Owners' e-mail addresses of a workspace. */
export async function ownerEmails(workspaceId: number): Promise<string[]> {
  const owners = await Membership.findAll({ where: { workspaceId, role: 'owner' }, include: [{ model: User, attributes: ['email'] }] });
  return owners.map((m) => (m as unknown as { User?: User }).User?.email).filter((e): e is string => !!e);
}

// Alerts known to be sent, so answers past a threshold skip the insert (safe to lose).
const sentCache = new Set<string>();

/** Claim one alert row; true only for the caller that inserted it. */
async function claimAlert(workspaceId: number, period: string, threshold: number, used: number, limit: number): Promise<boolean> {
  const key = `${workspaceId}:${period}:${threshold}`;
  if (sentCache.has(key)) return false;
  if (sentCache.size > 10_000) sentCache.clear();
  try {
    await sequelize.query('INSERT INTO usage_alerts (workspace_id, period, threshold, used, answer_limit, created_at) VALUES (?, ?, ?, ?, ?, ?)', {
      replacements: [workspaceId, period, threshold, used, limit, new Date().toISOString()],
      type: QueryTypes.INSERT,
    });
    sentCache.add(key);
    return true;
  } catch (e) {
    if (e instanceof UniqueConstraintError) {
      sentCache.add(key);
      return false;
    }
    throw e;
  }
}

/** Thresholds (as whole percents) already e-mailed for a workspace in a month. */
export async function alertsSent(workspaceId: number, period = monthPeriod()): Promise<number[]> {
  const rows = await sequelize.query<{ threshold: number }>('SELECT threshold FROM usage_alerts WHERE workspace_id = ? AND period = ? ORDER BY threshold', {
    replacements: [workspaceId, period],
    type: QueryTypes.SELECT,
  });
  return rows.map((r) => Number(r.threshold));
}

async function sendUsageAlerts(workspaceId: number, plan: Plan, used: number, period: string): Promise<void> {
  const limit = plan.limits.answersPerMonth;
  for (const share of ANSWER_ALERT_THRESHOLDS) {
    if (used < Math.ceil(limit * share)) continue;
    const percent = Math.round(share * 100);
    if (!(await claimAlert(workspaceId, period, percent, used, limit))) continue;
    const [workspace, to] = await Promise.all([Workspace.findByPk(workspaceId), ownerEmails(workspaceId)]);
    const next = upgradeFor(plan, (p) => p.limits.answersPerMonth > limit);
    const name = workspace?.name ?? 'your workspace';
    const pauseAt = pauseThreshold(limit);
    const subject = percent >= 100 ? `${name} has used all ${fmt(limit)} answers of ${period}` : `${name} has used ${percent}% of this month's answers`;
    const text = [
      `Your calculators in ${name} have scored ${fmt(used)} of the ${fmt(limit)} answers the ${plan.name} plan includes for ${period}.`,
      percent >= 100
        ? `They keep answering for a short grace of ${fmt(pauseAt - limit)} more answers; after ${fmt(pauseAt)} they show visitors a neutral "temporarily unavailable" notice until the month ends or the plan is upgraded.`
        : `At ${fmt(limit)} answers you will hear from us again; a little past it the calculators pause until next month.`,
      next ? `Upgrading to ${next.name} raises the limit to ${fmt(next.limits.answersPerMonth)} answers a month, at once.` : '',
      'Manage the plan in Partwise Studio → Billing.',
    ].filter(Boolean).join('\n\n');
    for (const address of to) await enqueueMail({ to: address, subject, text, kind: `usage-alert-${percent}` });
  }
}
