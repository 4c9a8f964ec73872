import { describe, expect, it } from 'vitest';
import { ellipsePath } from '@/lib/fitting/ellipse';
import { defaultInputRange, prettifyName, guessUnit } from '@/lib/datasets/parse';

describe('ellipses from a 2×2 covariance', () => {
  const cases: [[number, number], [[number, number], [number, number]]][] = [
    [[1, 2], [[4, 1.5], [1.5, 1]]],
    [[-3, 10], [[0.5, -0.4], [-0.4, 2]]],
    [[0, 0], [[2, 0], [0, 9]]],
    [[5, 5], [[9, 0], [0, 2]]],
  ];
  for (const [mean, cov] of cases) {
    it(`every point of the 1- and 2-sigma rings of ${JSON.stringify(cov)} is at that Mahalanobis distance`, () => {
      const det = cov[0][0] * cov[1][1] - cov[0][1] * cov[1][0];
      const inv = [[cov[1][1] / det, -cov[0][1] / det], [-cov[1][0] / det, cov[0][0] / det]];
      for (const r of [1, 2]) {
        const path = ellipsePath(mean, cov, r, 36);
        expect(path).toHaveLength(37);
        for (const [x, y] of path) {
          const dx = x - mean[0];
          const dy = y - mean[1];
          const m2 = dx * (inv[0][0] * dx + inv[0][1] * dy) + dy * (inv[1][0] * dx + inv[1][1] * dy);
          expect(Math.sqrt(m2)).toBeCloseTo(r, 9);
        }
      }
    });
  }
});

describe('feature defaults', () => {
  it('widens the observed range by a tenth each side, not below zero for non-negative data', () => {
    expect(defaultInputRange(10, 30)).toEqual({ min: 8, max: 32 });
    expect(defaultInputRange(5, 105)).toEqual({ min: 0, max: 115 });
    expect(defaultInputRange(-2, 2)).toEqual({ min: -2.4, max: 2.4 });
    expect(defaultInputRange(null, null)).toEqual({ min: null, max: null });
  });
  it('reads a unit from a column name suffix', () => {
    expect(guessUnit('avg_speed_kmh')).toBe('km/h');
    expect(guessUnit('climb_per_ride_m')).toBe('m');
    expect(guessUnit('petal_width')).toBe('');
    expect(prettifyName('weekly_distance_km')).toBe('Weekly distance');
    expect(prettifyName('petal_width')).toBe('Petal width');
  });
});
