import { describe, expect, it } from 'vitest';
import { binLabels, dailyTotals, daysBetween, driftText, fieldBinShares, groupDayPoints, versionStarts, windowSummary } from '@/lib/insight/view';
import type { InsightReport } from '@/lib/insight/types';

const versions: InsightReport['versions'] = [
  { id: 11, number: 1, groups: [{ index: 0, label: 'Easy', color: '#111111' }, { index: 1, label: 'Fast', color: '#222222' }] },
  { id: 12, number: 2, groups: [{ index: 0, label: 'Fast', color: '#333333' }, { index: 1, label: 'Steady', color: '#444444' }] },
];
const days: InsightReport['days'] = [
  { day: '2026-11-29', versionId: 11, answers: 10, unusual: 1, withBlanks: 2, byGroup: [6, 4] },
  { day: '2026-11-30', versionId: 11, answers: 4, unusual: 0, withBlanks: 0, byGroup: [4, 0] },
  { day: '2026-11-30', versionId: 12, answers: 6, unusual: 3, withBlanks: 1, byGroup: [2, 4] },
];

describe('insight view shaping', () => {
  it('lists every UTC day of the window, across a month end', () => {
    expect(daysBetween('2026-11-29', '2026-12-02')).toEqual(['2026-11-29', '2026-11-30', '2026-12-01', '2026-12-02']);
    expect(daysBetween('2026-12-02', '2026-11-29')).toEqual([]);
  });

  it('adds versions up per day and leaves days without answers without a share', () => {
    const totals = dailyTotals({ from: '2026-11-29', to: '2026-12-01', days });
    expect(totals.map((t) => t.answers)).toEqual([10, 10, 0]);
    expect(totals[1].unusualShare).toBeCloseTo(0.3, 12);
    expect(totals[1].blanksShare).toBeCloseTo(0.1, 12);
    expect(totals[2].unusualShare).toBeNull();
    const s = windowSummary({ days });
    expect(s).toEqual({ answers: 20, unusualShare: 4 / 20, blanksShare: 3 / 20, activeDays: 2 });
  });

  it('keeps a group that keeps its label as one band, in the newest version’s colour', () => {
    const { points, groups } = groupDayPoints({ days, versions });
    expect(groups).toEqual([
      { label: 'Easy', color: '#111111' },
      { label: 'Fast', color: '#333333' },
      { label: 'Steady', color: '#444444' },
    ]);
    const fastOn30 = points.filter((p) => p.day === '2026-11-30' && p.group === 'Fast').reduce((s, p) => s + p.answers, 0);
    expect(fastOn30).toBe(2);
    expect(points.reduce((s, p) => s + p.answers, 0)).toBe(20);
    expect(versionStarts({ days, versions })).toEqual([{ day: '2026-11-30', label: 'v2 from here' }]);
  });

  it('names open bins at both ends and turns counts into shares', () => {
    const edges = [0, 10, 20, 30, 40];
    expect(binLabels(edges, 'km')).toEqual(['below 10 km', '10–20', '20–30', 'above 30 km']);
    const shares = fieldBinShares({ edges, unit: 'km', training: [1, 1, 2, 0], visitors: [0, 0, 1, 3] });
    expect(shares.filter((s) => s.source === 'Training data').map((s) => s.share)).toEqual([0.25, 0.25, 0.5, 0]);
    expect(shares.filter((s) => s.source === 'Visitors').map((s) => s.share)).toEqual([0, 0, 0.25, 0.75]);
    expect(fieldBinShares({ edges, unit: '', training: [1, 1, 1, 1], visitors: [0, 0, 0, 0] }).some((s) => s.source === 'Visitors')).toBe(false);
  });

  it('words drift figures with their band', () => {
    expect(driftText({ psi: 0.031, band: 'stable', answers: 40 })).toBe('0.031 · Stable');
    expect(driftText({ psi: 0.4, band: 'act', answers: 40 })).toBe('0.40 · Act');
    expect(driftText({ psi: null, band: null, answers: 0 })).toBe('No answers yet');
  });
});
