import { allowanceState, answerAllowance, type AllowanceState } from '@/lib/billing/limits';
import type { PlanId } from '@/lib/plans';
import { currentMonthPeriod, readMonthlyAnswersAtOnce } from '@/lib/usage';
import { scoringSettings } from './limits';
import { announce, onInvalidation } from '@/lib/shared/broadcast';

/**
 * The answer allowance as a reservation counter, so calculators pause exactly at the
 * line: each answer takes one place (`reserveAnswer`) before it is given, synchronously
 * with the check, and concurrent answers cannot all see the last free place.
 *
 * A workspace's ledger starts from the month's metered answers read at one instant
 * (table plus the usage buffer, lib/usage) and counts every answer of this process from
 * there, so no database write happens per answer. It is re-read in the background every
 * `allowanceCacheMs` to follow plan changes and other processes' answers (those are seen
 * with that delay; one server process is exact). Kept on globalThis so the app server's
 * fast path and Next's bundles reserve from the same counter.
 */
export interface AnswerLedger {
  workspaceId: number;
  period: string;
  plan: PlanId;
  limit: number;
  pauseAt: number;
  /** Answers metered this month plus answers reserved and not yet metered. */
  used: number;
  checkedAt: number;
  /** The pause line was reached and reported (once per ledger; the alert row keeps it once per month). */
  pauseNoted: boolean;
}

interface LedgerStore {
  ledgers: Map<number, AnswerLedger>;
  /** The read under way per workspace; an invalidation replaces or drops it so it cannot install old figures. */
  reads: Map<number, { ticket: object; done: Promise<AnswerLedger> }>;
}

const store = ((globalThis as Record<symbol, unknown>)[Symbol.for('partwise.answerLedgers')] ??= {
  ledgers: new Map(),
  reads: new Map(),
}) as LedgerStore;

function readLedger(workspaceId: number): Promise<AnswerLedger> {
  const running = store.reads.get(workspaceId);
  if (running) return running.done;
  const ticket = {};
  const done = (async () => {
    // Plan, limit, and the 80 % / 100 % alerts, as billing decides them.
    const allowance = await answerAllowance(workspaceId);
    return readMonthlyAnswersAtOnce(workspaceId, allowance.period, (used) => {
      const previous = store.ledgers.get(workspaceId);
      const ledger: AnswerLedger = {
        workspaceId,
        period: allowance.period,
        plan: allowance.plan,
        limit: allowance.limit,
        pauseAt: allowance.pauseAt,
        used,
        checkedAt: Date.now(),
        pauseNoted: previous?.period === allowance.period && previous.pauseAt === allowance.pauseAt ? previous.pauseNoted : false,
      };
      // Installed in the same instant as the count, unless an invalidation came meanwhile.
      if (store.reads.get(workspaceId)?.ticket === ticket) store.ledgers.set(workspaceId, ledger);
      return ledger;
    });
  })();
  store.reads.set(workspaceId, { ticket, done });
  const forget = () => {
    if (store.reads.get(workspaceId)?.ticket === ticket) store.reads.delete(workspaceId);
  };
  done.then(forget, forget);
  return done;
}

/**
 * The workspace's ledger when one is ready for this month (starting a background
 * re-read when it is due), else null: then await `loadLedger`.
 */
export function readyLedger(workspaceId: number, now = Date.now()): AnswerLedger | null {
  const ledger = store.ledgers.get(workspaceId);
  if (!ledger || ledger.period !== currentMonthPeriod(now)) return null;
  if (now - ledger.checkedAt >= scoringSettings(now).allowanceCacheMs && !store.reads.has(workspaceId)) {
    readLedger(workspaceId).catch((e) => console.error('[partwise] answer allowance re-read failed; counting on:', (e as Error).message));
  }
  return ledger;
}

/**
 * Wait until the workspace has a ledger (one read for all callers waiting on it).
 * Callers then take the ledger with `readyLedger`, in the same synchronous step as
 * `reserveAnswer`, so an invalidation while they waited cannot leave them counting on
 * a ledger nobody else sees.
 */
export async function waitForLedger(workspaceId: number): Promise<AnswerLedger> {
  return readyLedger(workspaceId) ?? (await readLedger(workspaceId));
}

/** The installed ledger, read if needed (for callers that only look, or reserve after an await). */
export async function loadLedger(workspaceId: number): Promise<AnswerLedger> {
  const read = await waitForLedger(workspaceId);
  return readyLedger(workspaceId) ?? read;
}

/** Take one answer's place; false (nothing taken) at the pause line. Synchronous: call right before answering. */
export function reserveAnswer(ledger: AnswerLedger): boolean {
  if (ledger.used >= ledger.pauseAt) return false;
  ledger.used += 1;
  return true;
}

/** Take `count` places at once, or none: a batch is answered whole or refused whole. */
export function reserveAnswers(ledger: AnswerLedger, count: number): boolean {
  if (ledger.used + count > ledger.pauseAt) return false;
  ledger.used += count;
  return true;
}

/** Give back the places of a batch that was not answered after all. */
export function releaseAnswers(ledger: AnswerLedger, count: number): void {
  ledger.used = Math.max(0, ledger.used - count);
}

/** Answers still free before the pause line. */
export function answersLeft(ledger: AnswerLedger): number {
  return Math.max(0, ledger.pauseAt - ledger.used);
}

/** Give a place back (the answer was not given after all). */
export function releaseAnswer(ledger: AnswerLedger): void {
  ledger.used = Math.max(0, ledger.used - 1);
}

/** ok, warned or paused for the answers counted so far. */
export async function answerState(workspaceId: number): Promise<AllowanceState> {
  const ledger = await loadLedger(workspaceId);
  return allowanceState(ledger.used, ledger.limit);
}

/** After a plan change (or a test's change of the counts): read the allowance fresh next time. */
export function invalidateAllowance(workspaceId?: number): void {
  forgetAllowance(workspaceId);
  // Every other app instance re-reads it too (lib/shared/broadcast).
  announce({ kind: 'allowance', key: workspaceId ?? null });
}

onInvalidation('allowance', (m) => forgetAllowance(typeof m.key === 'number' ? m.key : undefined));

/** This process only. */
function forgetAllowance(workspaceId?: number): void {
  if (workspaceId === undefined) {
    store.reads.clear();
    store.ledgers.clear();
  } else {
    store.reads.delete(workspaceId);
    store.ledgers.delete(workspaceId);
  }
}
