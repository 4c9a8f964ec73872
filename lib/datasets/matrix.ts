/**
 * A parsed table's chosen numeric columns as the n·d matrix a fit or a score reads
 * (pure: no I/O, so the command-line tools share it with the studio).
 */
import { AppError } from '@/lib/errors';
import type { DatasetColumn } from '@/models/Dataset';

/** The parts of a parsed table (an upload, a stored dataset or a CSV read by the CLI) a matrix needs. */
export interface TableCells {
  columns: Pick<DatasetColumn, 'name' | 'kind'>[];
  cells: (number | string | null)[][];
}

export interface FeatureMatrix<C extends TableCells['columns'][number] = DatasetColumn> {
  features: C[];
  rows: Float64Array;
  n: number;
  d: number;
  /** Rows left out because a chosen column had no number. */
  dropped: number;
  /** For each kept row, its index in the dataset (for joining scores back). */
  rowIndex: Int32Array;
}

/** The chosen numeric columns as an n·d matrix, dropping rows with any missing value. */
export function featureMatrix<T extends TableCells>(dataset: T, featureNames: string[]): FeatureMatrix<T['columns'][number]> {
  if (featureNames.length === 0) throw new AppError('invalid_input', 'Choose at least one feature.', { issues: [{ field: 'features', message: 'choose at least one' }] });
  const idx = featureNames.map((name, i) => {
    const j = dataset.columns.findIndex((c) => c.name === name);
    if (j < 0) throw new AppError('invalid_input', `There is no column "${name}" in this dataset.`, { issues: [{ field: `features.${i}`, message: 'unknown column' }] });
    if (dataset.columns[j].kind !== 'numeric') throw new AppError('invalid_input', `Column "${name}" holds text, not numbers.`, { issues: [{ field: `features.${i}`, message: 'not numeric' }] });
    return j;
  });
  const d = idx.length;
  const kept: number[] = [];
  dataset.cells.forEach((row, r) => {
    if (idx.every((j) => typeof row[j] === 'number' && Number.isFinite(row[j] as number))) kept.push(r);
  });
  const rows = new Float64Array(kept.length * d);
  kept.forEach((r, i) => {
    for (let k = 0; k < d; k++) rows[i * d + k] = dataset.cells[r][idx[k]] as number;
  });
  return { features: idx.map((j) => dataset.columns[j]), rows, n: kept.length, d, dropped: dataset.cells.length - kept.length, rowIndex: Int32Array.from(kept) };
}
