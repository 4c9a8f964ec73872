import { decimalsFor, formatFixed, formatNumber } from '@/lib/format';
import { driftBand } from './psi';
import type { DriftBand, InsightReport } from './types';

/**
 * Shapes an insight report for the studio's charts and figures. Pure, so the page and
 * its tests read the same numbers.
 */

const DAY_MS = 86_400_000;

/** Every UTC day from `from` to `to`, inclusive ('YYYY-MM-DD'). */
export function daysBetween(from: string, to: string): string[] {
  const start = Date.parse(`${from}T00:00:00Z`);
  const end = Date.parse(`${to}T00:00:00Z`);
  if (!Number.isFinite(start) || !Number.isFinite(end) || end < start) return [];
  const out: string[] = [];
  for (let t = start; t <= end && out.length < 800; t += DAY_MS) out.push(new Date(t).toISOString().slice(0, 10));
  return out;
}

export interface DayTotal {
  day: string;
  answers: number;
  unusual: number;
  withBlanks: number;
  /** null on a day without answers: a share of nothing is not 0 %. */
  unusualShare: number | null;
  blanksShare: number | null;
}

/** Each day of the window with the versions' counts added up; days without answers are zeros. */
export function dailyTotals(report: Pick<InsightReport, 'from' | 'to' | 'days'>): DayTotal[] {
  const byDay = new Map<string, { answers: number; unusual: number; withBlanks: number }>();
  for (const d of report.days) {
    const hit = byDay.get(d.day) ?? { answers: 0, unusual: 0, withBlanks: 0 };
    hit.answers += d.answers;
    hit.unusual += d.unusual;
    hit.withBlanks += d.withBlanks;
    byDay.set(d.day, hit);
  }
  return daysBetween(report.from, report.to).map((day) => {
    const t = byDay.get(day) ?? { answers: 0, unusual: 0, withBlanks: 0 };
    return { day, ...t, unusualShare: t.answers ? t.unusual / t.answers : null, blanksShare: t.answers ? t.withBlanks / t.answers : null };
  });
}

export interface WindowSummary {
  answers: number;
  unusualShare: number | null;
  blanksShare: number | null;
  activeDays: number;
}

export function windowSummary(report: Pick<InsightReport, 'days'>): WindowSummary {
  let answers = 0;
  let unusual = 0;
  let withBlanks = 0;
  const days = new Set<string>();
  for (const d of report.days) {
    answers += d.answers;
    unusual += d.unusual;
    withBlanks += d.withBlanks;
    if (d.answers) days.add(d.day);
  }
  return { answers, unusualShare: answers ? unusual / answers : null, blanksShare: answers ? withBlanks / answers : null, activeDays: days.size };
}

/**
 * Day × group counts for the stacked chart. Groups are keyed by their label, so a group
 * that keeps its name across versions stays one band; its colour is the one of the
 * newest version that uses the label.
 */
export function groupDayPoints(report: Pick<InsightReport, 'days' | 'versions'>): { points: { day: string; group: string; answers: number }[]; groups: { label: string; color: string }[] } {
  const versions = new Map(report.versions.map((v) => [v.id, v]));
  const colours = new Map<string, { color: string; number: number }>();
  for (const v of report.versions) {
    for (const g of v.groups) {
      const seen = colours.get(g.label);
      if (!seen || v.number > seen.number) colours.set(g.label, { color: g.color, number: v.number });
    }
  }
  const points: { day: string; group: string; answers: number }[] = [];
  for (const d of report.days) {
    const groups = versions.get(d.versionId)?.groups ?? [];
    d.byGroup.forEach((count, index) => {
      if (count > 0) points.push({ day: d.day, group: groups[index]?.label ?? `Group ${index + 1}`, answers: count });
    });
  }
  const used = new Set(points.map((p) => p.group));
  const groups = [...used].map((label) => ({ label, color: colours.get(label)?.color ?? '#8a91a0' }));
  return { points, groups };
}

/** The first day each version was counted, after the window's first version. */
export function versionStarts(report: Pick<InsightReport, 'days' | 'versions'>): { day: string; label: string }[] {
  const first = new Map<number, string>();
  for (const d of [...report.days].sort((a, b) => a.day.localeCompare(b.day))) if (d.answers && !first.has(d.versionId)) first.set(d.versionId, d.day);
  const numbers = new Map(report.versions.map((v) => [v.id, v.number]));
  return [...first.entries()]
    .sort((a, b) => a[1].localeCompare(b[1]))
    .slice(1)
    .map(([id, day]) => ({ day, label: `v${numbers.get(id) ?? '?'} from here` }));
}

/** Words for each bin of a field: "below 12", "12–14", "above 40" (the first and last bins are open). */
export function binLabels(edges: number[], unit = ''): string[] {
  const bins = edges.length - 1;
  const u = unit ? ` ${unit}` : '';
  // One precision for all edges, from the width of an inner bin: 10–20, 2.5–5.0.
  const width = bins > 2 ? Math.abs(edges[2] - edges[1]) : Math.abs(edges[bins] - edges[0]);
  const decimals = Math.min(6, decimalsFor(width, 2));
  const edge = (v: number) => formatFixed(v, decimals);
  const out: string[] = [];
  for (let i = 0; i < bins; i++) {
    if (i === 0) out.push(`below ${edge(edges[1])}${u}`);
    else if (i === bins - 1) out.push(`above ${edge(edges[bins - 1])}${u}`);
    else out.push(`${edge(edges[i])}–${edge(edges[i + 1])}`);
  }
  return out;
}

/** Both distributions of a field as shares of their own totals, bin by bin. */
export function fieldBinShares(field: { edges: number[]; unit: string; training: number[]; visitors: number[] }) {
  const labels = binLabels(field.edges, field.unit);
  const trainingTotal = field.training.reduce((s, c) => s + c, 0);
  const visitorTotal = field.visitors.reduce((s, c) => s + c, 0);
  return labels.flatMap((bin, order) => [
    { bin, order, source: 'Training data' as const, share: trainingTotal ? field.training[order] / trainingTotal : 0 },
    ...(visitorTotal ? [{ bin, order, source: 'Visitors' as const, share: field.visitors[order] / visitorTotal }] : []),
  ]);
}

export const DRIFT_WORDS: Record<DriftBand, { word: string; advice: string }> = {
  stable: { word: 'Stable', advice: 'Visitors look like the training data.' },
  watch: { word: 'Watch', advice: 'Visitors have started to differ from the training data; keep an eye on it.' },
  act: { word: 'Act', advice: 'Visitors differ clearly from the training data; consider fitting again on newer data.' },
};

/** "0.031 · Stable", or why there is no figure. */
export function driftText(drift: { psi: number | null; band: DriftBand | null; answers: number }): string {
  if (drift.psi === null) return drift.answers ? 'Too few answers' : 'No answers yet';
  return `${formatNumber(drift.psi, 2)} · ${DRIFT_WORDS[drift.band ?? driftBand(drift.psi)].word}`;
}
