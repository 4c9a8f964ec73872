import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

/**
 * Data access lives in one layer: pages, route handlers and components call lib functions
 * and take their types from lib, never from models/ (so the database, its dialect and
 * the data layer can change in one place).
 */
const ROOT = path.resolve(__dirname, '../../..');

function sources(dir: string): string[] {
  const out: string[] = [];
  for (const entry of fs.readdirSync(path.join(ROOT, dir), { withFileTypes: true })) {
    const rel = path.join(dir, entry.name);
    if (entry.isDirectory()) out.push(...sources(rel));
    else if (/\.(ts|tsx)$/.test(entry.name)) out.push(rel);
  }
  return out;
}

const MODEL_IMPORT = /from\s+['"](@\/models(?:\/[^'"]*)?|(?:\.\.\/)+models(?:\/[^'"]*)?)['"]/;

describe('layers', () => {
  it('app/ and components/ import nothing from models/', () => {
    const files = [...sources('app'), ...sources('components')];
    expect(files.length).toBeGreaterThan(50);
    const offenders = files.filter((f) => MODEL_IMPORT.test(fs.readFileSync(path.join(ROOT, f), 'utf8')));
    expect(offenders, `these import models/ directly; call or re-export through lib instead:\n${offenders.join('\n')}`).toEqual([]);
  });

  it('the check itself sees a model import', () => {
    expect(MODEL_IMPORT.test("import { Fit } from '@/models';")).toBe(true);
    expect(MODEL_IMPORT.test("import type { DatasetColumn } from '@/models/Dataset';")).toBe(true);
    expect(MODEL_IMPORT.test("import { x } from '@/lib/models-view';")).toBe(false);
  });
});
