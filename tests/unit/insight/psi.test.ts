import { describe, expect, it } from 'vitest';
import { driftBand, EMPTY_BIN_SHARE, populationStability } from '@/lib/insight/psi';
import { loadFixture } from '../mixture/helpers';

interface PsiFixture {
  source: string;
  floor: number;
  cases: { name: string; expected: number[]; actual: number[]; psi: number }[];
}

describe('population stability index', () => {
  it('matches a hand-worked example of three bins', () => {
    // Training shares 0.5, 0.3, 0.2; visitors 0.4, 0.3, 0.3 (worked by hand):
    //   (0.4 − 0.5)·ln(0.4/0.5) = 0.1 · 0.223144 = 0.0223144
    //   (0.3 − 0.3)·ln(1)       = 0
    //   (0.3 − 0.2)·ln(0.3/0.2) = 0.1 · 0.405465 = 0.0405465
    //   PSI = 0.0628609 → stable
    const psi = populationStability([50, 30, 20], [40, 30, 30])!;
    expect(psi).toBeCloseTo(0.0628609, 6);
    expect(driftBand(psi)).toBe('stable');
    // Counts, not shares: scaling either side changes nothing.
    expect(populationStability([500, 300, 200], [4, 3, 3])).toBeCloseTo(psi, 12);
  });

  it('keeps an empty bin finite with the floor of 1e-4 per share', () => {
    // Training all in bin 1, visitors half and half (worked by hand, shares floored at 0.0001):
    //   (0.5 − 1)·ln(0.5/1) = 0.346574;  (0.5 − 0.0001)·ln(0.5/0.0001) = 0.4999 · 8.517193 = 4.257745
    //   PSI = 4.604318 → act
    expect(EMPTY_BIN_SHARE).toBe(1e-4);
    const psi = populationStability([100, 0], [50, 50])!;
    expect(psi).toBeCloseTo(4.604318, 5);
    expect(driftBand(psi)).toBe('act');
  });

  it('is zero for the same distribution and null when a side counted nothing', () => {
    expect(populationStability([3, 6, 9], [1, 2, 3])).toBeCloseTo(0, 14);
    expect(populationStability([0, 0, 0], [1, 2, 3])).toBeNull();
    expect(populationStability([1, 2, 3], [0, 0, 0])).toBeNull();
  });

  it('refuses bins that do not line up and counts that are not counts', () => {
    expect(() => populationStability([1, 2], [1, 2, 3])).toThrow(/same bins/);
    expect(() => populationStability([1, -2], [1, 2])).toThrow(/Bin 1/);
    expect(() => populationStability([1, Number.NaN], [1, 2])).toThrow(/Bin 1/);
  });

  it('bands: below 0.1 stable, 0.1 to 0.25 watch, above 0.25 act (common practice, no published source)', () => {
    expect(driftBand(0.0999)).toBe('stable');
    expect(driftBand(0.1)).toBe('watch');
    expect(driftBand(0.25)).toBe('watch');
    expect(driftBand(0.2501)).toBe('act');
  });

  // NumPy's computation of the same formula: tests/reference/generate_numpy_psi.py wrote
  // tests/fixtures/reference/numpy-psi.json (Iris histograms by species, Palmer penguins
  // halves, seeded random counts with empty bins).
  const fixture = loadFixture<PsiFixture>('numpy-psi.json');
  it(`agrees with NumPy on ${fixture.cases.length} cases (${fixture.source})`, () => {
    expect(fixture.floor).toBe(EMPTY_BIN_SHARE);
    expect(fixture.cases.length).toBeGreaterThanOrEqual(20);
    for (const c of fixture.cases) {
      const ours = populationStability(c.expected, c.actual)!;
      expect(Math.abs(ours - c.psi) / Math.max(1, Math.abs(c.psi)), c.name).toBeLessThan(1e-12);
    }
  });
});
