import { QueryTypes } from 'sequelize';
import { addFlushPart } from '@/lib/usage';
import { InsightBins, sequelize, type FieldSetting, type InsightKind, type StoredFieldBins } from '@/models';
import { binOf, binsForFields, geometryOf } from './bins';

/**
 * Answer insight's counters on the scoring hot path. Each answer only adds one to daily
 * counters of its calculator, version and UTC day: answers, unusual, with blanks, its best
 * group, and per field the bin its value fell in (or blank). The value itself, the
 * visitor's address and the time of day are never kept, not even in memory.
 *
 * Like lib/usage.ts the counts wait in memory (on globalThis, so every bundle of the
 * server adds to the same ones) and are written by the usage flush: one multi-row UPSERT
 * (`count = count + excluded.count`) per flush, put back when it fails.
 *
 * Cheap: the bin geometry of a version is worked out once (InsightLookup, cached on the
 * served version), and one day's counters are typed arrays found through the lookup, so
 * an answer allocates nothing and costs a few array increments per field.
 */

/** A version's bins in the form the hot path reads. */
export interface InsightLookup {
  versionId: number;
  features: string[];
  /** per field: min, max, width and inner bin count (bins per field = inner + 2) */
  mins: Float64Array;
  maxs: Float64Array;
  widths: Float64Array;
  inner: Int32Array;
  /** offset of field j's bins in DayCounters.bins */
  offsets: Int32Array;
  totalBins: number;
  groups: number;
  /** the day's counters this version added to last (a shortcut past the map) */
  current: DayCounters | null;
}

interface DayCounters {
  key: string;
  embedId: number;
  versionId: number;
  day: string;
  /** the day in ms since the epoch, [from, until) */
  from: number;
  until: number;
  features: string[];
  offsets: Int32Array;
  inner: Int32Array;
  answers: number;
  unusual: number;
  withBlanks: number;
  groups: Float64Array;
  bins: Float64Array;
  blanks: Float64Array;
  dirty: boolean;
  /** dropped from the buffer: the hot path must look its day up again */
  retired: boolean;
}

/** One counter row as it is written. */
export interface InsightCountRow {
  embedId: number;
  versionId: number;
  day: string;
  kind: InsightKind;
  field: string;
  bin: number;
  count: number;
}

interface InsightBuffer {
  days: Map<string, DayCounters>;
  /** rows of a failed write, added to the next one */
  putBack: Map<string, InsightCountRow>;
  running: Promise<void> | null;
}

const buffer = ((globalThis as Record<symbol, unknown>)[Symbol.for('partwise.insightBuffer')] ??= {
  days: new Map(),
  putBack: new Map(),
  running: null,
}) as InsightBuffer;

const DAY_MS = 86_400_000;

export function utcDay(at: Date | number): string {
  return new Date(typeof at === 'number' ? at : at.getTime()).toISOString().slice(0, 10);
}

/** The lookup of a version from its stored bins. */
export function lookupFromBins(versionId: number, bins: StoredFieldBins[], groups: number): InsightLookup {
  const d = bins.length;
  const l: InsightLookup = {
    versionId,
    features: bins.map((b) => b.feature),
    mins: new Float64Array(d),
    maxs: new Float64Array(d),
    widths: new Float64Array(d),
    inner: new Int32Array(d),
    offsets: new Int32Array(d),
    totalBins: 0,
    groups,
    current: null,
  };
  for (let j = 0; j < d; j++) {
    const g = geometryOf(bins[j].edges);
    l.mins[j] = g.min;
    l.maxs[j] = g.max;
    l.widths[j] = g.width;
    l.inner[j] = g.inner;
    l.offsets[j] = l.totalBins;
    l.totalBins += g.inner + 2;
  }
  return l;
}

/**
 * The lookup for a version being loaded for serving: its stored bins when it has them.
 * A version published before insight has none yet; it counts on the bins its payload
 * gives by the same rule (binsForFields: the very edges the first report will store with
 * the training counts, see ensureInsightBins), and serving writes nothing. If the stored
 * bins cannot be read, the same fallback, so scoring never waits on insight.
 */
export async function insightLookupFor(version: { id: number; payload: { fields: FieldSetting[]; clusters: unknown[] } }): Promise<InsightLookup> {
  try {
    const stored = await InsightBins.findByPk(version.id, { attributes: ['versionId', 'bins'] });
    if (stored && stored.bins.length === version.payload.fields.length) return lookupFromBins(version.id, stored.bins, version.payload.clusters.length);
  } catch (e) {
    console.error(`[partwise] insight bins of version ${version.id} unavailable; counting on the payload's bins:`, (e as Error).message);
  }
  return lookupFromBins(version.id, binsForFields(version.payload.fields), version.payload.clusters.length);
}

function dayCounters(embedId: number, l: InsightLookup, ms: number): DayCounters {
  const from = Math.floor(ms / DAY_MS) * DAY_MS;
  const day = utcDay(from);
  const key = `${embedId}|${l.versionId}|${day}`;
  let c = buffer.days.get(key);
  if (!c) {
    c = {
      key,
      embedId,
      versionId: l.versionId,
      day,
      from,
      until: from + DAY_MS,
      features: l.features,
      offsets: l.offsets,
      inner: l.inner,
      answers: 0,
      unusual: 0,
      withBlanks: 0,
      groups: new Float64Array(l.groups),
      bins: new Float64Array(l.totalBins),
      blanks: new Float64Array(l.features.length),
      dirty: false,
      retired: false,
    };
    buffer.days.set(key, c);
  }
  return c;
}

/**
 * Count one answer (synchronous; written by the next usage flush). `row` is the
 * validated row in the model's field order (null = left blank); nothing of it is kept
 * but the bin each value fell in. Does nothing when insight is off for the calculator.
 */
export function recordInsight(
  embed: { id: number; insightEnabled: boolean },
  lookup: InsightLookup | null | undefined,
  row: ArrayLike<number | null>,
  best: number,
  unusual: boolean,
  at?: Date,
): void {
  if (!embed.insightEnabled || !lookup) return;
  const ms = at ? at.getTime() : Date.now();
  let c = lookup.current;
  if (c === null || c.retired || ms < c.from || ms >= c.until || c.embedId !== embed.id) c = lookup.current = dayCounters(embed.id, lookup, ms);
  c.answers++;
  if (unusual) c.unusual++;
  if (best >= 0 && best < c.groups.length) c.groups[best]++;
  let blank = false;
  const d = lookup.features.length;
  for (let j = 0; j < d; j++) {
    const v = row[j];
    if (v === null || v === undefined) {
      c.blanks[j]++;
      blank = true;
    } else {
      c.bins[lookup.offsets[j] + binOf(v, lookup.mins[j], lookup.maxs[j], lookup.widths[j], lookup.inner[j])]++;
    }
  }
  if (blank) c.withBlanks++;
  c.dirty = true;
}

function rowKey(r: InsightCountRow): string {
  return `${r.embedId}|${r.versionId}|${r.day}|${r.kind}|${r.field}|${r.bin}`;
}

function putBack(rows: InsightCountRow[]): void {
  for (const r of rows) {
    const key = rowKey(r);
    const hit = buffer.putBack.get(key);
    if (hit) hit.count += r.count;
    else buffer.putBack.set(key, { ...r });
  }
}

/**
 * Take every pending count out of memory as rows (synchronously, so no answer can slip
 * between reading a counter and zeroing it). Days that have ended and hold nothing are
 * dropped from the buffer.
 */
function drain(now = Date.now()): InsightCountRow[] {
  const rows: InsightCountRow[] = [...buffer.putBack.values()];
  buffer.putBack.clear();
  for (const c of buffer.days.values()) {
    if (c.dirty) {
      const base = { embedId: c.embedId, versionId: c.versionId, day: c.day };
      if (c.answers) rows.push({ ...base, kind: 'answers', field: '', bin: -1, count: c.answers });
      if (c.unusual) rows.push({ ...base, kind: 'unusual', field: '', bin: -1, count: c.unusual });
      if (c.withBlanks) rows.push({ ...base, kind: 'with_blanks', field: '', bin: -1, count: c.withBlanks });
      for (let g = 0; g < c.groups.length; g++) if (c.groups[g]) rows.push({ ...base, kind: 'group', field: '', bin: g, count: c.groups[g] });
      for (let j = 0; j < c.features.length; j++) {
        if (c.blanks[j]) rows.push({ ...base, kind: 'blank', field: c.features[j], bin: -1, count: c.blanks[j] });
        const n = c.inner[j] + 2;
        for (let b = 0; b < n; b++) {
          const v = c.bins[c.offsets[j] + b];
          if (v) rows.push({ ...base, kind: 'bin', field: c.features[j], bin: b, count: v });
        }
      }
      c.answers = c.unusual = c.withBlanks = 0;
      c.groups.fill(0);
      c.bins.fill(0);
      c.blanks.fill(0);
      c.dirty = false;
    } else if (c.until <= now) {
      c.retired = true;
      buffer.days.delete(c.key);
    }
  }
  return rows;
}

function pending(): boolean {
  if (buffer.putBack.size) return true;
  for (const c of buffer.days.values()) if (c.dirty) return true;
  return false;
}

// SQLite allows 32766 bound variables per statement; 7 per row.
const ROWS_PER_STATEMENT = 2000;

async function writeRows(rows: InsightCountRow[]): Promise<void> {
  const values = rows.map(() => '(?, ?, ?, ?, ?, ?, ?)').join(', ');
  const replacements = rows.flatMap((r) => [r.embedId, r.versionId, r.day, r.kind, r.field, r.bin, r.count]);
  await sequelize.query(
    `INSERT INTO insight_counts (embed_id, version_id, day, kind, field, bin, count) VALUES ${values}
     ON CONFLICT (embed_id, version_id, day, kind, field, bin) DO UPDATE SET count = insight_counts.count + excluded.count`,
    { replacements, type: QueryTypes.INSERT },
  );
}

/** Write every pending insight count now; on failure what was not written goes back to memory and the error is rethrown. */
export async function flushInsight(): Promise<void> {
  while (buffer.running) await buffer.running.catch(() => undefined);
  if (!pending()) return;
  const rows = drain();
  buffer.running = (async () => {
    for (let i = 0; i < rows.length; i += ROWS_PER_STATEMENT) {
      try {
        await writeRows(rows.slice(i, i + ROWS_PER_STATEMENT));
      } catch (error) {
        // Each statement is atomic: put back only what was not written.
        putBack(rows.slice(i));
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

/** Answers counted for insight but not yet written (tests, shutdown logs). */
export function pendingInsightAnswers(): number {
  let n = 0;
  for (const r of buffer.putBack.values()) if (r.kind === 'answers') n += r.count;
  for (const c of buffer.days.values()) n += c.answers;
  return n;
}

/** Test hook: forget every pending count. */
export function clearPendingInsight(): void {
  for (const c of buffer.days.values()) c.retired = true;
  buffer.days.clear();
  buffer.putBack.clear();
}

// One usage flush writes both (lib/usage.ts runs the parts after its own counts).
addFlushPart('insight', { pending, flush: flushInsight });
