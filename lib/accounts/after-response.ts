/**
 * Work an account answer must not wait for: mail and the records behind it. Routes
 * that answer the same for known and unknown addresses (sign-up, forgot password)
 * put everything that depends on the lookup here, so neither the answer nor its
 * timing says whether an account exists. A failure is logged; the person can ask again.
 */
const pending = new Set<Promise<void>>();

export function afterResponse(what: string, task: () => Promise<void>): void {
  const run: Promise<void> = new Promise<void>((resolve) => setImmediate(resolve))
    .then(task)
    .catch((e: unknown) => console.error(`[partwise] ${what} failed:`, e instanceof Error ? e.message : String(e)))
    .finally(() => pending.delete(run));
  pending.add(run);
}

/** Resolves once every deferred task (including ones they start) has finished; for tests and shutdown. */
export async function settleAfterResponse(): Promise<void> {
  // setImmediate first: tasks scheduled just before this call are in the set by then.
  await new Promise((r) => setImmediate(r));
  while (pending.size) await Promise.all([...pending]);
}
