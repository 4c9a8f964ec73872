import fs from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { generateApiKey } from '@/lib/auth/api-keys';
import { API_KEY_SCOPES, type ApiKeyScope } from '@/models/api-key-scopes';
import { ApiKey } from '@/models';
import { sessionCookie } from '../helpers/auth';
import { allKeyRows } from './matrix/index';
import { KEY_CALLERS, type KeyCaller, type Method, type World } from './matrix/types';
import { buildWorld } from './matrix/world';

const METHODS: Method[] = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE'];

function routeFiles(dir = 'app/api/v1'): string[] {
  const out: string[] = [];
  for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) out.push(...routeFiles(full));
    else if (entry.name === 'route.ts') out.push(full.split(path.sep).join('/'));
  }
  return out.sort();
}

/** Keys stored as the studio stores them (prefix + hash), so the matrix needs no owner session. */
async function storeKey(workspaceId: number, scopes: ApiKeyScope[], extra: { revokedAt?: Date; expiresAt?: Date } = {}): Promise<string> {
  const { key, prefix, secretHash } = generateApiKey();
  await ApiKey.create({ workspaceId, name: `matrix ${scopes.join('+')}`, prefix, secretHash, scopes, ...extra });
  return key;
}

let world: World;
let keys: { all: string; revoked: string; expired: string; foreign: string; without: Record<ApiKeyScope, string> };
beforeAll(async () => {
  world = await buildWorld();
  const all = [...API_KEY_SCOPES];
  const without = {} as Record<ApiKeyScope, string>;
  for (const scope of API_KEY_SCOPES) without[scope] = await storeKey(world.workspaceId, all.filter((s) => s !== scope));
  keys = {
    all: await storeKey(world.workspaceId, all),
    revoked: await storeKey(world.workspaceId, all, { revokedAt: new Date(Date.now() - 60_000) }),
    expired: await storeKey(world.workspaceId, all, { expiresAt: new Date(Date.now() - 1000) }),
    foreign: await storeKey(world.otherWorkspaceId, all),
    without,
  };
});

async function headersFor(caller: KeyCaller, scope: ApiKeyScope): Promise<Record<string, string>> {
  const bearer = (k: string) => ({ authorization: `Bearer ${k}` });
  switch (caller) {
    case 'no key':
      return {};
    case 'session cookie, no key':
      return { cookie: await sessionCookie(world.users.owner.id, world.workspaceId) };
    case 'revoked key':
      return bearer(keys.revoked);
    case 'expired key':
      return bearer(keys.expired);
    case 'key without the scope':
      return bearer(keys.without[scope]);
    case "workspace B's key":
      return bearer(keys.foreign);
    case 'key':
      return bearer(keys.all);
  }
}

describe('role × route matrix, with API keys (/api/v1)', () => {
  it('has a key row for every method of every /api/v1 route file', async () => {
    const missing: string[] = [];
    for (const file of routeFiles()) {
      const mod = await import(path.resolve(file));
      for (const method of METHODS) {
        if (typeof mod[method] === 'function' && !allKeyRows.some((r) => r.file === file && r.method === method)) missing.push(`${method} ${file}`);
      }
    }
    expect(missing, 'add key rows for these in tests/integration/matrix/api.ts').toEqual([]);
  });

  for (const row of allKeyRows) {
    for (const caller of KEY_CALLERS) {
      it(`${row.method} ${row.file} with ${caller}`, async () => {
        const mod = await import(path.resolve(row.file));
        const handler = mod[row.method] as (r: Request, c: { params: Promise<unknown> }) => Promise<Response>;
        const headers = await headersFor(caller, row.scope);
        let body: string | undefined;
        if (row.raw) {
          const raw = row.raw(world);
          body = raw.body;
          headers['content-type'] = raw.contentType;
        } else if (row.body) {
          body = JSON.stringify(row.body(world));
          headers['content-type'] = 'application/json';
        }
        const request = new Request(new URL(row.url(world), 'http://localhost:3000'), { method: row.method, headers, body });
        const response = await handler(request, { params: Promise.resolve(row.params?.(world) ?? {}) });
        const wanted = row.expect[caller];
        const allowed = Array.isArray(wanted) ? wanted : [wanted];
        expect(allowed, `${row.method} ${row.url(world)} with ${caller} → ${response.status}: ${await response.clone().text().then((t) => t.slice(0, 300))}`).toContain(response.status);
      });
    }
  }
});
