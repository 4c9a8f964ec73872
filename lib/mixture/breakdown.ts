/**
 * A reason with every answer: the log-odds between the best component a and the
 * runner-up b over the observed fields O,
 *     log(w_a p_a(x_O)) − log(w_b p_b(x_O)),
 * split into a weight term log w_a − log w_b plus one additive part per observed field.
 *
 * Decomposition (chain rule, in the model's feature order restricted to O):
 *     log p_c(x_O) = Σ_{j∈O} log p_c(x_j | x_i, i∈O, i<j),
 * each conditional Gaussian read off the Cholesky factor L of Σ_c,OO: its standard
 * deviation is L_jj and its standardised residual y_j, y = L⁻¹(x_O − μ_c,O). Field j's part
 * is log p_a(x_j | earlier) − log p_b(x_j | earlier) = (log L^b_jj − log L^a_jj) − ½(y^a_j² − y^b_j²).
 * The −½log2π of each conditional and the scaler's Jacobian are the same for both
 * components and cancel, so there is no constant item and the parts are unit-free.
 * For diagonal and spherical covariances the conditionals are the univariate marginals,
 * so the parts are order-free per-field log-density differences. For full and tied they
 * depend on the order (a field correlated with an earlier one adds only what the earlier
 * one did not already say); the order is always the model's feature order.
 *
 * Per observed field also: z = (x_j − μ_a,j)/σ_a,j, the signed distance from the best
 * component's mean in that component's marginal standard deviations, and a band key.
 */
import { MixtureError } from './errors';
import type { ScorableModel } from './score';
import {
  forwardSolve,
  gatherScaled,
  logJointsInto,
  type MaskedScorer,
  prepareMaskedScorer,
  rowMask,
  type SubsetFactors,
  subsetFactors,
} from './subsets';

/** Coarse distance words the UI translates: z < −2, −2 ≤ z < −1, −1 ≤ z ≤ 1, 1 < z ≤ 2, z > 2. */
export type DistanceBand = 'well_below' | 'below' | 'typical' | 'above' | 'well_above';

export const DISTANCE_BANDS: readonly DistanceBand[] = ['well_below', 'below', 'typical', 'above', 'well_above'];

export function distanceBand(z: number): DistanceBand {
  if (z < -2) return 'well_below';
  if (z < -1) return 'below';
  if (z <= 1) return 'typical';
  if (z <= 2) return 'above';
  return 'well_above';
}

export interface FieldReason {
  /** field index in feature order */
  field: number;
  used: boolean;
  /** this field's additive part of the log-odds (nats); null when not used or K = 1 */
  contribution: number | null;
  /** (x − best mean) / best marginal sd; null when not used */
  z: number | null;
  band: DistanceBand | null;
}

export type Decomposition = 'per-field' | 'chain-rule';

export interface RowReason {
  best: number;
  /** second most probable component; null when the model has one component */
  runnerUp: number | null;
  /** log(w_a p_a(x_O)) − log(w_b p_b(x_O)) from the scorer's kernel; null when K = 1 */
  logOdds: number | null;
  /** log w_a − log w_b; null when K = 1 */
  weightTerm: number | null;
  /** 'per-field' (diagonal, spherical: order-free) or 'chain-rule' (full, tied: feature order) */
  decomposition: Decomposition;
  /** one entry per model field, in feature order; weightTerm + Σ contribution = logOdds */
  fields: FieldReason[];
}

export interface ReasonOptions {
  /** explain this pair [a, b] instead of best vs runner-up */
  pair?: [number, number];
}

/**
 * Why a row (blanks as null) goes to its best component rather than the runner-up.
 * Best = the most probable component over the observed fields (scoreRowPartial's best);
 * runner-up = the next by posterior (lowest index on ties).
 */
export function explainRow(model: ScorableModel, values: readonly (number | null | undefined)[], opts: ReasonOptions = {}): RowReason {
  const s = prepareMaskedScorer(model);
  return explainWith(s, subsetFactors(s, rowMask(model, s, values)), values, opts);
}

/** explainRow on an already validated row and its subset (shared with scoreRowPartial). */
export function explainWith(
  s: MaskedScorer,
  f: SubsetFactors,
  values: readonly (number | null | undefined)[],
  opts: ReasonOptions = {},
): RowReason {
  const { k, d } = s;
  const m = f.m;
  gatherScaled(values as ArrayLike<number>, 0, f.idx, m, s.scaled, s.center, s.scale, s.row);
  logJointsInto(s.row, m, k, f.diagonal, f.means, f.factors, f.logConst, s.solveA, s.joint);
  let a = 0;
  for (let c = 1; c < k; c++) if (s.joint[c] > s.joint[a]) a = c;
  let b = -1;
  for (let c = 0; c < k; c++) if (c !== a && (b < 0 || s.joint[c] > s.joint[b])) b = c;
  if (opts.pair) {
    const [pa, pb] = opts.pair;
    if (!Number.isInteger(pa) || !Number.isInteger(pb) || pa < 0 || pb < 0 || pa >= k || pb >= k || pa === pb) {
      throw new MixtureError('BAD_INPUT', `The pair to explain must be two different components between 1 and ${k}.`);
    }
    a = pa;
    b = pb;
  }
  const fields: FieldReason[] = [];
  for (let j = 0; j < d; j++) fields.push({ field: j, used: false, contribution: null, z: null, band: null });
  for (let i = 0; i < m; i++) {
    const j = f.idx[i];
    const z = ((values[j] as number) - s.meansOriginal[a * d + j]) / s.sd[a * d + j];
    fields[j].used = true;
    fields[j].z = z;
    fields[j].band = distanceBand(z);
  }
  const decomposition: Decomposition = f.diagonal ? 'per-field' : 'chain-rule';
  if (b < 0) return { best: a, runnerUp: null, logOdds: null, weightTerm: null, decomposition, fields };
  forwardSolve(s.row, m, a, f.means, f.chol, s.solveA);
  forwardSolve(s.row, m, b, f.means, f.chol, s.solveB);
  for (let i = 0; i < m; i++) {
    const ya = s.solveA[i];
    const yb = s.solveB[i];
    fields[f.idx[i]].contribution = f.logDiag[b * m + i] - f.logDiag[a * m + i] - 0.5 * (ya * ya - yb * yb);
  }
  return {
    best: a,
    runnerUp: b,
    logOdds: s.joint[a] - s.joint[b],
    weightTerm: Math.log(s.weights[a]) - Math.log(s.weights[b]),
    decomposition,
    fields,
  };
}
