/**
 * `npm run score -- MODEL.json FILE.csv [options]`: score rows against a saved model
 * (USAGE below). Bad input: one line on stderr, exit code 2.
 */
import fs from 'node:fs';
import { parseArgs } from 'node:util';
import Papa from 'papaparse';
import { DEFAULT_UNUSUAL_BELOW, MixtureError, parseModelJson, scoreRows } from '../lib/mixture';
import { CliError, describeNotNumbers, describeSkipped, readBytes, readCsvMatrix } from './lib/csv-table';

export const USAGE = `Score the rows of a CSV file against a model saved by \`npm run fit\` or downloaded from the studio.

usage: npm run score -- MODEL.json FILE.csv [options]              (CSV on stdout; add --out to write a file)
       npm run --silent score -- MODEL.json FILE.csv > scores.csv   (npm prints its own header unless --silent)

The CSV needs a column named after every model feature; it is read like a studio upload.
Output columns: row (numbered as a spreadsheet shows it: the header is row 1), one membership
probability per cluster (headed by the cluster's name when the model has names,
else p_1..p_K), best (the most likely cluster: its name, or its number 1..K), log_density, typicality (percentile
among the training rows), unusual (1 when typicality is below --unusual-below).
A row with a blank in a model feature is written with empty scores.

options:
  --out FILE            write the CSV to FILE instead of stdout
  --unusual-below P     typicality percentile below which a row is unusual (default ${DEFAULT_UNUSUAL_BELOW})
  -h, --help            this text
`;

function main(argv: string[]): void {
  let parsed;
  try {
    parsed = parseArgs({ args: argv, allowPositionals: true, options: { 'unusual-below': { type: 'string' }, out: { type: 'string' }, help: { type: 'boolean', short: 'h' } } });
  } catch (e) {
    const m = /Unknown option '([^']+)'/.exec((e as Error).message);
    throw new CliError(m ? `unknown option ${m[1]} (see --help)` : (e as Error).message.split('\n')[0]);
  }
  const { values: o, positionals } = parsed;
  if (o.help) {
    process.stdout.write(USAGE);
    return;
  }
  if (positionals.length !== 2) throw new CliError('expected MODEL.json and FILE.csv (see --help)');
  const [modelFile, csvFile] = positionals;
  const threshold = o['unusual-below'] === undefined ? DEFAULT_UNUSUAL_BELOW : Number(o['unusual-below']);
  if (!Number.isFinite(threshold) || threshold < 0 || threshold > 100) throw new CliError('--unusual-below must be a percentile 0..100');
  const model = parseModelJson(Buffer.from(readBytes(modelFile)).toString('utf8'));
  const table = readCsvMatrix(csvFile, model.features.map((f) => f.name), { minCompleteRows: 0 });
  for (const line of describeNotNumbers(table)) process.stderr.write(`score: note: ${line}\n`);
  if (table.n < table.totalRows) process.stderr.write(`score: note: ${describeSkipped(table)}\n`);
  const k = model.weights.length;
  const names = model.clusters?.map((c) => c.label) ?? Array.from({ length: k }, (_, c) => `p_${c + 1}`);
  const s = scoreRows(model, table.rows, table.n);

  const scored = new Map<number, number>();
  table.rowIndex.forEach((r, i) => scored.set(r, i));
  const rows: (string | number)[][] = [];
  for (let r = 0; r < table.totalRows; r++) {
    const i = scored.get(r);
    if (i === undefined) {
      rows.push([r + 2, ...Array<string>(k + 4).fill('')]);
      continue;
    }
    const line: (string | number)[] = [r + 2];
    for (let c = 0; c < k; c++) line.push(s.probabilities[i * k + c]);
    line.push(model.clusters ? names[s.best[i]] : s.best[i] + 1, s.logDensity[i], s.typicality[i], s.typicality[i] < threshold ? 1 : 0);
    rows.push(line);
  }
  const csv = Papa.unparse({ fields: ['row', ...names, 'best', 'log_density', 'typicality', 'unusual'], data: rows }, { newline: '\n' }) + '\n';
  if (o.out) fs.writeFileSync(o.out, csv);
  else process.stdout.write(csv);
}

try {
  main(process.argv.slice(2));
} catch (e) {
  const msg = e instanceof CliError || e instanceof MixtureError ? e.message : `unexpected error: ${(e as Error)?.stack ?? String(e)}`;
  process.stderr.write(`score: ${msg.replace(/\s*\n\s*/g, ' ')}\n`);
  process.exit(2);
}
