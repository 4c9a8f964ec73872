/**
 * z-score standardisation: z_j = (x_j − center_j) / scale_j with the column mean and the
 * population (÷N) standard deviation. EM runs on z; results are mapped back with
 *   μ = center + scale ⊙ μ_z,   Σ = D Σ_z D (D = diag(scale)),
 *   log p(x) = log p_z(z) − Σ_j log scale_j.
 */
import { MixtureError } from './errors';

export interface ScalerParams {
  center: number[];
  scale: number[];
}

/** Relative spread below which a column counts as constant. */
const CONSTANT_RELATIVE = 1e-12;

export function fitScaler(x: Float64Array, n: number, d: number, columnNames?: string[]): ScalerParams {
  const center: number[] = [];
  const scale: number[] = [];
  for (let j = 0; j < d; j++) {
    let s = 0;
    for (let r = 0; r < n; r++) s += x[r * d + j];
    const mean = s / n;
    let v = 0;
    for (let r = 0; r < n; r++) {
      const t = x[r * d + j] - mean;
      v += t * t;
    }
    const sd = Math.sqrt(v / n);
    if (!(sd > CONSTANT_RELATIVE * Math.max(1, Math.abs(mean)))) {
      const name = columnNames?.[j] ?? `${j + 1}`;
      throw new MixtureError(
        'CONSTANT_COLUMN',
        `Column ${name} is constant (every row is ${mean}); drop it, it cannot separate clusters.`,
      );
    }
    center.push(mean);
    scale.push(sd);
  }
  return { center, scale };
}

export function applyScaler(x: Float64Array, n: number, d: number, s: ScalerParams, out: Float64Array): Float64Array {
  for (let r = 0; r < n; r++) {
    for (let j = 0; j < d; j++) out[r * d + j] = (x[r * d + j] - s.center[j]) / s.scale[j];
  }
  return out;
}

/** Σ_j log scale_j — subtract from a z-space log density to get the original-units one. */
export function logJacobian(s: ScalerParams | null): number {
  if (s === null) return 0;
  let t = 0;
  for (const v of s.scale) t += Math.log(v);
  return t;
}

export function meanToOriginal(m: number[], s: ScalerParams | null): number[] {
  return s === null ? m.slice() : m.map((v, j) => s.center[j] + s.scale[j] * v);
}

export function meanToScaled(m: number[], s: ScalerParams | null): number[] {
  return s === null ? m.slice() : m.map((v, j) => (v - s.center[j]) / s.scale[j]);
}

export function covToOriginal(c: number[][], s: ScalerParams | null): number[][] {
  return s === null ? c.map((r) => r.slice()) : c.map((r, i) => r.map((v, j) => v * s.scale[i] * s.scale[j]));
}

export function covToScaled(c: number[][], s: ScalerParams | null): number[][] {
  return s === null ? c.map((r) => r.slice()) : c.map((r, i) => r.map((v, j) => v / (s.scale[i] * s.scale[j])));
}
