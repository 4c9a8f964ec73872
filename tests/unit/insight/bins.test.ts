import { describe, expect, it } from 'vitest';
import { binOf, countRows, fieldEdges, geometryOf, INNER_BINS } from '@/lib/insight/bins';
import { insightWeeklyMail } from '@/lib/mail/templates';

describe('insight bins', () => {
  it('are 12 equal bins over the input range with an open bin below and above (edges worked by hand for [0, 120])', () => {
    expect(INNER_BINS).toBe(12);
    expect(fieldEdges(0, 120)).toEqual([-10, 0, 10, 20, 30, 40, 50, 60, 70, 80, 90, 100, 110, 120, 130]);
    expect(geometryOf(fieldEdges(0, 120))).toEqual({ min: 0, max: 120, width: 10, inner: 12 });
  });

  it('put each value in its bin: below, inside (left edge closed, the maximum in the last inner bin), above', () => {
    const at = (v: number) => binOf(v, 0, 120, 10, 12);
    expect(at(-0.001)).toBe(0);
    expect(at(0)).toBe(1);
    expect(at(9.999)).toBe(1);
    expect(at(10)).toBe(2);
    expect(at(115)).toBe(12);
    expect(at(120)).toBe(12);
    expect(at(120.001)).toBe(13);
  });

  it('count rows per field, skipping non-finite cells', () => {
    const bins = [{ feature: 'a', label: 'A', unit: '', edges: fieldEdges(0, 120) }, { feature: 'b', label: 'B', unit: '', edges: fieldEdges(10, 22) }];
    const rows = [5, 10, 125, 21.5, -3, Number.NaN, 60, 9];
    const counts = countRows(bins, rows, 4, 2);
    expect(counts[0]).toEqual([1, 1, 0, 0, 0, 0, 0, 1, 0, 0, 0, 0, 0, 1]);
    expect(counts[1]).toEqual([1, 1, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 1, 0]);
  });
});

describe('the weekly insight mail', () => {
  const base = { email: 'a@b.test', workspaceName: 'Club', calculatorTitle: 'Ride groups', answers: 120, driftThreshold: 0.25, unusualThreshold: 0.2, demo: false, link: 'http://localhost:3000/studio/calculators/1?tab=insight' };
  it('names drift when drift crossed the threshold, and says it is about inputs, not a person', () => {
    const mail = insightWeeklyMail({ ...base, drift: 0.31, driftBand: 'act', unusualShare: 0.05 });
    expect(mail.subject).toBe('“Ride groups”: visitors’ inputs have drifted from the training data');
    expect(mail.text).toContain('drift (population stability index) of 0.31');
    expect(mail.text).toContain('not anything about any one visitor');
    expect(mail.text).not.toContain('flagged as unlike');
  });
  it('names the unusual share alone when only it crossed', () => {
    const mail = insightWeeklyMail({ ...base, drift: 0.05, driftBand: 'stable', unusualShare: 0.25 });
    expect(mail.subject).toBe('“Ride groups”: more answers than you set are unlike the training data');
    expect(mail.text).toContain('25% of the answers were flagged as unlike the training data');
    expect(mail.text).not.toContain('population stability index');
  });
});
