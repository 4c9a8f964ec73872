/**
 * k-means++ seeding (Arthur & Vassilvitskii 2007) followed by Lloyd iterations,
 * used only to start EM. Deterministic given the SeededRandom.
 */
import type { SeededRandom } from './prng';

/**
 * Pick k centres by D² sampling, then refine with Lloyd iterations until the labels
 * stop changing or `maxIter` is reached. Returns centres (k·d) and labels (n).
 * An empty cluster is re-seeded at the row farthest from its centre.
 */
export function kmeansPlusPlus(
  x: Float64Array,
  n: number,
  d: number,
  k: number,
  rng: SeededRandom,
  maxIter = 50,
): { centers: Float64Array; labels: Int32Array } {
  const centers = new Float64Array(k * d);
  const dist = new Float64Array(n);
  const first = rng.int(n);
  for (let j = 0; j < d; j++) centers[j] = x[first * d + j];
  for (let r = 0; r < n; r++) dist[r] = sqDist(x, r * d, centers, 0, d);
  for (let c = 1; c < k; c++) {
    let total = 0;
    for (let r = 0; r < n; r++) total += dist[r];
    let pick = n - 1;
    if (total > 0) {
      let u = rng.next() * total;
      for (let r = 0; r < n; r++) {
        u -= dist[r];
        if (u < 0) {
          pick = r;
          break;
        }
      }
    } else {
      pick = rng.int(n);
    }
    for (let j = 0; j < d; j++) centers[c * d + j] = x[pick * d + j];
    for (let r = 0; r < n; r++) {
      const v = sqDist(x, r * d, centers, c * d, d);
      if (v < dist[r]) dist[r] = v;
    }
  }
  const labels = new Int32Array(n).fill(-1);
  const sums = new Float64Array(k * d);
  const counts = new Float64Array(k);
  for (let it = 0; it < maxIter; it++) {
    let changed = 0;
    for (let r = 0; r < n; r++) {
      let best = 0;
      let bestD = Infinity;
      for (let c = 0; c < k; c++) {
        const v = sqDist(x, r * d, centers, c * d, d);
        if (v < bestD) {
          bestD = v;
          best = c;
        }
      }
      dist[r] = bestD;
      if (labels[r] !== best) {
        labels[r] = best;
        changed++;
      }
    }
    if (changed === 0) break;
    sums.fill(0);
    counts.fill(0);
    for (let r = 0; r < n; r++) {
      const c = labels[r];
      counts[c]++;
      for (let j = 0; j < d; j++) sums[c * d + j] += x[r * d + j];
    }
    for (let c = 0; c < k; c++) {
      if (counts[c] > 0) {
        for (let j = 0; j < d; j++) centers[c * d + j] = sums[c * d + j] / counts[c];
      } else {
        let far = 0;
        for (let r = 1; r < n; r++) if (dist[r] > dist[far]) far = r;
        for (let j = 0; j < d; j++) centers[c * d + j] = x[far * d + j];
        dist[far] = 0;
      }
    }
  }
  return { centers, labels };
}

function sqDist(a: Float64Array, ao: number, b: Float64Array, bo: number, d: number): number {
  let s = 0;
  for (let j = 0; j < d; j++) {
    const t = a[ao + j] - b[bo + j];
    s += t * t;
  }
  return s;
}
