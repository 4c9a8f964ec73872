/**
 * CSV text → numeric table (pure: takes the text, does no I/O). The first row is the
 * header. Errors name the line (1 = header) and the column.
 */
import Papa from 'papaparse';
import { MixtureError } from './errors';

export interface NumericTable {
  names: string[];
  rows: Float64Array; // n·d row-major
  n: number;
  d: number;
}

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

export function parseNumber(cell: string): number | null {
  const t = cell.trim();
  return NUMBER.test(t) ? Number(t) : null;
}

/**
 * Parse CSV text. `columns` picks columns by header name; by default every column in
 * which most cells are numbers is used (so a text label column is skipped, but a stray
 * text cell inside a numeric column is reported).
 */
export function parseNumericTable(text: string, columns?: string[]): NumericTable {
  const parsed = Papa.parse<string[]>(text, { header: false, skipEmptyLines: 'greedy' });
  const fatal = parsed.errors.find((e) => e.type === 'Quotes' || e.type === 'Delimiter');
  if (fatal) throw new MixtureError('BAD_INPUT', `CSV line ${(fatal.row ?? 0) + 1}: ${fatal.message}.`);
  const data = parsed.data;
  if (data.length === 0) throw new MixtureError('BAD_INPUT', 'The CSV is empty; it needs a header row and data rows.');
  const header = data[0].map((h) => h.trim());
  const body = data.slice(1);
  if (body.length === 0) throw new MixtureError('BAD_INPUT', 'The CSV has a header but no data rows.');
  let picked: number[];
  if (columns && columns.length) {
    picked = columns.map((c) => {
      const i = header.indexOf(c.trim());
      if (i < 0) throw new MixtureError('BAD_INPUT', `Column "${c}" is not in the header (${header.join(', ')}).`);
      return i;
    });
  } else {
    picked = [];
    header.forEach((_, j) => {
      let numeric = 0;
      for (const r of body) if (parseNumber(r[j] ?? '') !== null) numeric++;
      if (numeric * 2 > body.length) picked.push(j);
    });
    if (picked.length === 0) throw new MixtureError('BAD_INPUT', 'No numeric columns found; name them with --columns.');
  }
  const d = picked.length;
  const n = body.length;
  const rows = new Float64Array(n * d);
  body.forEach((r, i) => {
    if (r.length !== header.length) {
      throw new MixtureError('BAD_INPUT', `Line ${i + 2} has ${r.length} cells but the header has ${header.length}.`);
    }
    picked.forEach((j, k) => {
      const cell = r[j] ?? '';
      const v = parseNumber(cell);
      if (v === null || !Number.isFinite(v)) {
        const what = cell.trim() === '' ? 'is empty' : `"${cell.trim()}" is not a number`;
        throw new MixtureError('BAD_INPUT', `Line ${i + 2} (data row ${i + 1}), column "${header[j]}": ${what}.`);
      }
      rows[i * d + k] = v;
    });
  });
  return { names: picked.map((j) => header[j]), rows, n, d };
}
