import { describe, expect, it } from 'vitest';
import { buildModel, fitMixture, MixtureError, parseModelJson, scoreRow, scoreRows, toModelJson, typicalityOf } from '../../../lib/mixture';
import { synthBlobs } from './helpers';

const n = 2000;
const d = 3;
const { x } = synthBlobs(17, n, d, 3);
const fit = fitMixture(x, n, d, { components: 3, covariance: 'full', seed: 3, restarts: 2 });
const model = buildModel(x, n, d, fit, { features: [{ name: 'length', unit: 'mm' }, { name: 'width', unit: 'mm' }, { name: 'mass', unit: 'g' }] });

function message(input: unknown): string {
  try {
    parseModelJson(input);
  } catch (e) {
    expect(e).toBeInstanceOf(MixtureError);
    expect((e as MixtureError).code).toBe('BAD_MODEL');
    return (e as Error).message;
  }
  return 'accepted';
}
const clone = () => JSON.parse(toModelJson(model));

describe('model JSON', () => {
  it('round-trips through text and scores identically', () => {
    const back = parseModelJson(toModelJson(model));
    expect(back).toEqual(model);
    const row = [x[0], x[1], x[2]];
    expect(scoreRow(back, row)).toEqual(scoreRow(model, row));
  });

  it('records features, ranges, scaler and fit summary', () => {
    expect(model.format).toBe('partwise.mixture-model');
    expect(model.version).toBe(1);
    expect(model.features[2]).toMatchObject({ name: 'mass', unit: 'g' });
    let min = Infinity;
    for (let r = 0; r < n; r++) min = Math.min(min, x[r * d]);
    expect(model.features[0].min).toBe(min);
    expect(model.scaler?.scale).toHaveLength(3);
    expect(model.bic).toBe(fit.bic);
    expect(model.settings.standardized).toBe(true);
    expect(model.covariances[0]).toHaveLength(3);
  });

  it('typicality of training rows is spread evenly over 0..100', () => {
    const t = scoreRows(model, x, n).typicality;
    const below = (p: number) => t.filter((v) => v < p).length / n;
    expect(below(10)).toBeGreaterThan(0.09);
    expect(below(10)).toBeLessThan(0.11);
    expect(below(50)).toBeGreaterThan(0.49);
    expect(below(50)).toBeLessThan(0.51);
  });

  it('flags a point that fits no cluster as unusual', () => {
    const far = scoreRow(model, [100, 100, -100]);
    expect(far.typicality).toBe(0);
    expect(far.unusual).toBe(true);
    const centre = scoreRow(model, model.means[1]);
    expect(centre.typicality).toBeGreaterThan(50);
    expect(centre.unusual).toBe(false);
    expect(centre.best).toBe(1);
  });

  it('one-row and batch scoring agree', () => {
    const b = scoreRows(model, x, 50);
    for (let r = 0; r < 50; r++) {
      const one = scoreRow(model, [x[r * d], x[r * d + 1], x[r * d + 2]]);
      expect(Math.abs(one.logDensity - b.logDensity[r])).toBeLessThan(1e-9);
      expect(Math.abs(one.typicality - b.typicality[r])).toBeLessThan(1e-6);
      expect(one.best).toBe(b.best[r]);
      one.probabilities.forEach((p, c) => expect(Math.abs(p - b.probabilities[r * 3 + c])).toBeLessThan(1e-9));
    }
  });

  it('typicality interpolates the stored quantiles', () => {
    const q = { levels: [0, 0.5, 1], values: [-10, -4, 0] };
    expect(typicalityOf(q, -20)).toBe(0);
    expect(typicalityOf(q, -7)).toBeCloseTo(25, 12);
    expect(typicalityOf(q, -2)).toBeCloseTo(75, 12);
    expect(typicalityOf(q, 5)).toBe(100);
  });

  it('rejects malformed documents with a clear message', () => {
    expect(message('{not json')).toMatch(/^Invalid model JSON: the text is not JSON/);
    const a = clone();
    delete a.weights;
    expect(message(a)).toMatch(/^Invalid model JSON: weights/);
    const b = clone();
    b.version = 2;
    expect(message(b)).toMatch(/^Invalid model JSON: version/);
    const c = clone();
    c.means[1] = [1, 2];
    expect(message(c)).toMatch(/means\.1 must have 3 values/);
    const e = clone();
    e.weights[0] += 0.1;
    expect(message(e)).toMatch(/weights must sum to 1/);
    const f = clone();
    f.covariances[0][0][1] = 'x';
    expect(message(f)).toMatch(/^Invalid model JSON: covariances\.0\.0\.1/);
  });

  it('rejects a covariance that is not positive definite', () => {
    const g = clone();
    const cov = g.covariances[2];
    const big = 10 * Math.sqrt(cov[0][0] * cov[1][1]);
    cov[0][1] = big;
    cov[1][0] = big;
    expect(message(g)).toMatch(/covariances\.2 is not positive definite/);
    const h = clone();
    h.covariances[1][2][0] += 1;
    expect(message(h)).toMatch(/covariances\.1 is not symmetric/);
  });

  it('rejects bad rows at scoring time', () => {
    expect(() => scoreRow(model, [1, 2])).toThrow(/Expected 3 values, got 2/);
    expect(() => scoreRow(model, [1, NaN, 2])).toThrow(/Value 2 is not a finite number/);
  });
});
