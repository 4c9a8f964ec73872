/**
 * Uploaded CSV bytes → a typed, validated table (pure: no I/O). Every refusal is an
 * AppError whose message names what is wrong and, where it applies, the row and column,
 * counted the way a spreadsheet shows them (row 1 = the header row).
 */
import Papa from 'papaparse';
import { AppError, type FieldIssue } from '@/lib/errors';
import { textProblem } from '@/lib/http/text';
import type { DatasetColumn } from '@/models/Dataset';

/** Fewest complete rows a dataset may have: below this no mixture is worth fitting. */
export const MIN_DATA_ROWS = 10;
/** Most columns we accept; wider tables are almost always the wrong file. */
export const MAX_COLUMNS = 200;

export type Cell = number | string | null;

export interface ParsedTable {
  columns: DatasetColumn[];
  cells: Cell[][];
  /** Rows with a value in every numeric column. */
  completeRows: number;
  delimiter: string;
}

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
/** Cells that mean "no value" rather than a typo. */
const MISSING = new Set(['', 'na', 'n/a', 'nan', 'null', 'none', '-', '?']);

const DECIMAL_COMMA = /^[+-]?\d*,\d+$/;

/** A number cell; with `decimalComma` (files separated by ; or tab) "23,4" reads as 23.4. */
export function parseNumberCell(raw: string, decimalComma = false): number | null {
  let t = raw.trim();
  if (decimalComma && DECIMAL_COMMA.test(t)) t = t.replace(',', '.');
  if (!NUMBER.test(t)) return null;
  const v = Number(t);
  return Number.isFinite(v) ? v : null;
}

function isMissing(raw: string): boolean {
  return MISSING.has(raw.trim().toLowerCase());
}

/** Decode as UTF-8, refusing binary files (NUL bytes, invalid sequences). */
export function decodeCsvBytes(bytes: Uint8Array): string {
  if (bytes.length === 0) throw new AppError('bad_request', 'The file is empty: a CSV needs a header row and at least one data row.');
  const probe = bytes.subarray(0, Math.min(bytes.length, 8192));
  const nul = probe.indexOf(0);
  if (nul >= 0) {
    throw new AppError('unsupported_media_type', `This does not look like a CSV file: it contains binary data (a zero byte at position ${nul + 1}). Export the sheet as CSV (comma, semicolon or tab separated) and upload that.`);
  }
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    throw new AppError('unsupported_media_type', 'This does not look like a CSV file: it is not UTF-8 text. Export the sheet as CSV in UTF-8 and upload that.');
  }
  return text.replace(/^\uFEFF/, '');
}

function describeRow(i: number): string {
  return `row ${i + 2}`; // data row i (0-based) sits under the header on sheet row i + 2
}

/**
 * NUL characters and unpaired surrogates cannot be stored as text (see lib/http/text.ts);
 * a NUL after the first 8 KB passes decodeCsvBytes's binary probe and lands here. Names
 * each cell (or header name) the way a spreadsheet shows it.
 */
function throwBrokenText(header: string[], body: string[][]): never {
  const issues: FieldIssue[] = [];
  header.forEach((name, j) => {
    const problem = textProblem(name);
    if (problem) issues.push({ field: `column ${j + 1}`, message: `The name of column ${j + 1} (row 1) ${problem}` });
  });
  for (let i = 0; i < body.length && issues.length < 50; i++) {
    body[i].forEach((raw, j) => {
      const problem = textProblem(raw);
      if (problem) issues.push({ field: `${describeRow(i)}, column ${header[j] || j + 1}`, message: `Row ${i + 2}, column ${JSON.stringify(header[j] ?? `#${j + 1}`)} ${problem}` });
    });
  }
  if (issues.length === 0) throw new AppError('invalid_input', 'The file has characters that cannot be stored as text (a NUL or a broken UTF-16 character).');
  const shown = issues.slice(0, 3).map((i) => i.message);
  const more = issues.length > shown.length ? ` (and ${issues.length >= 50 ? 'many' : issues.length - shown.length} more)` : '';
  throw new AppError('invalid_input', `The file has text that cannot be stored: ${shown.join(' ')}${more}`, { issues });
}

/**
 * `minCompleteRows`: fewest rows with a number in every numeric column (default
 * MIN_DATA_ROWS, what a fit needs); scoring a few rows from the command line passes 0.
 */
export function parseCsvText(text: string, opts: { minCompleteRows?: number } = {}): ParsedTable {
  const minCompleteRows = opts.minCompleteRows ?? MIN_DATA_ROWS;
  if (text.trim() === '') throw new AppError('bad_request', 'The file is empty: a CSV needs a header row and at least one data row.');
  const parsed = Papa.parse<string[]>(text, { header: false, skipEmptyLines: 'greedy', delimitersToGuess: [',', ';', '\t', '|'] });
  const quote = parsed.errors.find((e) => e.type === 'Quotes');
  if (quote) {
    throw new AppError('invalid_input', `Row ${(quote.row ?? 0) + 1} has a quoted value that never closes; check the quotes in that row.`, {
      issues: [{ field: `row ${(quote.row ?? 0) + 1}`, message: 'unclosed quote' }],
    });
  }
  const data = parsed.data;
  if (data.length === 0) throw new AppError('bad_request', 'The file is empty: a CSV needs a header row and at least one data row.');
  const header = data[0].map((h) => h.trim());
  const body = data.slice(1);
  // Sheets exported with a decimal comma separate columns with ; or tab instead.
  const decimalComma = parsed.meta.delimiter !== ',';
  if (header.length > MAX_COLUMNS) throw new AppError('invalid_input', `The header has ${header.length} columns; at most ${MAX_COLUMNS} are supported.`);

  const headerIssues: FieldIssue[] = [];
  header.forEach((name, j) => {
    if (name === '') headerIssues.push({ field: `column ${j + 1}`, message: `Column ${j + 1} has no name in the header row (row 1).` });
  });
  const seen = new Map<string, number>();
  header.forEach((name, j) => {
    if (name === '') return;
    const key = name.toLowerCase();
    const first = seen.get(key);
    if (first !== undefined) headerIssues.push({ field: `column ${j + 1}`, message: `Column ${j + 1} is named "${name}", the same as column ${first + 1}; every column needs its own name.` });
    else seen.set(key, j);
  });
  if (headerIssues.length) {
    throw new AppError('invalid_input', `The header row has ${headerIssues.length === 1 ? 'a problem' : `${headerIssues.length} problems`}: ${headerIssues.map((i) => i.message).join(' ')}`, { issues: headerIssues });
  }
  if (body.length === 0) throw new AppError('bad_request', 'The file has a header row but no data rows.');

  // Only a file that has one somewhere is searched cell by cell.
  if (textProblem(text) !== null) throwBrokenText(header, body);

  const ragged: FieldIssue[] = [];
  body.forEach((r, i) => {
    if (r.length !== header.length) ragged.push({ field: describeRow(i), message: `Row ${i + 2} has ${r.length} value${r.length === 1 ? '' : 's'} but the header has ${header.length} columns.` });
  });
  if (ragged.length) {
    const shown = ragged.slice(0, 5);
    throw new AppError('invalid_input', `${ragged.length} row${ragged.length === 1 ? ' does' : 's do'} not match the header: ${shown.map((r) => r.message).join(' ')}${ragged.length > shown.length ? ` (and ${ragged.length - shown.length} more)` : ''}`, { issues: ragged.slice(0, 50) });
  }

  const columns: DatasetColumn[] = header.map((name, j) => {
    let numeric = 0;
    let filled = 0;
    for (const r of body) {
      const cell = r[j];
      if (isMissing(cell)) continue;
      filled++;
      if (parseNumberCell(cell, decimalComma) !== null) numeric++;
    }
    const kind: DatasetColumn['kind'] = filled > 0 && numeric * 2 > filled ? 'numeric' : 'text';
    return { name, kind, count: 0, missing: 0, min: null, max: null, mean: null, std: null };
  });

  const cells: Cell[][] = body.map((r) =>
    r.map((raw, j) => {
      if (columns[j].kind === 'text') return isMissing(raw) ? null : raw.trim();
      return parseNumberCell(raw, decimalComma);
    }),
  );

  columns.forEach((col, j) => {
    if (col.kind === 'text') {
      col.count = cells.filter((r) => r[j] !== null).length;
      col.missing = cells.length - col.count;
      return;
    }
    let count = 0;
    let sum = 0;
    let min = Infinity;
    let max = -Infinity;
    let invalid = 0;
    const examples: string[] = [];
    body.forEach((r, i) => {
      const v = cells[i][j];
      if (typeof v === 'number') {
        count++;
        sum += v;
        if (v < min) min = v;
        if (v > max) max = v;
      } else if (!isMissing(r[j])) {
        invalid++;
        if (examples.length < 3) examples.push(`${describeRow(i)}: "${r[j].trim().slice(0, 40)}"`);
      }
    });
    const mean = count ? sum / count : null;
    let ss = 0;
    if (mean !== null) for (const r of cells) if (typeof r[j] === 'number') ss += ((r[j] as number) - mean) ** 2;
    col.count = count;
    col.missing = cells.length - count;
    col.invalid = invalid;
    if (examples.length) col.invalidExamples = examples;
    col.min = count ? min : null;
    col.max = count ? max : null;
    col.mean = mean;
    col.std = count > 1 ? Math.sqrt(ss / (count - 1)) : null;
    const range = defaultInputRange(col.min, col.max);
    col.displayName = prettifyName(col.name);
    col.unit = guessUnit(col.name);
    col.inputMin = range.min;
    col.inputMax = range.max;
  });

  const numericIdx = columns.flatMap((c, j) => (c.kind === 'numeric' ? [j] : []));
  if (numericIdx.length === 0) {
    throw new AppError('invalid_input', `No column holds numbers: ${header.slice(0, 8).map((h) => `"${h}"`).join(', ')}${header.length > 8 ? '…' : ''} all look like text. A mixture needs at least one numeric column.`);
  }
  const completeRows = cells.filter((r) => numericIdx.every((j) => typeof r[j] === 'number')).length;
  if (completeRows < minCompleteRows) {
    throw new AppError('invalid_input', `Only ${completeRows} row${completeRows === 1 ? ' has' : 's have'} a number in every numeric column (${numericIdx.map((j) => header[j]).join(', ')}); at least ${MIN_DATA_ROWS} are needed to fit a mixture.`);
  }
  return { columns, cells, completeRows, delimiter: parsed.meta.delimiter };
}

/** "avg_speed_kmh" → "Avg speed" (unit suffixes move to the unit field). */
export function prettifyName(raw: string): string {
  const unit = guessUnit(raw);
  let base = raw;
  if (unit) base = base.replace(new RegExp(`[_\\s-]*${unit.replace('/', '_?')}$`, 'i'), '');
  const words = base.replace(/[_-]+/g, ' ').replace(/\s+/g, ' ').trim();
  if (!words) return raw;
  return words.charAt(0).toUpperCase() + words.slice(1);
}

const UNIT_SUFFIXES: [RegExp, string][] = [
  [/[_\s-]kmh$/i, 'km/h'],
  [/[_\s-]km$/i, 'km'],
  [/[_\s-]m$/i, 'm'],
  [/[_\s-]cm$/i, 'cm'],
  [/[_\s-]mm$/i, 'mm'],
  [/[_\s-]kg$/i, 'kg'],
  [/[_\s-]g$/i, 'g'],
  [/[_\s-]s$/i, 's'],
  [/[_\s-]min$/i, 'min'],
  [/[_\s-]h$/i, 'h'],
  [/[_\s-]pct$/i, '%'],
];

export function guessUnit(raw: string): string {
  for (const [re, unit] of UNIT_SUFFIXES) if (re.test(raw)) return unit;
  return '';
}

/** Observed range widened by a tenth of its width each side, never below 0 for non-negative data. */
export function defaultInputRange(min: number | null, max: number | null): { min: number | null; max: number | null } {
  if (min === null || max === null) return { min: null, max: null };
  const width = max - min || Math.abs(max) || 1;
  const pad = width * 0.1;
  let lo = min - pad;
  const hi = max + pad;
  if (min >= 0 && lo < 0) lo = 0;
  return { min: niceRound(lo, width, 'down'), max: niceRound(hi, width, 'up') };
}

function niceRound(v: number, width: number, dir: 'up' | 'down'): number {
  const step = 10 ** Math.floor(Math.log10(width / 100));
  const r = dir === 'up' ? Math.ceil(v / step) * step : Math.floor(v / step) * step;
  return Number(r.toPrecision(12));
}
