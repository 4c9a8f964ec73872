/**
 * Origin checks on state-changing routes: a page on another site cannot make a
 * signed-in visitor's browser write (403, nothing changed); our own pages and
 * non-browser clients can; the public cross-site routes keep their own rules.
 */
import fs from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { POST as datasetsPOST, GET as datasetsGET } from '@/app/api/datasets/route';
import { PATCH as modelPATCH } from '@/app/api/models/[id]/route';
import { POST as scorePOST } from '@/app/api/score/[token]/route';
import { POST as reportsPOST } from '@/app/api/reports/route';
import { POST as webhookPOST } from '@/app/api/webhooks/payments/route';
import { assertSameOrigin } from '@/lib/http/origin';
import { payloadChecksum, type VersionPayload } from '@/lib/embeds/payload';
import { clearScoringCaches } from '@/lib/scoring';
import { ModelVersion } from '@/models';
import { buildWorld } from '../matrix/world';
import type { World } from '../matrix/types';
import { makeRequest } from '../../helpers/auth';
import { changedTables, fingerprint } from './snapshot';

process.env.STRIPE_SECRET_KEY ||= 'sk_test_catalogue';
process.env.STRIPE_WEBHOOK_SECRET ||= 'whsec_catalogue_secret';

let w: World;
const csv = ['a,b', ...Array.from({ length: 12 }, (_, i) => `${i},${i * i}`)].join('\n');
const asOwner = (url: string, opts: Parameters<typeof makeRequest>[1] = {}) => makeRequest(url, { userId: w.users.owner.id, workspaceId: w.workspaceId, ...opts });
const upload = (headers: Record<string, string>) => asOwner('/api/datasets', { method: 'POST', body: csv, headers: { 'content-type': 'text/csv', ...headers } });
const ctx = (params: Record<string, string> = {}) => ({ params: Promise.resolve(params) });

beforeAll(async () => {
  w = await buildWorld();
  const version = (await ModelVersion.findByPk(w.versionId))!;
  await version.update({ checksum: payloadChecksum(version.payload as unknown as VersionPayload) });
  clearScoringCaches();
});

describe('assertSameOrigin', () => {
  const req = (method: string, headers: Record<string, string>) => new Request('http://localhost:3000/api/x', { method, headers });
  it.each([
    ['POST from another site', 'POST', { origin: 'https://evil.test' }, true],
    ['DELETE from another site', 'DELETE', { origin: 'https://evil.test' }, true],
    ['PATCH from an opaque origin (sandboxed frame)', 'PATCH', { origin: 'null' }, true],
    ['POST on another port of our host', 'POST', { origin: 'http://localhost:4000' }, true],
    ['POST marked cross-site without Origin', 'POST', { 'sec-fetch-site': 'cross-site' }, true],
    ['POST from our own pages', 'POST', { origin: 'http://localhost:3000', 'sec-fetch-site': 'same-origin' }, false],
    ['POST from a script without browser headers', 'POST', {}, false],
    ['GET from another site (reads are not writes)', 'GET', { origin: 'https://evil.test' }, false],
  ])('%s', (_name, method, headers, refused) => {
    const call = () => assertSameOrigin(req(method as string, headers as Record<string, string>));
    if (refused) expect(call).toThrow(/another website/);
    else expect(call).not.toThrow();
  });
});

describe('through the route handlers', () => {
  it('refuses a signed-in upload posted from another site, and changes nothing', async () => {
    const before = await fingerprint();
    const res = await datasetsPOST(await upload({ origin: 'https://evil.test' }), ctx());
    expect(res.status).toBe(403);
    expect(((await res.json()) as { error: { message: string } }).error.message).toMatch(/another website/);
    const res2 = await modelPATCH(await asOwner(`/api/models/${w.modelId}`, { method: 'PATCH', json: { name: 'Hijacked' }, headers: { 'sec-fetch-site': 'cross-site' } }), { params: Promise.resolve({ id: String(w.modelId) }) });
    expect(res2.status).toBe(403);
    expect(changedTables(before, await fingerprint())).toEqual([]);
  });

  it('accepts the same upload from our own origin and reads from anywhere', async () => {
    const res = await datasetsPOST(await upload({ origin: 'http://localhost:3000' }), ctx());
    expect(res.status).toBe(201);
    const list = await datasetsGET(await asOwner('/api/datasets', { headers: { origin: 'https://evil.test' } }), ctx());
    expect(list.status).toBe(200);
  });

  it('leaves the public scoring route to its embed rules: allowed host yes, other sites no', async () => {
    const values = { avg_speed_kmh: 24, weekly_distance_km: 120, climb_per_ride_m: 400 };
    const call = (origin: string) => makeRequest(`/api/score/${w.embedToken}`, { json: { values }, headers: { origin, 'x-forwarded-for': `198.51.100.${origin.length}` } });
    const ok = await scorePOST(await call('http://host.test'), { params: Promise.resolve({ token: w.embedToken }) });
    expect(ok.status).toBe(200);
    expect(ok.headers.get('access-control-allow-origin')).toBe('http://host.test');
    const refused = await scorePOST(await call('https://evil.test'), { params: Promise.resolve({ token: w.embedToken }) });
    expect(refused.status).toBe(403);
    expect(((await refused.json()) as { error: { message: string } }).error.message).toMatch(/does not answer requests from this website/);
  });

  it('accepts abuse reports and webhooks whatever their origin (they have their own checks)', async () => {
    const report = await reportsPOST(await makeRequest('/api/reports', { json: { token: w.embedToken, reason: 'other', message: 'Reported from a host page.' }, headers: { origin: 'http://host.test' } }), ctx());
    expect(report.status).toBe(201);
    const hook = await webhookPOST(await makeRequest('/api/webhooks/payments', { method: 'POST', body: '{}', headers: { origin: 'https://payments.test', 'content-type': 'application/json', 'stripe-signature': 't=1,v1=00' } }), ctx());
    expect(hook.status).toBe(400); // refused by its signature check, not by origin
  });
});

describe('every state-changing route goes through route() and its origin check', () => {
  const OWN_RULES: Record<string, string> = {
    'app/api/auth/[...nextauth]/route.ts': 'next-auth checks its own CSRF token on every POST',
  };
  const files: string[] = [];
  const walk = (dir: string) => {
    for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
      const p = path.join(dir, e.name);
      if (e.isDirectory()) walk(p);
      else if (e.name === 'route.ts') files.push(p);
    }
  };
  walk(path.resolve('app/api'));
  it.each(files.map((f) => path.relative(path.resolve('.'), f)))('%s', (file) => {
    if (OWN_RULES[file]) return;
    const src = fs.readFileSync(file, 'utf8');
    for (const m of src.matchAll(/export\s+(?:const\s+(POST|PUT|PATCH|DELETE)\s*=\s*(\w+)|async\s+function\s+(POST|PUT|PATCH|DELETE)\b)/g)) {
      const method = m[1] ?? m[3];
      // A plain function must wrap its body in route(...) itself (the scoring route does, to add CORS headers).
      if (m[2]) expect(m[2], `${method} in ${file}`).toBe('route');
      else expect(src, `${method} in ${file}`).toMatch(/route<[^>]*>\(|route\(/);
    }
  });
});
