/**
 * CSV files for the command-line tools, read with the same parser and the same rules
 * as a studio upload (missing-value words, decimal commas, row/column messages), so a
 * file the studio accepts is accepted here too.
 */
import fs from 'node:fs';
import { decodeCsvBytes, parseCsvText, type ParsedTable } from '@/lib/datasets/parse';
import { featureMatrix } from '@/lib/datasets/matrix';
import { AppError } from '@/lib/errors';

export class CliError extends Error {}

export interface CsvMatrix {
  names: string[];
  rows: Float64Array;
  n: number;
  d: number;
  /** Data rows (0-based, header not counted) kept in `rows`, in order. */
  rowIndex: Int32Array;
  /** Data rows in the file. */
  totalRows: number;
  /** Chosen columns holding cells that are neither numbers nor a missing-value word (their rows are left out). */
  notNumbers: { column: string; count: number; examples: string[] }[];
}

/** A file's bytes, or a one-line CliError naming the file ("no such file" for the common case). */
export function readBytes(file: string): Uint8Array {
  try {
    return fs.readFileSync(file);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new CliError(code === 'ENOENT' ? `cannot read ${file}: no such file` : `cannot read ${file}: ${(e as Error).message}`);
  }
}

/**
 * The chosen columns (default: every numeric column) as a matrix; rows with a blank in
 * a chosen column are left out and reported by `rowIndex`. Parser refusals become
 * CliErrors that name the file.
 */
export function readCsvMatrix(file: string, columns: string[] | undefined, opts: { minCompleteRows?: number } = {}): CsvMatrix {
  let table: ParsedTable | undefined;
  try {
    table = parseCsvText(decodeCsvBytes(readBytes(file)), opts);
    const names = columns?.length ? columns : table.columns.filter((c) => c.kind === 'numeric').map((c) => c.name);
    const m = featureMatrix(table, names);
    const notNumbers = m.features.filter((c) => (c.invalid ?? 0) > 0).map((c) => ({ column: c.name, count: c.invalid ?? 0, examples: c.invalidExamples ?? [] }));
    return { names, rows: m.rows, n: m.n, d: m.d, rowIndex: m.rowIndex, totalRows: table.cells.length, notNumbers };
  } catch (e) {
    if (e instanceof AppError) {
      const known = table ? ` (columns: ${table.columns.map((c) => c.name).join(', ')})` : '';
      throw new CliError(`${file}: ${e.message}${/no column "/.test(e.message) ? known : ''}`);
    }
    throw e;
  }
}

/** Which rows were left out, numbered as a spreadsheet shows them (the header is row 1), like the studio's messages. */
export function describeSkipped(m: CsvMatrix, max = 8): string {
  const kept = new Set(m.rowIndex);
  const skipped: number[] = [];
  for (let r = 0; r < m.totalRows; r++) if (!kept.has(r)) skipped.push(r + 2);
  const shown = skipped.slice(0, max).join(', ');
  const s = skipped.length === 1 ? '' : 's';
  return `${skipped.length} row${s} with a blank or a non-number in a chosen column left out (row${s} ${shown}${skipped.length > max ? ', …' : ''})`;
}

/** One stderr line per chosen column with cells that are not numbers, as the studio's column table shows them. */
export function describeNotNumbers(m: CsvMatrix): string[] {
  return m.notNumbers.map((c) => `column "${c.column}": ${c.count} cell${c.count === 1 ? ' is' : 's are'} not a number (${c.examples.join('; ')}); ${c.count === 1 ? 'its row is' : 'their rows are'} left out`);
}
