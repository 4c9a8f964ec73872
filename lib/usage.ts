import { Op, QueryTypes } from 'sequelize';
import { sequelize, UsageCounter } from '@/models';

/**
 * Metering: one scored answer adds one to its embed's month bucket (billing) and hour
 * bucket (spike detection).
 *
 * The scoring route is the hottest path of the product, so answers are added up in
 * memory and written in one UPSERT statement per flush (every PARTWISE_USAGE_FLUSH_MS,
 * default 250 ms) instead of one write per answer. Every reader below flushes first,
 * so readers in this process always see every answer; the server flushes on shutdown.
 * A hard crash loses at most one interval of counts, in the customer's favour.
 * The pending map lives on globalThis so every bundle of the server adds to the same one.
 */
export function monthPeriod(at = new Date()): string {
  return at.toISOString().slice(0, 7);
}

export function hourPeriod(at = new Date()): string {
  return at.toISOString().slice(0, 13);
}

interface PendingCount {
  embedId: number;
  workspaceId: number;
  granularity: 'month' | 'hour';
  period: string;
  count: number;
}

interface UsageBuffer {
  pending: Map<string, PendingCount>;
  timer: ReturnType<typeof setTimeout> | null;
  /** The flush in progress; flushes run one at a time so a failed batch can be put back in order. */
  running: Promise<void> | null;
  /** Other in-memory counters written by the same flush (answer insight), by name. */
  parts: Map<string, FlushPart>;
}

/** Counters kept beside usage and written by every usage flush; `flush` puts back what it could not write and throws. */
export interface FlushPart {
  pending(): boolean;
  flush(): Promise<void>;
}

const buffer = ((globalThis as Record<symbol, unknown>)[Symbol.for('partwise.usageBuffer')] ??= {
  pending: new Map(),
  timer: null,
  running: null,
  parts: new Map(),
}) as UsageBuffer;
buffer.parts ??= new Map();

/** Have the usage flush (timer, readers, shutdown) write another module's counters too. */
export function addFlushPart(name: string, part: FlushPart): void {
  buffer.parts.set(name, part);
}

function partsPending(): boolean {
  for (const part of buffer.parts.values()) if (part.pending()) return true;
  return false;
}

function flushIntervalMs(): number {
  const v = Number(process.env.PARTWISE_USAGE_FLUSH_MS);
  return Number.isFinite(v) && v >= 0 ? v : 250;
}

function add(embedId: number, workspaceId: number, granularity: 'month' | 'hour', period: string, count: number): void {
  const key = `${embedId}|${granularity}|${period}`;
  const hit = buffer.pending.get(key);
  if (hit) hit.count += count;
  else buffer.pending.set(key, { embedId, workspaceId, granularity, period, count });
}

function schedule(): void {
  if (buffer.timer) return;
  buffer.timer = setTimeout(() => {
    buffer.timer = null;
    flushUsage().catch((e) => console.error('[partwise] usage flush failed; counts kept for the next one:', (e as Error).message));
  }, flushIntervalMs());
  buffer.timer.unref?.();
}

// The current hour's bucket names, remembered until the hour ends (formatting a Date per answer shows up in profiles).
let current = { from: 0, until: 0, month: '', hour: '' };
const HOUR_MS = 3_600_000;

function periodsNow(ms: number): { month: string; hour: string } {
  if (ms < current.from || ms >= current.until) {
    const from = Math.floor(ms / HOUR_MS) * HOUR_MS;
    const at = new Date(from);
    current = { from, until: from + HOUR_MS, month: monthPeriod(at), hour: hourPeriod(at) };
  }
  return current;
}

/** Count one answer of an embed (synchronous; written by the next flush). */
export function recordAnswer(embed: { id: number; workspaceId: number }, at?: Date): void {
  const periods = at ? { month: monthPeriod(at), hour: hourPeriod(at) } : periodsNow(Date.now());
  add(embed.id, embed.workspaceId, 'month', periods.month, 1);
  add(embed.id, embed.workspaceId, 'hour', periods.hour, 1);
  schedule();
}

/** Answers counted but not yet written (for shutdown logs and tests). */
export function pendingAnswers(): number {
  let n = 0;
  for (const p of buffer.pending.values()) if (p.granularity === 'month') n += p.count;
  return n;
}

async function writeBatch(batch: PendingCount[]): Promise<void> {
  const now = new Date().toISOString();
  const rows = batch.map(() => '(?, ?, ?, ?, ?, ?, ?)').join(', ');
  const replacements = batch.flatMap((p) => [p.embedId, p.workspaceId, p.granularity, p.period, p.count, now, now]);
  await sequelize.query(
    `INSERT INTO usage_counters (embed_id, workspace_id, granularity, period, count, created_at, updated_at)
     VALUES ${rows}
     ON CONFLICT (embed_id, granularity, period) DO UPDATE SET count = usage_counters.count + excluded.count, updated_at = excluded.updated_at`,
    { replacements, type: QueryTypes.INSERT },
  );
}

// SQLite allows 32766 bound variables per statement; 7 per row.
const ROWS_PER_STATEMENT = 2000;

/** Write every pending count now. On failure the counts go back to the buffer and the error is rethrown. */
export async function flushUsage(): Promise<void> {
  while (buffer.running) await buffer.running.catch(() => undefined);
  if (!buffer.pending.size && !partsPending()) return;
  const batch = [...buffer.pending.values()];
  buffer.pending.clear();
  buffer.running = (async () => {
    for (let i = 0; i < batch.length; i += ROWS_PER_STATEMENT) {
      const part = batch.slice(i, i + ROWS_PER_STATEMENT);
      try {
        await writeBatch(part);
      } catch (error) {
        // Each statement is atomic: put back only what was not written.
        for (const p of batch.slice(i)) add(p.embedId, p.workspaceId, p.granularity, p.period, p.count);
        schedule();
        throw error;
      }
    }
    for (const part of buffer.parts.values()) {
      try {
        await part.flush();
      } catch (error) {
        schedule();
        throw error;
      }
    }
  })();
  try {
    await buffer.running;
  } finally {
    buffer.running = null;
  }
}

/** The month bucket's name for `ms` (cached per hour, like the buckets recordAnswer adds to). */
export function currentMonthPeriod(ms = Date.now()): string {
  return periodsNow(ms).month;
}

function pendingMonthAnswers(workspaceId: number, period: string): number {
  let n = 0;
  for (const p of buffer.pending.values()) if (p.workspaceId === workspaceId && p.granularity === 'month' && p.period === period) n += p.count;
  return n;
}

/**
 * A workspace's answers of a month exactly as of one instant: the table plus what is
 * still in the buffer, read while no flush runs (a flush takes counts out of the buffer
 * before they reach the table). `use` runs synchronously at that instant, so a caller
 * can set up an in-memory counter that no answer recorded meanwhile slips past.
 */
export async function readMonthlyAnswersAtOnce<T>(workspaceId: number, period: string, use: (count: number) => T): Promise<T> {
  while (buffer.running) await buffer.running.catch(() => undefined);
  let release!: () => void;
  const held = new Promise<void>((resolve) => (release = resolve));
  buffer.running = held;
  try {
    const total = await UsageCounter.sum('count', { where: { workspaceId, granularity: 'month', period } });
    return use(Number(total ?? 0) + pendingMonthAnswers(workspaceId, period));
  } finally {
    if (buffer.running === held) buffer.running = null;
    release();
  }
}

/** Answers of all a workspace's calculators in a month. */
export async function workspaceMonthlyAnswers(workspaceId: number, period = monthPeriod()): Promise<number> {
  await flushUsage();
  const total = await UsageCounter.sum('count', { where: { workspaceId, granularity: 'month', period } });
  return Number(total ?? 0);
}

export async function embedMonthlyAnswers(embedId: number, period = monthPeriod()): Promise<number> {
  await flushUsage();
  const row = await UsageCounter.findOne({ where: { embedId, granularity: 'month', period } });
  return row?.count ?? 0;
}

/** Hour buckets of one embed from `since` on, oldest first. */
export async function embedHourlyAnswers(embedId: number, since: Date): Promise<{ period: string; count: number }[]> {
  await flushUsage();
  const rows = await UsageCounter.findAll({
    where: { embedId, granularity: 'hour', period: { [Op.gte]: hourPeriod(since) } },
    order: [['period', 'ASC']],
  });
  return rows.map((r) => ({ period: r.period, count: r.count }));
}

/** Count `count` answers of an embed at once (a scored batch: one answer per row). */
export function recordAnswers(embed: { id: number; workspaceId: number }, count: number): void {
  if (count <= 0) return;
  const periods = periodsNow(Date.now());
  add(embed.id, embed.workspaceId, 'month', periods.month, count);
  add(embed.id, embed.workspaceId, 'hour', periods.hour, count);
  schedule();
}

