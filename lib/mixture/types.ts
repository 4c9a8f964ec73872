/** Covariance structures. See README.md for what each one means and its parameter count. */
export type Covariance = 'full' | 'diagonal' | 'spherical' | 'tied';

export const COVARIANCES: readonly Covariance[] = ['full', 'diagonal', 'spherical', 'tied'];

/**
 * Mixture parameters in flat form, the way the hot loops want them.
 * `covs` always holds K full d×d matrices (row-major), whatever the structure:
 * tied repeats one matrix, diagonal and spherical have zero off-diagonals.
 */
export interface Gaussians {
  k: number;
  d: number;
  covariance: Covariance;
  weights: Float64Array; // K
  means: Float64Array; // K·d
  covs: Float64Array; // K·d·d
}

/** True when the structure's factors are diagonal (cheaper kernels). */
export function isDiagonalStructure(c: Covariance): boolean {
  return c === 'diagonal' || c === 'spherical';
}
