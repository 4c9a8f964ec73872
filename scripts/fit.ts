/**
 * `npm run fit -- FILE.csv [options]`: fit a mixture from the command line (USAGE below).
 * Bad input: one line on stderr, exit code 2.
 */
import fs from 'node:fs';
import os from 'node:os';
import { parseArgs } from 'node:util';
import { CliError, describeNotNumbers, describeSkipped, readCsvMatrix } from './lib/csv-table';
import {
  buildModel,
  type Covariance,
  COVARIANCES,
  fitMixtureWith,
  type InitMethod,
  localEngine,
  MixtureError,
  type PassEngine,
  selectMixtureWith,
  toModelJson,
} from '../lib/mixture';

export const USAGE = `Fit a Gaussian mixture to the numeric columns of a CSV file and write the model JSON.

usage: npm run fit -- FILE.csv [options]            (model JSON on stdout; add --out to write a file)
       npm run --silent fit -- FILE.csv > model.json (npm prints its own header unless --silent)

The CSV is read like a studio upload: comma, semicolon or tab separated, a header row,
blank or NA cells allowed (rows with a blank in a chosen column are left out and counted).

options:
  --out FILE             write the model JSON to FILE instead of stdout
  --columns a,b,c        columns to use, by header name (default: every numeric column)
  --components K | A-B   one component count, or a range to search (default 3)
  --covariance S         full | diagonal | spherical | tied | all (default full)
  --criterion bic|aic    what ranks the candidates of a search (default bic)
  --init M               kmeans++ | points | rows:i,j,k (0-based data rows as starting means)
  --restarts N           starts per candidate; the best log-likelihood is kept (default 1)
  --seed N               seed for the random starts (default 0)
  --tol X                stop when the mean log-likelihood gains less than X (default 1e-3)
  --max-iter N           most EM iterations per start (default 100)
  --reg X                added to every covariance diagonal, in the fit's space (default 1e-6)
  --no-standardize       fit in the columns' own units instead of z-scores
  --units a=mm,b=g       units recorded with the features
  --threads N            threads that share each EM pass (default: one per core);
                         the model is the same to the last bit whatever N; 1 = this thread only
  -h, --help             this text
`;

function int(name: string, v: string | undefined, min: number): number | undefined {
  if (v === undefined) return undefined;
  if (!/^\d+$/.test(v) || Number(v) < min) throw new CliError(`--${name} must be an integer ≥ ${min} (got "${v}")`);
  return Number(v);
}
function num(name: string, v: string | undefined): number | undefined {
  if (v === undefined) return undefined;
  const x = Number(v);
  if (v.trim() === '' || !Number.isFinite(x) || x < 0) throw new CliError(`--${name} must be a non-negative number (got "${v}")`);
  return x;
}

async function main(argv: string[]): Promise<void> {
  let parsed;
  try {
    parsed = parseArgs({
      args: argv,
      allowPositionals: true,
      options: {
        columns: { type: 'string' },
        components: { type: 'string' },
        covariance: { type: 'string' },
        init: { type: 'string' },
        restarts: { type: 'string' },
        seed: { type: 'string' },
        tol: { type: 'string' },
        'max-iter': { type: 'string' },
        reg: { type: 'string' },
        'no-standardize': { type: 'boolean' },
        criterion: { type: 'string' },
        units: { type: 'string' },
        threads: { type: 'string' },
        out: { type: 'string' },
        help: { type: 'boolean', short: 'h' },
      },
    });
  } catch (e) {
    const m = /Unknown option '([^']+)'/.exec((e as Error).message);
    throw new CliError(m ? `unknown option ${m[1]} (see --help)` : (e as Error).message.split('\n')[0]);
  }
  const { values: o, positionals } = parsed;
  if (o.help) {
    process.stdout.write(USAGE);
    return;
  }
  if (positionals.length !== 1) throw new CliError(`expected one CSV file, got ${positionals.length} (see --help)`);
  const file = positionals[0];
  const table = readCsvMatrix(file, o.columns ? o.columns.split(',').map((c) => c.trim()).filter(Boolean) : undefined);
  for (const line of describeNotNumbers(table)) process.stderr.write(`fit: note: ${line}\n`);
  if (table.n < table.totalRows) process.stderr.write(`fit: note: ${describeSkipped(table)}\n`);
  const emit = (json: string) => (o.out ? fs.writeFileSync(o.out, json + '\n') : process.stdout.write(json + '\n'));

  let ks: number[];
  const spec = o.components ?? '3';
  const range = /^(\d+)-(\d+)$/.exec(spec);
  if (range) {
    const a = Number(range[1]);
    const b = Number(range[2]);
    if (a < 1 || b < a) throw new CliError(`--components range must be like 1-8 (got "${spec}")`);
    ks = Array.from({ length: b - a + 1 }, (_, i) => a + i);
  } else if (/^\d+$/.test(spec) && Number(spec) >= 1) {
    ks = [Number(spec)];
  } else throw new CliError(`--components must be a count like 3 or a range like 1-8 (got "${spec}")`);

  const cov = o.covariance ?? 'full';
  let covs: Covariance[];
  if (cov === 'all') covs = [...COVARIANCES];
  else if ((COVARIANCES as readonly string[]).includes(cov)) covs = [cov as Covariance];
  else throw new CliError(`--covariance must be one of ${COVARIANCES.join('|')}|all (got "${cov}")`);

  const tooMany = Math.max(...ks);
  if (table.n < tooMany) throw new CliError(`${file} has ${table.n} rows, fewer than the ${tooMany} components asked for`);

  let init: InitMethod = 'kmeans++';
  if (o.init !== undefined) {
    if (o.init === 'kmeans++' || o.init === 'points') init = o.init;
    else if (o.init.startsWith('rows:')) {
      const idx = o.init.slice(5).split(',').map((s) => s.trim());
      if (idx.some((s) => !/^\d+$/.test(s))) throw new CliError(`--init rows: takes 0-based row numbers like rows:0,50,100 (got "${o.init}")`);
      const rows = idx.map(Number);
      const bad = rows.find((r) => r >= table.n);
      if (bad !== undefined) throw new CliError(`--init row ${bad} is past the last data row (${table.n - 1})`);
      if (ks.length !== 1 || covs.length < 1 || rows.length !== ks[0]) {
        throw new CliError(`--init rows: needs exactly one component count equal to the number of rows given (${rows.length})`);
      }
      init = { means: rows.map((r) => Array.from(table.rows.subarray(r * table.d, (r + 1) * table.d))) };
    } else throw new CliError(`--init must be kmeans++, points or rows:i,j,k (got "${o.init}")`);
  }
  const criterion = o.criterion ?? 'bic';
  if (criterion !== 'bic' && criterion !== 'aic') throw new CliError(`--criterion must be bic or aic (got "${criterion}")`);

  const units = new Map<string, string>();
  for (const part of (o.units ?? '').split(',').filter(Boolean)) {
    const [k, v] = part.split('=');
    if (!k || v === undefined) throw new CliError(`--units takes name=unit pairs like length=mm,mass=g (got "${part}")`);
    units.set(k.trim(), v.trim());
  }

  const common = {
    restarts: int('restarts', o.restarts, 1),
    seed: int('seed', o.seed, 0),
    tol: num('tol', o.tol),
    maxIter: int('max-iter', o['max-iter'], 1),
    regCovar: num('reg', o.reg),
    standardize: !o['no-standardize'],
    columnNames: table.names,
  };
  const threads = int('threads', o.threads, 1) ?? os.availableParallelism();
  let engine: PassEngine = localEngine;
  let close = async () => {};
  if (threads > 1) {
    const { createWorkerEngine } = await import('../lib/mixture-parallel');
    const w = await createWorkerEngine(threads - 1);
    engine = w;
    close = () => w.close();
  }
  try {
    const features = table.names.map((name) => ({ name, unit: units.get(name) ?? null }));
    if (ks.length === 1 && covs.length === 1) {
      const fit = fitMixtureWith(table.rows, table.n, table.d, { ...common, components: ks[0], covariance: covs[0], init }, engine);
      emit(toModelJson(buildModel(table.rows, table.n, table.d, fit, { features })));
    } else {
      const sel = selectMixtureWith(
        table.rows,
        table.n,
        table.d,
        { ...common, components: ks, covariances: covs, criterion, init: init === 'points' ? 'points' : 'kmeans++' },
        engine,
      );
      const model = buildModel(table.rows, table.n, table.d, sel.best, { features, selection: sel.candidates });
      emit(toModelJson(model));
    }
  } finally {
    await close();
  }
}

if (require.main === module) {
  main(process.argv.slice(2)).catch((e: unknown) => {
    const msg = e instanceof CliError || e instanceof MixtureError ? e.message : `unexpected error: ${(e as Error)?.stack ?? String(e)}`;
    process.stderr.write(`fit: ${msg.replace(/\s*\n\s*/g, ' ')}\n`);
    process.exit(2);
  });
}
