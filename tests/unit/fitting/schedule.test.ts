import { describe, expect, it } from 'vitest';
import { pickNextFit, projectedOrder, queuePositions, shouldYield, type QueueSnapshot, type QueuedFit } from '@/lib/fitting/schedule';

const A = 1;
const B = 2;
const C = 3;
const T = 1_800_000_000_000;

function snapshot(queued: QueuedFit[], running: Record<number, number> = {}, served: Record<number, number> = {}): QueueSnapshot {
  return {
    queued,
    running: new Map(Object.entries(running).map(([k, v]) => [Number(k), v])),
    lastServedAt: new Map(Object.entries(served).map(([k, v]) => [Number(k), v])),
  };
}
const fit = (id: number, workspaceId: number, createdAt = T + id): QueuedFit => ({ id, workspaceId, createdAt });

describe('pickNextFit', () => {
  it('is first come first served within one workspace', () => {
    expect(pickNextFit(snapshot([fit(3, A), fit(1, A), fit(2, A)]))?.id).toBe(1);
    // createdAt decides before the id (a fit paused and queued again keeps its old createdAt)
    expect(pickNextFit(snapshot([fit(9, A, T), fit(4, A, T + 50)]))?.id).toBe(9);
    expect(pickNextFit(snapshot([]))).toBeNull();
  });

  it('gives the slot to the workspace with fewer fits running, however many the other queued first', () => {
    const queued = [fit(1, A), fit(2, A), fit(3, A), fit(4, A), fit(5, B)];
    expect(pickNextFit(snapshot(queued, { [A]: 1 }))?.id).toBe(5);
    expect(pickNextFit(snapshot(queued, { [A]: 1, [B]: 2 }))?.id).toBe(1);
  });

  it('between equally busy workspaces, serves the one served longest ago (never served first)', () => {
    const queued = [fit(1, A), fit(2, A), fit(3, B)];
    expect(pickNextFit(snapshot(queued, {}, { [A]: T + 500, [B]: T + 100 }))?.id).toBe(3);
    expect(pickNextFit(snapshot(queued, {}, { [A]: T + 100, [B]: T + 500 }))?.id).toBe(1);
    expect(pickNextFit(snapshot(queued, {}, { [A]: T + 100 }))?.id).toBe(3);
  });
});

describe('projectedOrder and queuePositions', () => {
  it('alternates between workspaces instead of running all of the first one before the other', () => {
    const queued = [fit(1, A), fit(2, A), fit(3, A), fit(4, A), fit(5, B), fit(6, B)];
    expect(projectedOrder(snapshot(queued)).map((f) => f.id)).toEqual([1, 5, 2, 6, 3, 4]);
    const positions = queuePositions(snapshot(queued));
    expect(positions.get(1)).toBe(0);
    expect(positions.get(5)).toBe(1);
    expect(positions.get(4)).toBe(5);
  });

  it('counts what runs now: a busy workspace waits behind an idle one', () => {
    const queued = [fit(1, A), fit(2, A), fit(3, B), fit(4, C)];
    // A runs one already; B was served more recently than C
    expect(projectedOrder(snapshot(queued, { [A]: 1 }, { [A]: T, [B]: T + 20, [C]: T + 10 })).map((f) => f.id)).toEqual([4, 3, 1, 2]);
  });
});

describe('shouldYield', () => {
  const heavy = { id: 1, workspaceId: A, createdAt: T, turnStartedAt: T };
  const slice = { sliceMs: 5000, freeSlot: false };

  it('keeps its slot during its slice, then gives it to a waiting workspace', () => {
    const s = snapshot([fit(7, B)], { [A]: 1 }, { [A]: T });
    expect(shouldYield(heavy, s, { ...slice, now: T + 4999 })).toBe(false);
    expect(shouldYield(heavy, s, { ...slice, now: T + 5000 })).toBe(true);
  });

  it('never pauses for fits of its own workspace, nor when nothing else waits', () => {
    expect(shouldYield(heavy, snapshot([fit(7, A), fit(8, A)], { [A]: 1 }, { [A]: T }), { ...slice, now: T + 60_000 })).toBe(false);
    expect(shouldYield(heavy, snapshot([], { [A]: 1 }, { [A]: T }), { ...slice, now: T + 60_000 })).toBe(false);
  });

  it('does not pause when this runner has a free slot for the waiting fit', () => {
    expect(shouldYield(heavy, snapshot([fit(7, B)], { [A]: 1 }), { ...slice, freeSlot: true, now: T + 60_000 })).toBe(false);
  });

  it('does not pause for a workspace that already runs as many fits as its own would after pausing', () => {
    // Two slots: A and C run one each; C's second fit must not push A out.
    const s = snapshot([fit(7, C)], { [A]: 1, [C]: 1 }, { [A]: T, [C]: T + 10 });
    expect(shouldYield(heavy, s, { ...slice, now: T + 60_000 })).toBe(false);
    // A holding both slots while B waits: one of A's fits makes way.
    expect(shouldYield(heavy, snapshot([fit(7, B)], { [A]: 2 }, { [A]: T }), { ...slice, now: T + 60_000 })).toBe(true);
  });
});
