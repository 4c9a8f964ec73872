import Papa from 'papaparse';
import { MAX_MASK_FIELDS, scoreRowPartial, scoreRows, type MixtureModel as EngineModel, type TypicalitySample } from '@/lib/mixture';
import { parseNumberCell } from '@/lib/datasets/parse';
import { AppError, type FieldIssue } from '@/lib/errors';
import { formatCount } from '@/lib/format';
import type { VersionPayload } from '@/lib/embeds/payload';

/**
 * Batch scoring: many rows of a back office scored against a calculator's served
 * version in one call (pure: no I/O). Rows come as a CSV body (a header naming the
 * model's fields) or JSON (`{ "rows": [[…], …] }` in the model's field order, or
 * `{ "rows": [{ "field": value, … }] }`); answers go out as CSV or JSON, a block of
 * rows at a time so a large batch never sits in memory as one string.
 *
 * Complete rows go through the engine's batch scorer (scoreRows); a row with a blank
 * optional field is answered from the marginal over the fields it has, as the calculator
 * does. Values outside the calculator's input range are scored, not refused: a back
 * office may hold them, and the typicality says how unusual they are.
 */
export interface BatchVersion {
  number: number;
  payload: Pick<VersionPayload, 'clusters' | 'fields'>;
  engine: EngineModel;
  sample: TypicalitySample | null;
}

export interface BatchRows {
  /** n·d row-major in the model's field order; NaN marks a blank optional field. */
  values: Float64Array;
  n: number;
  d: number;
  /** Rows holding a blank, in order (scored one by one). */
  partial: number[];
}

export interface BatchScored {
  n: number;
  k: number;
  probabilities: Float64Array; // n·K
  best: Int32Array; // n
  logDensity: Float64Array; // n
  typicality: Float64Array; // n
  unusual: Uint8Array; // n
}

/** The most problems named in one refusal; the rest are counted. */
const MAX_ISSUES = 20;

function refuse(issues: FieldIssue[], total: number, what: string): never {
  const more = total > issues.length ? ` (${total - issues.length} more not listed)` : '';
  throw new AppError('invalid_input', `${what}: ${issues[0].message}${total > 1 ? ` and ${total - 1} more problem${total === 2 ? '' : 's'}${more}` : ''}`, { issues });
}

function tooMany(n: number, maxRows: number): AppError {
  return new AppError('plan_limit', `This batch has ${formatCount(n)} rows; your plan scores at most ${formatCount(maxRows)} rows per request. Split the rows into several requests, or move to a larger plan.`);
}

function emptyBatch(): AppError {
  return new AppError('invalid_input', 'The batch has no rows to score.', { issues: [{ field: 'rows', message: 'Send at least one row.' }] });
}

/** Which model fields may be blank, by position. */
function optionalFields(version: BatchVersion): boolean[] {
  const byName = new Map(version.payload.fields.map((f) => [f.feature, f.optional === true]));
  return version.engine.features.map((f) => byName.get(f.name) ?? false);
}

/**
 * The body's lines split into cells. Files without quotes (what programs write) are
 * split directly, which is several times faster than the general parser on a large
 * batch; anything quoted goes through papaparse.
 */
function csvLines(text: string): { lines: string[][]; delimiter: string } {
  if (text.includes('"')) {
    const parsed = Papa.parse<string[]>(text, { skipEmptyLines: 'greedy', delimiter: '' });
    return { lines: parsed.data, delimiter: parsed.meta.delimiter };
  }
  const firstEnd = text.indexOf('\n');
  const first = firstEnd < 0 ? text : text.slice(0, firstEnd);
  const delimiter = first.includes(',') ? ',' : first.includes(';') ? ';' : first.includes('\t') ? '\t' : ',';
  const lines: string[][] = [];
  for (const raw of text.split('\n')) {
    const line = raw.endsWith('\r') ? raw.slice(0, -1) : raw;
    if (line.trim() === '') continue;
    lines.push(line.split(delimiter));
  }
  return { lines, delimiter };
}

/** A CSV body: a header row naming every model field (extra columns are ignored), one row per record. */
export function parseBatchCsv(text: string, version: BatchVersion, maxRows: number): BatchRows {
  const features = version.engine.features.map((f) => f.name);
  const { lines, delimiter } = csvLines(text.replace(/^\uFEFF/, ''));
  if (lines.length === 0) throw emptyBatch();
  const header = lines[0].map((h) => h.trim());
  const decimalComma = delimiter === ';' || delimiter === '\t';
  const columns = features.map((f) => header.indexOf(f));
  const missing = features.filter((_, j) => columns[j] < 0);
  if (missing.length) {
    throw new AppError('invalid_input', `The header row has no column named ${missing.map((m) => `"${m}"`).join(', ')}; it needs one per model field (${features.join(', ')}).`, {
      issues: missing.map((m) => ({ field: `column ${m}`, message: `No column named "${m}" in the header row.` })),
    });
  }
  const n = lines.length - 1;
  if (n === 0) throw emptyBatch();
  if (n > maxRows) throw tooMany(n, maxRows);
  const d = features.length;
  const optional = optionalFields(version);
  const values = new Float64Array(n * d);
  const partial: number[] = [];
  const issues: FieldIssue[] = [];
  let problems = 0;
  for (let r = 0; r < n; r++) {
    const cells = lines[r + 1];
    let blank = false;
    for (let j = 0; j < d; j++) {
      const raw = cells[columns[j]] ?? '';
      const v = raw.trim() === '' ? null : parseNumberCell(raw, decimalComma);
      if (v !== null) {
        values[r * d + j] = v;
        continue;
      }
      if (raw.trim() === '' && optional[j]) {
        values[r * d + j] = Number.NaN;
        blank = true;
        continue;
      }
      problems++;
      // Rows as a spreadsheet numbers them: the header is row 1.
      if (issues.length < MAX_ISSUES) issues.push({ field: `row ${r + 2}, column ${features[j]}`, message: raw.trim() === '' ? `Row ${r + 2}: "${features[j]}" is blank, and this field needs a value.` : `Row ${r + 2}: "${features[j]}" is "${raw.slice(0, 40)}", not a number.` });
    }
    if (blank) partial.push(r);
  }
  if (problems) refuse(issues, problems, 'Nothing was scored');
  return { values, n, d, partial };
}

/** A JSON body's rows: arrays in the model's field order, or objects keyed by field name. */
export function parseBatchJson(body: unknown, version: BatchVersion, maxRows: number): BatchRows {
  const features = version.engine.features.map((f) => f.name);
  const rows = (body as { rows?: unknown } | null)?.rows;
  if (!body || typeof body !== 'object' || Array.isArray(body) || !Array.isArray(rows)) {
    throw new AppError('invalid_input', 'Send {"rows": [...]}: an array of rows, each an array in the model’s field order or an object keyed by field name.', { issues: [{ field: 'rows', message: 'Expected an array of rows.' }] });
  }
  const extra = Object.keys(body).filter((key) => key !== 'rows');
  if (extra.length) throw new AppError('invalid_input', `Unknown field ${extra.map((e) => `"${e}"`).join(', ')} in the body; only "rows" is read.`, { issues: extra.map((e) => ({ field: e, message: 'Not a field of a batch.' })) });
  const n = rows.length;
  if (n === 0) throw emptyBatch();
  if (n > maxRows) throw tooMany(n, maxRows);
  const d = features.length;
  const optional = optionalFields(version);
  const values = new Float64Array(n * d);
  const partial: number[] = [];
  const issues: FieldIssue[] = [];
  let problems = 0;
  const note = (field: string, message: string) => {
    problems++;
    if (issues.length < MAX_ISSUES) issues.push({ field, message });
  };
  for (let r = 0; r < n; r++) {
    const row = rows[r] as unknown;
    let blank = false;
    if (Array.isArray(row)) {
      if (row.length !== d) {
        note(`rows.${r}`, `Row ${r} has ${row.length} values; the model has ${d} fields (${features.join(', ')}).`);
        continue;
      }
    } else if (!row || typeof row !== 'object') {
      note(`rows.${r}`, `Row ${r} is neither an array nor an object.`);
      continue;
    }
    for (let j = 0; j < d; j++) {
      const v = Array.isArray(row) ? row[j] : (row as Record<string, unknown>)[features[j]];
      if (typeof v === 'number' && Number.isFinite(v)) {
        values[r * d + j] = v;
      } else if ((v === null || v === undefined) && optional[j]) {
        values[r * d + j] = Number.NaN;
        blank = true;
      } else {
        note(`rows.${r}.${features[j]}`, v === null || v === undefined ? `Row ${r}: "${features[j]}" is missing, and this field needs a value.` : `Row ${r}: "${features[j]}" must be a number.`);
      }
    }
    if (blank) partial.push(r);
  }
  if (problems) refuse(issues, problems, 'Nothing was scored');
  return { values, n, d, partial };
}

/** Every row's probabilities, best group, log density, typicality and unusual flag. */
export function scoreBatch(version: BatchVersion, rows: BatchRows, unusualBelow: number): BatchScored {
  const { engine } = version;
  const k = engine.weights.length;
  const d = rows.d;
  let out: BatchScored;
  if (rows.partial.length === 0) {
    const s = scoreRows(engine, rows.values, rows.n);
    out = { n: rows.n, k, probabilities: s.probabilities, best: s.best, logDensity: s.logDensity, typicality: s.typicality, unusual: new Uint8Array(rows.n) };
  } else {
    if (engine.features.length > MAX_MASK_FIELDS) throw new AppError('invalid_input', 'This model has too many fields for blank values; give every field a value.');
    // Complete rows in one engine call; the few rows with blanks one by one from their marginal.
    const partial = new Set(rows.partial);
    const complete = rows.n - partial.size;
    const packed = new Float64Array(complete * d);
    const where = new Int32Array(complete);
    for (let r = 0, i = 0; r < rows.n; r++) {
      if (partial.has(r)) continue;
      packed.set(rows.values.subarray(r * d, (r + 1) * d), i * d);
      where[i++] = r;
    }
    out = { n: rows.n, k, probabilities: new Float64Array(rows.n * k), best: new Int32Array(rows.n), logDensity: new Float64Array(rows.n), typicality: new Float64Array(rows.n), unusual: new Uint8Array(rows.n) };
    if (complete) {
      const s = scoreRows(engine, packed, complete);
      for (let i = 0; i < complete; i++) {
        const r = where[i];
        out.probabilities.set(s.probabilities.subarray(i * k, (i + 1) * k), r * k);
        out.best[r] = s.best[i];
        out.logDensity[r] = s.logDensity[i];
        out.typicality[r] = s.typicality[i];
      }
    }
    for (const r of rows.partial) {
      const row = Array.from(rows.values.subarray(r * d, (r + 1) * d), (v) => (Number.isNaN(v) ? null : v));
      const s = scoreRowPartial(engine, row, { unusualBelow, sample: version.sample ?? undefined });
      out.probabilities.set(s.probabilities, r * k);
      out.best[r] = s.best;
      out.logDensity[r] = s.logDensity;
      out.typicality[r] = s.typicality;
    }
  }
  for (let r = 0; r < rows.n; r++) out.unusual[r] = out.typicality[r] < unusualBelow ? 1 : 0;
  return out;
}

/** Rows per block of output text. */
const BLOCK_ROWS = 10_000;

/**
 * A share (0..1) to 6 decimals, trailing zeros dropped: "0.25", "0.000013", "1". Written
 * from an integer (the answer's text is most of a batch's cost; toPrecision is 10× slower).
 */
function share6(v: number): string {
  const micro = Math.round(v * 1e6);
  if (micro <= 0) return '0';
  if (micro >= 1e6) return '1';
  let digits = String(micro);
  while (digits.length < 6) digits = '0' + digits;
  let end = 6;
  while (digits.charCodeAt(end - 1) === 48) end--;
  return '0.' + digits.slice(0, end);
}

/** Log densities and percentiles to 4 decimals, trailing zeros dropped. */
function fixed4(v: number): string {
  if (!Number.isFinite(v)) return String(v);
  return String(Math.round(v * 1e4) / 1e4);
}

function csvCell(text: string): string {
  return /[",\n\r]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** CSV answers: a header, then one line per row in the order sent (row 1 = the first data row). */
export function* batchCsvBlocks(version: BatchVersion, s: BatchScored): Generator<string> {
  const labels = version.payload.clusters.map((c) => c.label);
  yield [ 'row', ...labels.map((l) => csvCell(`p ${l}`)), 'best', 'log_density', 'typicality', 'unusual'].join(',') + '\n';
  const best = labels.map(csvCell);
  for (let start = 0; start < s.n; start += BLOCK_ROWS) {
    const end = Math.min(s.n, start + BLOCK_ROWS);
    let text = '';
    for (let r = start; r < end; r++) {
      let line = String(r + 1);
      for (let c = 0; c < s.k; c++) line += ',' + share6(s.probabilities[r * s.k + c]);
      line += ',' + best[s.best[r]] + ',' + fixed4(s.logDensity[r]) + ',' + fixed4(s.typicality[r]) + ',' + s.unusual[r];
      text += line + '\n';
    }
    yield text;
  }
}

/** JSON answers: the version and groups once, then one object per row, written a block at a time. */
export function* batchJsonBlocks(version: BatchVersion, s: BatchScored): Generator<string> {
  const groups = version.payload.clusters.map((c, index) => ({ index, label: c.label }));
  yield `{"version":${version.number},"groups":${JSON.stringify(groups)},"count":${s.n},"rows":[`;
  for (let start = 0; start < s.n; start += BLOCK_ROWS) {
    const end = Math.min(s.n, start + BLOCK_ROWS);
    let text = '';
    for (let r = start; r < end; r++) {
      let p = '';
      for (let c = 0; c < s.k; c++) p += (c ? ',' : '') + share6(s.probabilities[r * s.k + c]);
      text += `${r ? ',' : ''}{"row":${r + 1},"probabilities":[${p}],"best":${s.best[r]},"logDensity":${fixed4(s.logDensity[r])},"typicality":${fixed4(s.typicality[r])},"unusual":${s.unusual[r] === 1}}`;
    }
    yield text;
  }
  yield ']}';
}

/** A stream of the answer's text blocks, UTF-8 encoded. */
export function textStream(blocks: Generator<string>): ReadableStream<Uint8Array> {
  const encoder = new TextEncoder();
  return new ReadableStream<Uint8Array>({
    pull(controller) {
      const next = blocks.next();
      if (next.done) controller.close();
      else controller.enqueue(encoder.encode(next.value));
    },
  });
}
