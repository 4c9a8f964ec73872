/**
 * Which fit gets a fitting slot: pure functions over a snapshot of the queue, so the
 * runner (lib/fitting/jobs.ts), the queue position shown to analysts and the tests all
 * use one rule. The snapshot is derived from fit rows alone (status, workspace, times),
 * so any process, or a separate queue worker later, computes the same choice.
 *
 * The rule, fair across workspaces rather than first come first served:
 *   1. the workspace with the fewest fits running goes first;
 *   2. then the workspace served longest ago (a workspace never served comes first);
 *   3. within a workspace, its oldest waiting fit (a paused fit keeps its place).
 * A running fit that has had its time slice gives its slot back between two
 * candidates when the rule would hand the slot to another workspace (shouldYield).
 */

export interface QueuedFit {
  id: number;
  workspaceId: number;
  /** ms since the epoch */
  createdAt: number;
}

export interface QueueSnapshot {
  /** Fits waiting for a slot (status queued, not being cancelled), in any order. */
  queued: QueuedFit[];
  /** Fits running now, per workspace, across every runner. */
  running: Map<number, number>;
  /** When each workspace last started or ended a turn in a slot (ms); absent means never. */
  lastServedAt: Map<number, number>;
}

const byAge = (a: QueuedFit, b: QueuedFit) => a.createdAt - b.createdAt || a.id - b.id;

/** The fit the next free slot goes to, or null when nothing waits. */
export function pickNextFit(s: QueueSnapshot): QueuedFit | null {
  const heads = new Map<number, QueuedFit>();
  for (const f of s.queued) {
    const head = heads.get(f.workspaceId);
    if (!head || byAge(f, head) < 0) heads.set(f.workspaceId, f);
  }
  const running = (f: QueuedFit) => s.running.get(f.workspaceId) ?? 0;
  const served = (f: QueuedFit) => s.lastServedAt.get(f.workspaceId) ?? -Infinity;
  let best: QueuedFit | null = null;
  for (const head of heads.values()) {
    if (!best) best = head;
    else if (running(head) !== running(best)) best = running(head) < running(best) ? head : best;
    else if (served(head) !== served(best)) best = served(head) < served(best) ? head : best;
    else if (byAge(head, best) < 0) best = head;
  }
  return best;
}

/**
 * The order in which the waiting fits would start if nothing else were queued or
 * cancelled and every slot freed one at a time: each start counts as a running fit of
 * its workspace and as its latest turn. An estimate for the analyst, not a promise.
 */
export function projectedOrder(s: QueueSnapshot): QueuedFit[] {
  const running = new Map(s.running);
  const lastServedAt = new Map(s.lastServedAt);
  const queued = [...s.queued];
  const order: QueuedFit[] = [];
  // Later than any real time, increasing, so a projected start is the most recent turn.
  let clock = Math.max(Date.now(), ...lastServedAt.values()) + 1;
  while (queued.length) {
    const next = pickNextFit({ queued, running, lastServedAt })!;
    order.push(next);
    queued.splice(queued.indexOf(next), 1);
    running.set(next.workspaceId, (running.get(next.workspaceId) ?? 0) + 1);
    lastServedAt.set(next.workspaceId, clock++);
  }
  return order;
}

/** How many waiting fits start before each one (0: it is next). */
export function queuePositions(s: QueueSnapshot): Map<number, number> {
  return new Map(projectedOrder(s).map((f, i) => [f.id, i]));
}

export interface RunningTurn {
  id: number;
  workspaceId: number;
  createdAt: number;
  /** When its current turn in the slot began (ms). */
  turnStartedAt: number;
}

/**
 * Should a running fit give its slot back now (between candidates)? Only once it has
 * had `sliceMs` in this turn, only when this runner has no free slot (a free slot
 * takes the waiting fit anyway), and only when the rule, with this fit back in the
 * queue and its workspace just served, would choose another workspace's fit. So a
 * heavy fit never blocks another workspace for longer than a slice plus the
 * candidate in progress, and fits of one workspace never pause for each other.
 */
export function shouldYield(job: RunningTurn, s: QueueSnapshot, opts: { now: number; sliceMs: number; freeSlot: boolean }): boolean {
  if (opts.freeSlot || opts.now - job.turnStartedAt < opts.sliceMs) return false;
  if (!s.queued.some((f) => f.workspaceId !== job.workspaceId)) return false;
  const running = new Map(s.running);
  running.set(job.workspaceId, Math.max(0, (running.get(job.workspaceId) ?? 1) - 1));
  const lastServedAt = new Map(s.lastServedAt).set(job.workspaceId, opts.now);
  const next = pickNextFit({ queued: [...s.queued.filter((f) => f.id !== job.id), { id: job.id, workspaceId: job.workspaceId, createdAt: job.createdAt }], running, lastServedAt });
  return next !== null && next.workspaceId !== job.workspaceId;
}
