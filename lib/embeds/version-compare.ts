/**
 * Compare two published versions of a calculator (pure: no I/O).
 *
 * Clusters of the two versions are matched one to one by the minimum-cost assignment
 * (lib/mixture solveAssignment) whose cost is the Euclidean distance between the
 * clusters' means after standardising both with ONE scaler: the OLDER version's (the
 * lower version number), so every distance is measured in the same yardstick whichever
 * way round the two are given. A version fitted without standardisation has no scaler;
 * then the newer one's is used, and failing that each feature's training range.
 * When the versions have different numbers of clusters, the surplus groups are unmatched.
 *
 * Given rows (original units, in the `from` version's feature order), each row's best
 * group is found under both versions (lib/mixture scoreRows), counted in a cross table
 * counts[from][to], and a row counts as changed when its best group under `to` is not the
 * matched partner of its best group under `from` (a row whose old group has no partner
 * is always changed).
 */
import { type MixtureModel as EngineModel, scoreRows, solveAssignment } from '@/lib/mixture';
import { AppError } from '@/lib/errors';
import type { VersionPayload } from './payload';

/** One side of the comparison: a stored version already read and checked by the caller. */
export interface ComparedVersion {
  id: number;
  number: number;
  payload: VersionPayload;
  engine: EngineModel;
}

export interface GroupRef {
  index: number;
  label: string;
  color: string;
  weight: number;
}

export interface MeanShift {
  feature: string;
  label: string;
  unit: string;
  from: number;
  to: number;
  /** to − from, in the field's original unit. */
  shift: number;
}

export interface MatchedPair {
  from: GroupRef;
  to: GroupRef;
  weight: { from: number; to: number; shift: number };
  meanShifts: MeanShift[];
  /** Euclidean distance between the standardised means (see the module comment). */
  distance: number;
}

export interface RowComparison {
  count: number;
  /** Each row's best group index under `from` and under `to`, in row order. */
  bestFrom: number[];
  bestTo: number[];
  /** counts[i][j]: rows whose best group is i under `from` and j under `to`. */
  counts: number[][];
  /** Rows whose best group under `to` is not the matched partner of their best group under `from`. */
  changed: number;
  changedShare: number;
}

export interface VersionComparison {
  from: { id: number; number: number; groups: GroupRef[] };
  to: { id: number; number: number; groups: GroupRef[] };
  fields: { feature: string; label: string; unit: string }[];
  /** Whose scale the distances are in: the older version's scaler, else the newer's, else the feature ranges. */
  standardisedBy: { version: number; basis: 'scaler' | 'range' };
  pairs: MatchedPair[];
  unmatchedFrom: GroupRef[];
  unmatchedTo: GroupRef[];
  /** Sum of the matched pairs' distances (the minimum over all one-to-one matchings). */
  totalDistance: number;
  rows: RowComparison | null;
}

function groupsOf(v: ComparedVersion): GroupRef[] {
  return v.engine.weights.map((weight, index) => ({
    index,
    label: v.payload.clusters[index]?.label ?? `Group ${index + 1}`,
    color: v.payload.clusters[index]?.color ?? '#6b7280',
    weight,
  }));
}

/** Column j of `to` that holds `from`'s feature j; the versions must ask for the same features. */
function featureOrder(from: ComparedVersion, to: ComparedVersion): number[] {
  const fromNames = from.engine.features.map((f) => f.name);
  const toNames = to.engine.features.map((f) => f.name);
  const order = fromNames.map((name) => toNames.indexOf(name));
  if (fromNames.length !== toNames.length || order.some((j) => j < 0)) {
    const message = `Versions ${from.number} and ${to.number} ask for different fields (${fromNames.join(', ')} against ${toNames.join(', ')}), so their groups cannot be matched.`;
    throw new AppError('invalid_input', message, { issues: [{ field: 'to', message }] });
  }
  return order;
}

/** centre and scale per feature (in `from`'s order) of the yardstick the distances use. */
function yardstick(from: ComparedVersion, to: ComparedVersion, order: number[]): { center: number[]; scale: number[]; by: VersionComparison['standardisedBy'] } {
  const older = from.number <= to.number ? from : to;
  const newer = older === from ? to : from;
  // Columns of `v` in from's feature order.
  const cols = (v: ComparedVersion) => (v === from ? order.map((_, j) => j) : order);
  for (const v of [older, newer]) {
    const s = v.engine.scaler;
    if (s) return { center: cols(v).map((j) => s.center[j]), scale: cols(v).map((j) => s.scale[j]), by: { version: v.number, basis: 'scaler' } };
  }
  const f = cols(older).map((j) => older.engine.features[j]);
  return { center: f.map((x) => x.min), scale: f.map((x) => (x.max > x.min ? x.max - x.min : 1)), by: { version: older.number, basis: 'range' } };
}

/**
 * The comparison of `from` with `to`; `rows` (n·d, original units, `from`'s feature order)
 * adds the per-row part.
 */
export function compareVersions(from: ComparedVersion, to: ComparedVersion, rows: { values: Float64Array; n: number } | null = null): VersionComparison {
  const order = featureOrder(from, to);
  const d = order.length;
  const kFrom = from.engine.weights.length;
  const kTo = to.engine.weights.length;
  const { center, scale, by } = yardstick(from, to, order);

  const zFrom = standardisedMeans(from.engine.means, order.map((_, j) => j), center, scale);
  const zTo = standardisedMeans(to.engine.means, order, center, scale);
  const cost = distanceMatrix(zFrom, kFrom, zTo, kTo, d);
  const assignment = solveAssignment(cost, kFrom, kTo);

  const fromGroups = groupsOf(from);
  const toGroups = groupsOf(to);
  const fields = from.engine.features.map((f, j) => ({ feature: f.name, label: from.payload.fields[j]?.label ?? f.name, unit: from.payload.fields[j]?.unit ?? f.unit ?? '' }));
  const pairs: MatchedPair[] = assignment.pairs.map(([i, j]) => ({
    from: fromGroups[i],
    to: toGroups[j],
    weight: { from: fromGroups[i].weight, to: toGroups[j].weight, shift: toGroups[j].weight - fromGroups[i].weight },
    meanShifts: fields.map((f, c) => {
      const a = from.engine.means[i][c];
      const b = to.engine.means[j][order[c]];
      return { ...f, from: a, to: b, shift: b - a };
    }),
    distance: cost[i * kTo + j],
  }));

  return {
    from: { id: from.id, number: from.number, groups: fromGroups },
    to: { id: to.id, number: to.number, groups: toGroups },
    fields,
    standardisedBy: by,
    pairs,
    unmatchedFrom: assignment.unmatchedRows.map((i) => fromGroups[i]),
    unmatchedTo: assignment.unmatchedCols.map((j) => toGroups[j]),
    totalDistance: assignment.cost,
    rows: rows ? compareRows(from.engine, to.engine, order, rows, assignment.rowToCol) : null,
  };
}

/** K·d standardised means; `cols[j]` is the model's column for feature j. */
function standardisedMeans(means: number[][], cols: number[], center: number[], scale: number[]): Float64Array {
  const d = cols.length;
  const out = new Float64Array(means.length * d);
  for (let k = 0; k < means.length; k++) for (let j = 0; j < d; j++) out[k * d + j] = (means[k][cols[j]] - center[j]) / scale[j];
  return out;
}

function distanceMatrix(a: Float64Array, ka: number, b: Float64Array, kb: number, d: number): Float64Array {
  const out = new Float64Array(ka * kb);
  for (let i = 0; i < ka; i++) {
    for (let j = 0; j < kb; j++) {
      let s = 0;
      for (let c = 0; c < d; c++) {
        const t = a[i * d + c] - b[j * d + c];
        s += t * t;
      }
      out[i * kb + j] = Math.sqrt(s);
    }
  }
  return out;
}

function reorderColumns(values: Float64Array, n: number, order: number[]): Float64Array {
  const d = order.length;
  const out = new Float64Array(n * d);
  // from's column j goes to to's column order[j]
  for (let r = 0; r < n; r++) for (let j = 0; j < d; j++) out[r * d + order[j]] = values[r * d + j];
  return out;
}

function compareRows(from: EngineModel, to: EngineModel, order: number[], rows: { values: Float64Array; n: number }, partner: Int32Array): RowComparison {
  const { values, n } = rows;
  const d = order.length;
  if (values.length !== n * d) throw new AppError('invalid_input', `Expected ${n}×${d} values to compare, got ${values.length}.`);
  const inOrder = order.every((j, i) => j === i);
  const bestFrom = n ? scoreRows(from, values, n).best : new Int32Array(0);
  const bestTo = n ? scoreRows(to, inOrder ? values : reorderColumns(values, n, order), n).best : new Int32Array(0);
  const kFrom = from.weights.length;
  const kTo = to.weights.length;
  const counts = Array.from({ length: kFrom }, () => new Array<number>(kTo).fill(0));
  let changed = 0;
  for (let r = 0; r < n; r++) {
    counts[bestFrom[r]][bestTo[r]]++;
    if (partner[bestFrom[r]] !== bestTo[r]) changed++;
  }
  return { count: n, bestFrom: Array.from(bestFrom), bestTo: Array.from(bestTo), counts, changed, changedShare: n ? changed / n : 0 };
}
