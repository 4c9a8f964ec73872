/**
 * npm run --silent fit -- FILE.csv [options]   → fitted mixture model JSON on stdout.
 * Options: --columns a,b,c  --components 3 | 1-8  --covariance full|diagonal|spherical|tied|all
 *          --init kmeans++|points|rows:0,50,100  --restarts N  --seed N  --tol X  --max-iter N
 *          --reg X  --no-standardize  --criterion bic|aic  --units a=mm,b=g  --threads N
 * Bad input: one line on stderr, exit code 2.
 */
import fs from 'node:fs';
import { parseArgs } from 'node:util';
import {
  buildModel,
  type Covariance,
  COVARIANCES,
  fitMixtureWith,
  type InitMethod,
  localEngine,
  MixtureError,
  parseNumericTable,
  type PassEngine,
  selectMixtureWith,
  toModelJson,
} from '../lib/mixture';

class CliError extends Error {}

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

export function readText(file: string): string {
  try {
    return fs.readFileSync(file, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new CliError(code === 'ENOENT' ? `cannot read ${file}: no such file` : `cannot read ${file}: ${(e as Error).message}`);
  }
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
      },
    });
  } catch (e) {
    const m = /Unknown option '([^']+)'/.exec((e as Error).message);
    throw new CliError(m ? `unknown option ${m[1]}` : (e as Error).message.split('\n')[0]);
  }
  const { values: o, positionals } = parsed;
  if (positionals.length !== 1) throw new CliError(`expected one CSV file, got ${positionals.length} (usage: fit FILE.csv [options])`);
  const file = positionals[0];
  const table = parseNumericTable(readText(file), o.columns ? o.columns.split(',').filter(Boolean) : undefined);

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
  const threads = int('threads', o.threads, 1) ?? 1;
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
      process.stdout.write(toModelJson(buildModel(table.rows, table.n, table.d, fit, { features })) + '\n');
    } else {
      const sel = selectMixtureWith(
        table.rows,
        table.n,
        table.d,
        { ...common, components: ks, covariances: covs, criterion, init: init === 'points' ? 'points' : 'kmeans++' },
        engine,
      );
      const model = buildModel(table.rows, table.n, table.d, sel.best, { features, selection: sel.candidates });
      process.stdout.write(toModelJson(model) + '\n');
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
