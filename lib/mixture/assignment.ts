/**
 * Minimum-cost one-to-one assignment (the Hungarian method, in its shortest augmenting
 * path form with row and column potentials) for a rectangular n×m cost matrix.
 *
 * Each of the min(n, m) smaller-side items is matched to exactly one item on the other
 * side, no item twice, so that the sum of the chosen costs is as small as possible; when
 * n ≠ m the surplus rows (or columns) stay unmatched. Ties are broken by the search order,
 * so with several optimal matchings any one of them may come back (the total is unique).
 *
 * Cost: O(k²·l) time for k = min(n, m), l = max(n, m); O(n·m) extra memory only when
 * n > m (the matrix is transposed so the smaller side is always the one augmented).
 */
import { MixtureError } from './errors';

export interface Assignment {
  /** Shape of the cost matrix. */
  rows: number;
  cols: number;
  /** For each row its column, or −1 when the row is unmatched (n > m). */
  rowToCol: Int32Array;
  /** For each column its row, or −1 when the column is unmatched (m > n). */
  colToRow: Int32Array;
  /** The matched [row, column] pairs, in row order. */
  pairs: [number, number][];
  /** Sum of cost[row, column] over the pairs, added up from the matrix itself. */
  cost: number;
  unmatchedRows: number[];
  unmatchedCols: number[];
}

/**
 * Solve the assignment for `cost` (n·m values, row-major). Every cost must be a finite
 * number; negative costs are fine (only differences matter).
 */
export function solveAssignment(cost: Float64Array, n: number, m: number): Assignment {
  if (!Number.isInteger(n) || !Number.isInteger(m) || n < 0 || m < 0) {
    throw new MixtureError('BAD_INPUT', `The cost matrix shape must be two whole numbers, got ${n}×${m}.`);
  }
  if (cost.length !== n * m) throw new MixtureError('BAD_INPUT', `A ${n}×${m} cost matrix needs ${n * m} values, got ${cost.length}.`);
  for (let i = 0; i < cost.length; i++) {
    if (!Number.isFinite(cost[i])) {
      throw new MixtureError('BAD_INPUT', `Cost [${Math.floor(i / Math.max(m, 1))}, ${i % Math.max(m, 1)}] is not a finite number.`);
    }
  }
  const rowToCol = new Int32Array(n).fill(-1);
  const colToRow = new Int32Array(m).fill(-1);
  if (n > 0 && m > 0) {
    if (n <= m) {
      const match = new Int32Array(n);
      augmentAll(cost, n, m, match);
      for (let i = 0; i < n; i++) {
        rowToCol[i] = match[i];
        colToRow[match[i]] = i;
      }
    } else {
      const t = transpose(cost, n, m);
      const match = new Int32Array(m);
      augmentAll(t, m, n, match);
      for (let j = 0; j < m; j++) {
        colToRow[j] = match[j];
        rowToCol[match[j]] = j;
      }
    }
  }
  const pairs: [number, number][] = [];
  const unmatchedRows: number[] = [];
  let total = 0;
  for (let i = 0; i < n; i++) {
    const j = rowToCol[i];
    if (j < 0) unmatchedRows.push(i);
    else {
      pairs.push([i, j]);
      total += cost[i * m + j];
    }
  }
  const unmatchedCols: number[] = [];
  for (let j = 0; j < m; j++) if (colToRow[j] < 0) unmatchedCols.push(j);
  return { rows: n, cols: m, rowToCol, colToRow, pairs, cost: total, unmatchedRows, unmatchedCols };
}

/** Total cost of a given row→column matching (−1 = unmatched), read from the matrix. */
export function assignmentCost(cost: Float64Array, n: number, m: number, rowToCol: Int32Array): number {
  if (cost.length !== n * m || rowToCol.length !== n) throw new MixtureError('BAD_INPUT', `Expected a ${n}×${m} matrix and ${n} row assignments.`);
  let total = 0;
  for (let i = 0; i < n; i++) {
    const j = rowToCol[i];
    if (j >= 0) total += cost[i * m + j];
  }
  return total;
}

function transpose(a: Float64Array, n: number, m: number): Float64Array {
  const t = new Float64Array(n * m);
  for (let i = 0; i < n; i++) for (let j = 0; j < m; j++) t[j * n + i] = a[i * m + j];
  return t;
}

/**
 * The core for n ≤ m: rows are added one at a time; each addition grows a shortest
 * path (reduced costs a[i][j] − u[i] − v[j] ≥ 0) from the new row to a free column,
 * updating the potentials so matched edges keep a reduced cost of zero, then flips the
 * path. Indices are 1-based inside (0 is the virtual start column). Writes match[row] = col.
 */
function augmentAll(a: Float64Array, n: number, m: number, match: Int32Array): void {
  const u = new Float64Array(n + 1);
  const v = new Float64Array(m + 1);
  const owner = new Int32Array(m + 1); // owner[j] = row (1-based) matched to column j, 0 = free
  const way = new Int32Array(m + 1);
  const minv = new Float64Array(m + 1);
  const used = new Uint8Array(m + 1);
  for (let i = 1; i <= n; i++) {
    owner[0] = i;
    let j0 = 0;
    minv.fill(Infinity);
    used.fill(0);
    do {
      used[j0] = 1;
      const i0 = owner[j0];
      const base = (i0 - 1) * m;
      let delta = Infinity;
      let j1 = -1;
      for (let j = 1; j <= m; j++) {
        if (used[j]) continue;
        const cur = a[base + j - 1] - u[i0] - v[j];
        if (cur < minv[j]) {
          minv[j] = cur;
          way[j] = j0;
        }
        if (minv[j] < delta) {
          delta = minv[j];
          j1 = j;
        }
      }
      for (let j = 0; j <= m; j++) {
        if (used[j]) {
          u[owner[j]] += delta;
          v[j] -= delta;
        } else minv[j] -= delta;
      }
      j0 = j1;
    } while (owner[j0] !== 0);
    do {
      const j1 = way[j0];
      owner[j0] = owner[j1];
      j0 = j1;
    } while (j0 !== 0);
  }
  for (let j = 1; j <= m; j++) if (owner[j] !== 0) match[owner[j] - 1] = j - 1;
}
