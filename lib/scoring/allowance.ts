import { answerAllowance, type AllowanceState } from '@/lib/billing/limits';

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

function ttlMs(): number {
  const v = Number(process.env.PARTWISE_ALLOWANCE_CACHE_MS);
  return Number.isFinite(v) && v >= 0 ? v : 2000;
}

export async function answerState(workspaceId: number, now = Date.now()): Promise<AllowanceState> {
  const hit = cache.get(workspaceId);
  if (hit && now - hit.checkedAt < ttlMs()) return hit.state;
  const { state } = await answerAllowance(workspaceId);
  cache.set(workspaceId, { state, checkedAt: now });
  return state;
}

/** After a plan change: read the allowance fresh next time. */
export function invalidateAllowance(workspaceId?: number): void {
  if (workspaceId === undefined) cache.clear();
  else cache.delete(workspaceId);
}
