import { answerAllowance, type AllowanceState } from '@/lib/billing/limits';
import { scoringSettings } from './limits';
import { sharedLookup } from './single-flight';

/**
 * The billing engineer's answer allowance, asked on every answer but remembered per
 * workspace for a moment: the check is two queries and the scoring route is hot.
 * A few answers past the line within that moment are what the plan's grace share is
 * for. Kept on globalThis so every route bundle shares it; safe to lose.
 */
interface Entry {
  state: AllowanceState;
  checkedAt: number;
}

const cache = ((globalThis as Record<symbol, unknown>)[Symbol.for('partwise.answerAllowance')] ??= new Map<number, Entry>()) as Map<number, Entry>;
// Checks under way, so answers arriving as an entry expires share one check.
const checking = ((globalThis as Record<symbol, unknown>)[Symbol.for('partwise.answerAllowanceChecks')] ??= new Map<number, Promise<AllowanceState>>()) as Map<number, Promise<AllowanceState>>;


export async function answerState(workspaceId: number, now = Date.now()): Promise<AllowanceState> {
  const hit = cache.get(workspaceId);
  if (hit && now - hit.checkedAt < scoringSettings(now).allowanceCacheMs) return hit.state;
  return sharedLookup(checking, workspaceId, () => answerAllowance(workspaceId).then((a) => a.state), (state) => cache.set(workspaceId, { state, checkedAt: now }));
}

/** After a plan change: read the allowance fresh next time. */
export function invalidateAllowance(workspaceId?: number): void {
  checking.clear();
  if (workspaceId === undefined) cache.clear();
  else cache.delete(workspaceId);
}
