import fs from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { makeRequest } from '../helpers/auth';
import { allExemptions, allRows } from './matrix/index';
import { CALLERS, type Caller, type Method, type World } from './matrix/types';
import { buildWorld } from './matrix/world';

const METHODS: Method[] = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE'];

function routeFiles(dir = 'app/api'): string[] {
  const out: string[] = [];
  for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) out.push(...routeFiles(full));
    else if (entry.name === 'route.ts') out.push(full.split(path.sep).join('/'));
  }
  return out.sort();
}

let world: World;
beforeAll(async () => {
  world = await buildWorld();
});

describe('role × route matrix', () => {
  it('has a row for every method of every route file (or a written exemption)', async () => {
    const missing: string[] = [];
    for (const file of routeFiles()) {
      if (allExemptions.some((e) => e.file === file)) continue;
      const mod = await import(path.resolve(file));
      for (const method of METHODS) {
        if (typeof mod[method] !== 'function') continue;
        if (!allRows.some((r) => r.file === file && r.method === method)) missing.push(`${method} ${file}`);
      }
    }
    expect(missing, 'add rows for these in tests/integration/matrix/<area>.ts').toEqual([]);
  });

  for (const row of allRows) {
    for (const caller of CALLERS) {
      it(`${row.method} ${row.file} as ${caller}`, async () => {
        const mod = await import(path.resolve(row.file));
        const handler = mod[row.method] as (r: Request, c: { params: Promise<unknown> }) => Promise<Response>;
        const userId = caller === 'visitor' ? undefined : world.users[caller as Exclude<Caller, 'visitor'>].id;
        const request = await makeRequest(row.url(world), {
          method: row.method,
          userId,
          json: row.body?.(world),
          headers: row.headers?.(world),
        });
        const response = await handler(request, { params: Promise.resolve(row.params?.(world) ?? {}) });
        const wanted = row.expect[caller];
        const allowed = Array.isArray(wanted) ? wanted : [wanted];
        expect(allowed, `${row.method} ${row.url(world)} as ${caller} → ${response.status}: ${await response.clone().text().then((t) => t.slice(0, 300))}`).toContain(response.status);
      });
    }
  }
});
