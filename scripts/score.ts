/**
 * npm run --silent score -- MODEL.json FILE.csv   → per-row scores as CSV on stdout:
 *   row, p_1..p_K (membership probabilities), best (1-based), log_density, typicality, unusual
 * The CSV must have a column named after every model feature. Bad input: one line on
 * stderr, exit code 2.
 */
import fs from 'node:fs';
import { parseArgs } from 'node:util';
import { DEFAULT_UNUSUAL_BELOW, MixtureError, parseModelJson, parseNumericTable, scoreRows } from '../lib/mixture';

class CliError extends Error {}

function readText(file: string): string {
  try {
    return fs.readFileSync(file, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new CliError(code === 'ENOENT' ? `cannot read ${file}: no such file` : `cannot read ${file}: ${(e as Error).message}`);
  }
}

function main(argv: string[]): void {
  let parsed;
  try {
    parsed = parseArgs({ args: argv, allowPositionals: true, options: { 'unusual-below': { type: 'string' } } });
  } catch (e) {
    const m = /Unknown option '([^']+)'/.exec((e as Error).message);
    throw new CliError(m ? `unknown option ${m[1]}` : (e as Error).message.split('\n')[0]);
  }
  const { values: o, positionals } = parsed;
  if (positionals.length !== 2) throw new CliError('usage: score MODEL.json FILE.csv');
  const [modelFile, csvFile] = positionals;
  const threshold = o['unusual-below'] === undefined ? DEFAULT_UNUSUAL_BELOW : Number(o['unusual-below']);
  if (!Number.isFinite(threshold) || threshold < 0 || threshold > 100) throw new CliError('--unusual-below must be a percentile 0..100');
  const modelText = readText(modelFile);
  const model = parseModelJson(modelText);
  const table = parseNumericTable(readText(csvFile), model.features.map((f) => f.name));
  const k = model.weights.length;
  const s = scoreRows(model, table.rows, table.n);
  const out: string[] = [];
  const head = ['row'];
  for (let c = 1; c <= k; c++) head.push(`p_${c}`);
  head.push('best', 'log_density', 'typicality', 'unusual');
  out.push(head.join(','));
  for (let r = 0; r < table.n; r++) {
    const line: (string | number)[] = [r + 1];
    for (let c = 0; c < k; c++) line.push(s.probabilities[r * k + c]);
    line.push(s.best[r] + 1, s.logDensity[r], s.typicality[r], s.typicality[r] < threshold ? 1 : 0);
    out.push(line.join(','));
  }
  process.stdout.write(out.join('\n') + '\n');
}

try {
  main(process.argv.slice(2));
} catch (e) {
  const msg = e instanceof CliError || e instanceof MixtureError ? e.message : `unexpected error: ${(e as Error)?.stack ?? String(e)}`;
  process.stderr.write(`score: ${msg.replace(/\s*\n\s*/g, ' ')}\n`);
  process.exit(2);
}
