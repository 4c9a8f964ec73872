/**
 * Population stability index: how far the visitors' distribution of a field (actual)
 * has moved from the training data's (expected), on the same bins.
 *
 *   PSI = Σ_i (a_i − e_i) · ln(a_i / e_i),  a_i, e_i the shares of bin i
 *
 * The bands are common practice in model monitoring, with no published source behind
 * them: below 0.1 stable, 0.1 to 0.25 watch, above 0.25 act.
 *
 * An empty bin on either side would make the logarithm infinite, so every share is
 * floored at EMPTY_BIN_SHARE before the sum (also common practice; the floor is ours).
 */
export const EMPTY_BIN_SHARE = 1e-4;

export const DRIFT_WATCH_FROM = 0.1;
export const DRIFT_ACT_FROM = 0.25;

export type DriftBand = 'stable' | 'watch' | 'act';

/** PSI of two count vectors over the same bins; null when either side counted nothing. */
export function populationStability(expected: ArrayLike<number>, actual: ArrayLike<number>): number | null {
  if (expected.length !== actual.length) throw new RangeError(`PSI needs the same bins on both sides (${expected.length} and ${actual.length}).`);
  const expectedTotal = total(expected);
  const actualTotal = total(actual);
  if (expectedTotal <= 0 || actualTotal <= 0) return null;
  let psi = 0;
  for (let i = 0; i < expected.length; i++) {
    const e = Math.max(expected[i] / expectedTotal, EMPTY_BIN_SHARE);
    const a = Math.max(actual[i] / actualTotal, EMPTY_BIN_SHARE);
    psi += (a - e) * Math.log(a / e);
  }
  return psi;
}

function total(counts: ArrayLike<number>): number {
  let sum = 0;
  for (let i = 0; i < counts.length; i++) {
    const c = counts[i];
    if (!(c >= 0) || !Number.isFinite(c)) throw new RangeError(`Bin ${i} holds ${c}; counts must be finite and not negative.`);
    sum += c;
  }
  return sum;
}

export function driftBand(psi: number): DriftBand {
  if (psi < DRIFT_WATCH_FROM) return 'stable';
  return psi <= DRIFT_ACT_FROM ? 'watch' : 'act';
}
