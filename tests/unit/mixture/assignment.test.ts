/**
 * The Hungarian method (lib/mixture/assignment.ts) against SciPy. The fixture
 * tests/fixtures/scipy-assignment.json is written by
 * tests/reference/generate_scipy_assignment.py (Debian /usr/bin/python3, python3-scipy:
 * scipy.optimize.linear_sum_assignment; the versions and the seed are recorded inside it).
 */
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { assignmentCost, MixtureError, solveAssignment } from '../../../lib/mixture';

interface Case {
  name: string;
  rows: number;
  cols: number;
  cost: number[];
  pairs: [number, number][];
  total: number;
  unique: boolean;
}
interface Fixture {
  source: string;
  scipy: string;
  seed: number;
  cases: Case[];
}

const fixture = JSON.parse(fs.readFileSync(path.resolve(__dirname, '../../fixtures/scipy-assignment.json'), 'utf8')) as Fixture;

/** One-to-one: min(n, m) pairs, no row or column twice, the inverse maps agree. */
function expectValidMatching(a: ReturnType<typeof solveAssignment>, n: number, m: number) {
  expect(a.pairs.length).toBe(Math.min(n, m));
  expect(new Set(a.pairs.map(([r]) => r)).size).toBe(a.pairs.length);
  expect(new Set(a.pairs.map(([, c]) => c)).size).toBe(a.pairs.length);
  for (const [r, c] of a.pairs) {
    expect(a.rowToCol[r]).toBe(c);
    expect(a.colToRow[c]).toBe(r);
  }
  expect(a.unmatchedRows.length).toBe(n - a.pairs.length);
  expect(a.unmatchedCols.length).toBe(m - a.pairs.length);
  for (const r of a.unmatchedRows) expect(a.rowToCol[r]).toBe(-1);
  for (const c of a.unmatchedCols) expect(a.colToRow[c]).toBe(-1);
}

describe('solveAssignment, hand-checked', () => {
  it('finds the cheapest of the six matchings of a 3×3 matrix', () => {
    // [7 3 9; 2 8 6; 5 4 1]: the six permutations cost 16, 17, 6, 14, 15, 22 (worked by hand);
    // the cheapest takes row 0 → column 1 (3), row 1 → column 0 (2), row 2 → column 2 (1).
    const a = solveAssignment(Float64Array.from([7, 3, 9, 2, 8, 6, 5, 4, 1]), 3, 3);
    expect(a.pairs).toEqual([[0, 1], [1, 0], [2, 2]]);
    expect(a.cost).toBe(6);
    expect(a.unmatchedRows).toEqual([]);
    expect(a.unmatchedCols).toEqual([]);
  });

  it('leaves the surplus side unmatched (2×3 and 3×2)', () => {
    // rows prefer columns 2 and 0; column 1 is left over (1 + 2 = 3 beats every other pair of columns)
    const wide = solveAssignment(Float64Array.from([5, 4, 1, 2, 6, 7]), 2, 3);
    expect(wide.pairs).toEqual([[0, 2], [1, 0]]);
    expect(wide.cost).toBe(3);
    expect(wide.unmatchedCols).toEqual([1]);
    // the transpose: the same matching seen from the other side
    const tall = solveAssignment(Float64Array.from([5, 2, 4, 6, 1, 7]), 3, 2);
    expect(tall.pairs).toEqual([[0, 1], [2, 0]]);
    expect(tall.cost).toBe(3);
    expect(tall.unmatchedRows).toEqual([1]);
  });

  it('handles empty shapes', () => {
    const a = solveAssignment(new Float64Array(0), 0, 3);
    expect(a.pairs).toEqual([]);
    expect(a.unmatchedCols).toEqual([0, 1, 2]);
  });

  it('refuses a wrong length or a non-finite cost, naming the entry', () => {
    expect(() => solveAssignment(new Float64Array(5), 2, 3)).toThrow(/needs 6 values, got 5/);
    expect(() => solveAssignment(Float64Array.from([0, 1, NaN, 2]), 2, 2)).toThrow(MixtureError);
    expect(() => solveAssignment(Float64Array.from([0, 1, Infinity, 2]), 2, 2)).toThrow(/Cost \[1, 0\]/);
  });
});

describe('solveAssignment vs scipy.optimize.linear_sum_assignment', () => {
  it('the fixture has the spread of cases it claims', () => {
    expect(fixture.source).toBe('scipy.optimize.linear_sum_assignment');
    expect(fixture.cases.length).toBeGreaterThanOrEqual(20);
    expect(fixture.cases.some((c) => c.rows < c.cols)).toBe(true);
    expect(fixture.cases.some((c) => c.rows > c.cols)).toBe(true);
    expect(fixture.cases.some((c) => !c.unique)).toBe(true);
  });

  for (const c of fixture.cases) {
    it(`${c.name}: the same total as SciPy${c.unique ? ' and the same pairs (unique optimum)' : ' (ties: any optimal pairs)'}`, () => {
      const cost = Float64Array.from(c.cost);
      const a = solveAssignment(cost, c.rows, c.cols);
      expectValidMatching(a, c.rows, c.cols);
      // total cost vs SciPy (scipy.optimize.linear_sum_assignment), to 1e-9
      expect(Math.abs(a.cost - c.total)).toBeLessThanOrEqual(1e-9);
      expect(Math.abs(assignmentCost(cost, c.rows, c.cols, a.rowToCol) - c.total)).toBeLessThanOrEqual(1e-9);
      // pairs vs SciPy where the optimum is unique (decided in the generator)
      if (c.unique) expect(a.pairs).toEqual(c.pairs);
    });
  }
});
