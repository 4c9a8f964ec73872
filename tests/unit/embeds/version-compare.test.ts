/**
 * lib/embeds/version-compare.ts on hand-built models whose right answer can be read off:
 * groups far apart, the new version's means a small step from the old ones, worked by hand.
 */
import { describe, expect, it } from 'vitest';
import { compareVersions, type ComparedVersion } from '@/lib/embeds/version-compare';
import type { MixtureModel as EngineModel } from '@/lib/mixture';

const identity = [[1, 0], [0, 1]];

function version(id: number, number: number, means: number[][], weights: number[], labels: string[], opts: { scale?: number[]; features?: string[] } = {}): ComparedVersion {
  const features = (opts.features ?? ['speed', 'distance']).map((name) => ({ name, unit: null, min: -10, max: 30 }));
  const engine = {
    format: 'partwise.mixture-model',
    version: 1,
    features,
    scaler: { center: [0, 0], scale: opts.scale ?? [2, 2] },
    structure: 'spherical',
    weights,
    means,
    covariances: means.map(() => identity),
    training: { rows: 100, logDensityQuantiles: { levels: [0, 1], values: [-50, 0] } },
  } as unknown as EngineModel;
  return {
    id,
    number,
    engine,
    payload: {
      model: {},
      clusters: labels.map((label, i) => ({ label, description: '', color: `#00000${i}` })),
      fields: features.map((f) => ({ feature: f.name, label: f.name === 'speed' ? 'Average speed' : 'Weekly distance', unit: f.name === 'speed' ? 'km/h' : 'km', min: 0, max: 1, help: '' })),
      caution: '',
    },
  };
}

// v1: A (0,0), B (10,0), C (0,10). v2 lists its groups in another order and adds D far away.
const v1 = version(11, 1, [[0, 0], [10, 0], [0, 10]], [1 / 3, 1 / 3, 1 / 3], ['A', 'B', 'C']);
const v2 = version(12, 2, [[10.5, 0], [0, 0.5], [0, 9], [20, 20]], [0.3, 0.3, 0.3, 0.1], ['B2', 'A2', 'C2', 'D'], { scale: [10, 10] });
// rows: at A, B, C; near C (0, 9.4); and (19, 17), whose best group is B under v1 but D under v2
const rows = { values: Float64Array.from([0, 0, 10, 0, 0, 10, 0, 9.4, 19, 17]), n: 5 };

describe('compareVersions', () => {
  it('matches each old group to its nearby new one and leaves the extra group unmatched', () => {
    const c = compareVersions(v1, v2);
    expect(c.pairs.map((p) => [p.from.label, p.to.label])).toEqual([['A', 'A2'], ['B', 'B2'], ['C', 'C2']]);
    expect(c.unmatchedFrom).toEqual([]);
    expect(c.unmatchedTo.map((g) => g.label)).toEqual(['D']);
    // distances in v1's scale (2 per unit): A→A2 0.5/2, B→B2 0.5/2, C→C2 1/2
    expect(c.pairs.map((p) => p.distance)).toEqual([0.25, 0.25, 0.5]);
    expect(c.totalDistance).toBe(1);
    expect(c.standardisedBy).toEqual({ version: 1, basis: 'scaler' });
    const b = c.pairs[1];
    expect(b.weight.from).toBeCloseTo(1 / 3, 12);
    expect(b.weight.shift).toBeCloseTo(0.3 - 1 / 3, 12);
    expect(b.meanShifts).toEqual([
      { feature: 'speed', label: 'Average speed', unit: 'km/h', from: 10, to: 10.5, shift: 0.5 },
      { feature: 'distance', label: 'Weekly distance', unit: 'km', from: 0, to: 0, shift: 0 },
    ]);
    expect(c.rows).toBeNull();
  });

  it('counts rows by best group under each version; changed = not the partner of the old group', () => {
    const c = compareVersions(v1, v2, rows);
    const r = c.rows!;
    expect(r.bestFrom).toEqual([0, 1, 2, 2, 1]);
    expect(r.bestTo).toEqual([1, 0, 2, 2, 3]);
    expect(r.counts).toEqual([
      [0, 1, 0, 0],
      [1, 0, 0, 1],
      [0, 0, 2, 0],
    ]);
    expect(r.counts.flat().reduce((a, b) => a + b, 0)).toBe(5);
    expect(r.changed).toBe(1);
    expect(r.changedShare).toBe(0.2);
  });

  it('uses the older version\'s scaler whichever way round the versions are given', () => {
    const c = compareVersions(v2, v1);
    expect(c.standardisedBy).toEqual({ version: 1, basis: 'scaler' });
    expect(c.pairs.map((p) => [p.from.label, p.to.label, p.distance])).toEqual([['B2', 'B', 0.25], ['A2', 'A', 0.25], ['C2', 'C', 0.5]]);
    expect(c.unmatchedFrom.map((g) => g.label)).toEqual(['D']);
    expect(c.unmatchedTo).toEqual([]);
    // a row best in the unmatched D always counts as changed
    const r = compareVersions(v2, v1, rows).rows!;
    expect(r.changed).toBe(1);
  });

  it('lines features up by name when the new version lists them in another order', () => {
    const swapped = version(13, 2, [[0, 10.5], [0.5, 0], [9, 0], [20, 20]], [0.3, 0.3, 0.3, 0.1], ['B2', 'A2', 'C2', 'D'], { features: ['distance', 'speed'] });
    const c = compareVersions(v1, swapped, rows);
    expect(c.pairs.map((p) => [p.from.label, p.to.label, p.distance])).toEqual([['A', 'A2', 0.25], ['B', 'B2', 0.25], ['C', 'C2', 0.5]]);
    expect(c.pairs[1].meanShifts.map((m) => m.shift)).toEqual([0.5, 0]);
    expect(c.rows!.bestTo).toEqual([1, 0, 2, 2, 3]);
  });

  it('refuses versions that ask for different fields, naming the field', () => {
    const other = version(14, 2, [[0, 0]], [1], ['Only'], { features: ['speed', 'climb'] });
    expect(() => compareVersions(v1, other)).toThrow(/ask for different fields \(speed, distance against speed, climb\)/);
  });
});
