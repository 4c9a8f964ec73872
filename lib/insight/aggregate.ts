import { Op } from 'sequelize';
import { driftBand, populationStability } from '@/lib/insight/psi';
import { flushUsage } from '@/lib/usage';
import { InsightCount, ModelVersion, type ClusterLabel } from '@/models';
import { ensureInsightBins, type TrainingSource, type VersionBins } from './bins';
import { utcDay } from './counters';
import type { InsightDay, InsightField, InsightFieldDrift, InsightVersion } from './types';

/**
 * Reading answer insight's daily counters back: per day and version, per field against
 * the training data (PSI over the last 7 and 30 days). Shared by the studio's report
 * (lib/insight/report.ts) and the weekly mail sweep (lib/insight/alerts.ts).
 */

/** Daily aggregates are kept this long, then deleted by the retention sweep (lib/insight/sweeps.ts). */
export const RETENTION_MONTHS = 13;

const DAY_MS = 86_400_000;

export function addDays(day: string, n: number): string {
  return utcDay(Date.parse(`${day}T00:00:00Z`) + n * DAY_MS);
}

/** The first UTC day still kept on `now`: RETENTION_MONTHS calendar months before today. */
export function retentionCutoffDay(now = new Date()): string {
  return utcDay(Date.UTC(now.getUTCFullYear(), now.getUTCMonth() - RETENTION_MONTHS, now.getUTCDate()));
}

export interface CountRow {
  versionId: number;
  day: string;
  kind: string;
  field: string;
  bin: number;
  count: number;
  demo: boolean;
}

/** An embed's counters from `from` to `to` (inclusive), after writing what is still in memory. */
export async function readCounts(embedId: number, from: string, to: string, versionId: number | null = null): Promise<CountRow[]> {
  await flushUsage();
  const rows = await InsightCount.findAll({
    where: { embedId, day: { [Op.between]: [from, to] }, ...(versionId !== null ? { versionId } : {}) },
    attributes: ['versionId', 'day', 'kind', 'field', 'bin', 'count', 'demo'],
    raw: true,
  });
  return rows.map((r) => ({ versionId: r.versionId, day: r.day, kind: r.kind, field: r.field, bin: r.bin, count: Number(r.count), demo: Boolean(r.demo) }));
}

export function versionGroups(v: ModelVersion): InsightVersion {
  const payload = (typeof v.payload === 'string' ? JSON.parse(v.payload) : v.payload) as { clusters?: ClusterLabel[] };
  const clusters = Array.isArray(payload?.clusters) ? payload.clusters : [];
  return { id: v.id, number: v.number, groups: clusters.map((c, index) => ({ index, label: c.label, color: c.color })) };
}

/** Per (day, version) with any counts in [from, to]: every day of the window for each such version (zeros where it had none). */
export function dailyRows(rows: CountRow[], from: string, to: string, groupsOf: Map<number, number>): InsightDay[] {
  const byKey = new Map<string, InsightDay>();
  const versions = new Set<number>();
  for (const r of rows) {
    if (r.day < from || r.day > to) continue;
    if (r.kind !== 'answers' && r.kind !== 'unusual' && r.kind !== 'with_blanks' && r.kind !== 'group') continue;
    versions.add(r.versionId);
  }
  const out: InsightDay[] = [];
  for (let day = from; day <= to; day = addDays(day, 1)) {
    for (const versionId of [...versions].sort((a, b) => a - b)) {
      const d: InsightDay = { day, versionId, answers: 0, unusual: 0, withBlanks: 0, byGroup: new Array(groupsOf.get(versionId) ?? 0).fill(0) };
      byKey.set(`${day}|${versionId}`, d);
      out.push(d);
    }
  }
  for (const r of rows) {
    const d = byKey.get(`${r.day}|${r.versionId}`);
    if (!d) continue;
    if (r.kind === 'answers') d.answers += r.count;
    else if (r.kind === 'unusual') d.unusual += r.count;
    else if (r.kind === 'with_blanks') d.withBlanks += r.count;
    else if (r.kind === 'group') {
      while (d.byGroup.length <= r.bin) d.byGroup.push(0);
      d.byGroup[r.bin] += r.count;
    }
  }
  return out;
}

function sameEdges(a: number[], b: number[]): boolean {
  return a.length === b.length && a.every((x, i) => x === b[i]);
}

/** For each field of `chosen`, the versions whose bins of that feature are the very same (so their counts add up). */
export function matchingVersions(chosen: VersionBins, others: VersionBins[]): Set<number>[] {
  return chosen.fields.map((f) => {
    const set = new Set<number>([chosen.versionId]);
    for (const o of others) {
      const g = o.fields.find((x) => x.feature === f.feature);
      if (g && sameEdges(g.edges, f.edges)) set.add(o.versionId);
    }
    return set;
  });
}

function drift(training: number[], visitors: number[]): InsightFieldDrift {
  const answers = visitors.reduce((s, c) => s + c, 0);
  const psi = populationStability(training, visitors);
  return { psi, band: psi === null ? null : driftBand(psi), answers };
}

function binCounts(rows: CountRow[], feature: string, bins: number, versions: Set<number>, from: string, to: string): { counts: number[]; blanks: number } {
  const counts = new Array<number>(bins).fill(0);
  let blanks = 0;
  for (const r of rows) {
    if (r.field !== feature || r.day < from || r.day > to || !versions.has(r.versionId)) continue;
    if (r.kind === 'bin' && r.bin >= 0 && r.bin < bins) counts[r.bin] += r.count;
    else if (r.kind === 'blank') blanks += r.count;
  }
  return { counts, blanks };
}

function answersIn(rows: CountRow[], kind: 'answers' | 'unusual', from: string, to: string): number {
  let n = 0;
  for (const r of rows) if (r.kind === kind && r.day >= from && r.day <= to) n += r.count;
  return n;
}

export interface FieldAnalysis {
  fields: InsightField[];
  trainingSource: TrainingSource;
  /** Overall drift = the largest field PSI of the period (the field that moved most speaks for the calculator). */
  overall: { last7: InsightFieldDrift; last30: InsightFieldDrift };
}

/**
 * Fields of `chosen` against training: visitors' counts over [from, to], and the drift of
 * the last 7 and 30 days ending `to`. `rows` must cover from min(from, to − 29) to `to`
 * and only the versions the report is about (one, or all of the calculator's).
 */
export function analyseFields(chosen: VersionBins, others: VersionBins[], rows: CountRow[], from: string, to: string): FieldAnalysis {
  const matching = matchingVersions(chosen, others);
  const from7 = addDays(to, -6);
  const from30 = addDays(to, -29);
  const fields: InsightField[] = chosen.fields.map((f, j) => {
    const n = f.edges.length - 1;
    const training = chosen.training[j] ?? new Array<number>(n).fill(0);
    const window = binCounts(rows, f.feature, n, matching[j], from, to);
    return {
      feature: f.feature,
      label: f.label,
      unit: f.unit,
      edges: f.edges,
      training,
      visitors: window.counts,
      blanks: window.blanks,
      last7: drift(training, binCounts(rows, f.feature, n, matching[j], from7, to).counts),
      last30: drift(training, binCounts(rows, f.feature, n, matching[j], from30, to).counts),
    };
  });
  const overall = (period: 'last7' | 'last30', start: string): InsightFieldDrift => {
    let psi: number | null = null;
    for (const f of fields) {
      const p = f[period].psi;
      if (p !== null && (psi === null || p > psi)) psi = p;
    }
    return { psi, band: psi === null ? null : driftBand(psi), answers: answersIn(rows, 'answers', start, to) };
  };
  return { fields, trainingSource: chosen.source, overall: { last7: overall('last7', from7), last30: overall('last30', from30) } };
}

/** Bins of every version that has counts in `rows`, plus `chosen` (made on first use for older versions). */
export async function binsOfVersions(chosenId: number, rows: CountRow[]): Promise<{ chosen: VersionBins; others: VersionBins[] }> {
  const ids = new Set(rows.map((r) => r.versionId));
  ids.delete(chosenId);
  const chosen = await ensureInsightBins(chosenId);
  const others: VersionBins[] = [];
  for (const id of [...ids].sort((a, b) => a - b)) others.push(await ensureInsightBins(id));
  return { chosen, others };
}

/**
 * The last 7 days of a calculator as the weekly mail sees them: the overall drift of the
 * served version's fields (counting every version with the same bins), and the share of
 * answers flagged unusual.
 */
export async function lastWeek(embed: { id: number; activeVersionId: number | null }, now = new Date()): Promise<{ drift: InsightFieldDrift; answers: number; unusual: number; demo: boolean } | null> {
  if (!embed.activeVersionId) return null;
  const to = utcDay(now);
  const from = addDays(to, -6);
  const rows = await readCounts(embed.id, from, to);
  const { chosen, others } = await binsOfVersions(embed.activeVersionId, rows);
  const analysis = analyseFields(chosen, others, rows, from, to);
  return { drift: analysis.overall.last7, answers: answersIn(rows, 'answers', from, to), unusual: answersIn(rows, 'unusual', from, to), demo: rows.some((r) => r.demo) };
}
