import { describe, expect, it } from 'vitest';
import { formatProbability as formatPercent } from '@/lib/format';
import { chooseExample, roundStep } from '@/lib/demo/example-answer';
import { demoRidesCsv } from '@/lib/demo/cycling';
import { buildModel, parseNumericTable, scoreRow, selectMixture } from '@/lib/mixture';
import { isReadyMessage, MESSAGE_SOURCE } from '@/embed/protocol';

const FEATURES = ['avg_speed_kmh', 'weekly_distance_km', 'climb_per_ride_m'];
const FIELDS = [
  { feature: 'avg_speed_kmh', label: 'Average speed', unit: 'km/h', min: 10, max: 45 },
  { feature: 'weekly_distance_km', label: 'Weekly distance', unit: 'km', min: 0, max: 450 },
  { feature: 'climb_per_ride_m', label: 'Climbing per ride', unit: 'm', min: 0, max: 2000 },
];
const CLUSTERS = ['A', 'B', 'C', 'D'].map((label, i) => ({ label, color: `#00000${i}` }));

function fitted(k: number) {
  const table = parseNumericTable(demoRidesCsv(7), FEATURES);
  const selection = selectMixture(table.rows, table.n, table.d, { components: [k], covariances: ['full'], seed: 5 });
  return buildModel(table.rows, table.n, table.d, selection.best, { features: FEATURES.map((name) => ({ name })) });
}

describe('percentages on the calculator', () => {
  it('uses Intl percent style, whole numbers, and never claims 0% or 100%', () => {
    expect(formatPercent(0.8412)).toBe('84%');
    expect(formatPercent(0.845)).toBe('85%');
    expect(formatPercent(0.07)).toBe('7%');
    expect(formatPercent(0.995)).toBe('over 99%');
    expect(formatPercent(1)).toBe('over 99%');
    expect(formatPercent(0.0049)).toBe('under 1%');
    expect(formatPercent(0.005)).toBe('1%');
  });
});

describe("the landing page's example answer", () => {
  it('picks round, ordinary values with a mixed answer, and reports exactly what scoreRow answers for them', () => {
    const engine = fitted(4);
    const example = chooseExample(engine, FIELDS, CLUSTERS, 1);
    const values = example.values.map((v) => v.value);
    example.values.forEach((v, j) => {
      const step = roundStep(FIELDS[j].min, FIELDS[j].max);
      expect(v.value).toBeGreaterThanOrEqual(FIELDS[j].min);
      expect(v.value).toBeLessThanOrEqual(FIELDS[j].max);
      expect(Math.abs(v.value / step - Math.round(v.value / step))).toBeLessThan(1e-9);
    });
    const score = scoreRow(engine, values, { unusualBelow: 1 });
    expect(example.probabilities.map((p) => p.probability)).toEqual(score.probabilities);
    expect(example.best).toEqual({ label: CLUSTERS[score.best].label, probability: score.probabilities[score.best] });
    const sorted = [...score.probabilities].sort((a, b) => b - a);
    expect(score.unusual).toBe(false);
    expect(sorted[0]).toBeLessThan(0.9);
    expect(sorted[1]).toBeGreaterThan(0.1);
    // Deterministic: the same model gives the same example.
    expect(chooseExample(engine, FIELDS, CLUSTERS, 1)).toEqual(example);
  });

  it('rounds to 1, 2 or 5 times a power of ten, about a twentieth of the range', () => {
    expect(roundStep(10, 45)).toBe(1);
    expect(roundStep(0, 450)).toBe(20);
    expect(roundStep(0, 2000)).toBe(100);
    expect(roundStep(0, 1)).toBe(0.05);
    expect(roundStep(3, 3)).toBe(1);
  });
});

describe('the ready message', () => {
  it('has exactly the expected shape', () => {
    const token = 'a'.repeat(24);
    expect(isReadyMessage({ source: MESSAGE_SOURCE, type: 'ready', token })).toBe(true);
    expect(isReadyMessage({ source: MESSAGE_SOURCE, type: 'ready', token, extra: 1 })).toBe(false);
    expect(isReadyMessage({ source: MESSAGE_SOURCE, type: 'ready', token: 'short' })).toBe(false);
    expect(isReadyMessage({ source: 'other', type: 'ready', token })).toBe(false);
  });
});
