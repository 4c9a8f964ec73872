/**
 * What the review screens show for one fitted model on its dataset: soft cluster sizes,
 * average certainty, per-cluster means and standard deviations in original units, a
 * sample of points coloured by their most likely cluster, and each component's 1- and
 * 2-sigma ellipses for the two features on the axes. Pure given the model and the rows.
 */
import { parseModelJson, scoreRows, type MixtureModel as EngineModel } from '@/lib/mixture';
import { featureMatrix } from '@/lib/datasets';
import type { Dataset } from '@/models';
import { ellipsePath } from './ellipse';

export const SCATTER_SAMPLE = 1500;

export interface ClusterSummary {
  index: number;
  weight: number;
  /** Sum of membership probabilities over the rows (a soft count). */
  softCount: number;
  /** Rows whose most likely cluster this is. */
  hardCount: number;
  /** Mean of the rows' probability of this cluster, among rows assigned to it. */
  certainty: number | null;
  means: number[];
  sds: number[];
}

export interface Review {
  features: string[];
  rows: number;
  dropped: number;
  clusters: ClusterSummary[];
  /** Mean over rows of the largest membership probability (1 = every row is clear-cut). */
  meanMaxProbability: number;
  /** Mean entropy of the memberships divided by ln K (0 = clear-cut, 1 = no idea); null for K = 1. */
  normalizedEntropy: number | null;
  axes: { x: number; y: number };
  points: { x: number; y: number; cluster: number; p: number }[];
  ellipses: { cluster: number; sigma: 1 | 2; path: [number, number][] }[];
}

export function reviewModel(modelJson: unknown, dataset: Pick<Dataset, 'columns' | 'cells'>, axes: { x?: number; y?: number } = {}): Review {
  const model: EngineModel = parseModelJson(modelJson);
  const names = model.features.map((f) => f.name);
  const m = featureMatrix(dataset, names);
  const k = model.weights.length;
  const d = m.d;
  const scores = scoreRows(model, m.rows, m.n);
  const soft = new Float64Array(k);
  const hard = new Float64Array(k);
  const certaintySum = new Float64Array(k);
  let maxSum = 0;
  let entropySum = 0;
  for (let r = 0; r < m.n; r++) {
    let best = 0;
    let h = 0;
    for (let j = 0; j < k; j++) {
      const p = scores.probabilities[r * k + j];
      soft[j] += p;
      if (p > scores.probabilities[r * k + best]) best = j;
      if (p > 0) h -= p * Math.log(p);
    }
    const pb = scores.probabilities[r * k + best];
    hard[best]++;
    certaintySum[best] += pb;
    maxSum += pb;
    entropySum += h;
  }
  const clusters: ClusterSummary[] = Array.from({ length: k }, (_, j) => ({
    index: j,
    weight: model.weights[j],
    softCount: soft[j],
    hardCount: hard[j],
    certainty: hard[j] ? certaintySum[j] / hard[j] : null,
    means: model.means[j].slice(),
    sds: model.covariances[j].map((row, i) => Math.sqrt(row[i])),
  }));
  const x = clampAxis(axes.x ?? 0, d);
  const y = clampAxis(axes.y ?? (d > 1 ? 1 : 0), d);
  // An evenly strided sample keeps the picture faithful and the page light.
  const stride = Math.max(1, m.n / SCATTER_SAMPLE);
  const points: Review['points'] = [];
  for (let t = 0; Math.floor(t) < m.n; t += stride) {
    const r = Math.floor(t);
    const c = scores.best[r];
    points.push({ x: m.rows[r * d + x], y: m.rows[r * d + y], cluster: c, p: scores.probabilities[r * k + c] });
  }
  const ellipses: Review['ellipses'] = [];
  for (let j = 0; j < k; j++) {
    const cov = model.covariances[j];
    for (const sigma of [1, 2] as const) {
      ellipses.push({ cluster: j, sigma, path: ellipsePath([model.means[j][x], model.means[j][y]], [[cov[x][x], cov[x][y]], [cov[y][x], cov[y][y]]], sigma) });
    }
  }
  return {
    features: names,
    rows: m.n,
    dropped: m.dropped,
    clusters,
    meanMaxProbability: m.n ? maxSum / m.n : 0,
    normalizedEntropy: k > 1 && m.n ? entropySum / m.n / Math.log(k) : null,
    axes: { x, y },
    points,
    ellipses,
  };
}

function clampAxis(v: number, d: number): number {
  return Number.isInteger(v) && v >= 0 && v < d ? v : 0;
}
