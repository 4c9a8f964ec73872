import { beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import { GET as listKeysRoute, POST as createKeyRoute } from '@/app/api/workspaces/current/api-keys/route';
import { DELETE as revokeKeyRoute } from '@/app/api/workspaces/current/api-keys/[id]/route';
import { GET as usageRoute } from '@/app/api/v1/usage/route';
import { POST as fitsRoute } from '@/app/api/v1/fits/route';
import { generateApiKey, hashApiKey, LAST_USED_RESOLUTION_MS } from '@/lib/auth/api-keys';
import { actionLabel, detailSummary } from '@/lib/support/audit-words';
import { ApiKey, AuditEvent, sequelize, Workspace } from '@/models';
import { makeRequest } from '../../helpers/auth';
import { studioWorld } from '../studio/helpers';
import { ctx, keyFor, keyRequest } from './helpers';

let w: Awaited<ReturnType<typeof studioWorld>>;
beforeAll(async () => {
  w = await studioWorld();
});

async function make(body: unknown, userId = w.owner.id) {
  const res = await createKeyRoute(await makeRequest('/api/workspaces/current/api-keys', { method: 'POST', userId, json: body }), ctx());
  return { status: res.status, json: (await res.json()) as any };
}
const usage = (secret: string | null, headers: Record<string, string> = {}) => usageRoute(keyRequest('/api/v1/usage', secret, { headers }), ctx());
const uses = (keyId: number) => AuditEvent.count({ where: { action: 'api_key.use', targetId: String(keyId) } });

describe('making, listing and revoking keys (owners only)', () => {
  it('shows the whole key once and stores only its prefix and SHA-256', async () => {
    const { status, json } = await make({ name: 'Nightly re-fit', scopes: ['read', 'fit'], expiresInDays: 90 });
    expect(status).toBe(201);
    const secret: string = json.secret;
    expect(secret).toMatch(/^pwk_[0-9A-Za-z]{10}_[0-9A-Za-z]{40}$/);
    expect(json.key).toMatchObject({ name: 'Nightly re-fit', scopes: ['read', 'fit'], prefix: secret.slice(0, 14) });
    expect(JSON.stringify(json.key)).not.toContain(secret.slice(15));

    // Every column of the stored row: the secret part appears nowhere, the hash is SHA-256 of the whole key.
    const [row] = await sequelize.query<Record<string, unknown>>('SELECT * FROM api_keys WHERE id = ?', { replacements: [json.key.id], type: QueryTypes.SELECT });
    const secretPart = secret.slice(15);
    for (const [column, value] of Object.entries(row)) expect(String(value), column).not.toContain(secretPart);
    expect(row.secret_hash).toBe(hashApiKey(secret));
    expect(row.prefix).toBe(secret.slice(4, 14));
    expect(new Date(String(row.expires_at)).getTime()).toBeGreaterThan(Date.now() + 89 * 86_400_000);

    const list = await listKeysRoute(await makeRequest('/api/workspaces/current/api-keys', { userId: w.owner.id }), ctx());
    expect(list.status).toBe(200);
    const text = await list.text();
    expect(text).not.toContain(secretPart);
    expect(text).not.toContain(String(row.secret_hash));
    expect(JSON.parse(text).keys.map((k: { name: string }) => k.name)).toContain('Nightly re-fit');

    const audit = await AuditEvent.findOne({ where: { action: 'api_key.create', targetId: String(json.key.id) } });
    expect(audit?.actorEmail).toBe(w.owner.email);
    expect(actionLabel('api_key.create')).toBe('API key made');
    expect(detailSummary(audit!.detail)).toContain('Scopes: read, fit');
  });

  it('refuses members, visitors and bad bodies, naming the field, and writes nothing', async () => {
    const before = await ApiKey.count();
    expect((await make({ name: 'x', scopes: ['read'] }, w.member.id)).status).toBe(403);
    const visitor = await createKeyRoute(await makeRequest('/api/workspaces/current/api-keys', { method: 'POST', json: { name: 'x', scopes: ['read'] } }), ctx());
    expect(visitor.status).toBe(401);
    for (const [body, field] of [
      [{ name: 'x', scopes: [] }, 'scopes'],
      [{ name: 'x', scopes: ['root'] }, 'scopes.0'],
      [{ name: '', scopes: ['read'] }, 'name'],
      [{ name: 'x', scopes: ['read'], expiresInDays: 731 }, 'expiresInDays'],
      [{ name: 'x', scopes: ['read'], expiresInDays: '30' }, 'expiresInDays'],
      [{ name: 'x', scopes: ['read'], admin: true }, 'admin'],
    ] as const) {
      const { status, json } = await make(body);
      expect(status, JSON.stringify(body)).toBe(422);
      expect(json.error.issues.map((i: { field: string }) => i.field)).toContain(field);
    }
    expect(await ApiKey.count()).toBe(before);
    const memberList = await listKeysRoute(await makeRequest('/api/workspaces/current/api-keys', { userId: w.member.id }), ctx());
    expect(memberList.status).toBe(403);
  });
});

describe('requireApiKey on a v1 route', () => {
  it('accepts the key, records last use at most once a minute and audits every use with method and path', async () => {
    const key = await keyFor(w.owner, w.workspace.id, ['read'], { name: 'Reader' });
    expect((await ApiKey.findByPk(key.id))!.lastUsedAt).toBeNull();
    const res = await usage(key.secret);
    expect(res.status).toBe(200);
    const first = (await ApiKey.findByPk(key.id))!.lastUsedAt;
    expect(first).toBeInstanceOf(Date);
    expect((await usage(key.secret)).status).toBe(200);
    expect((await ApiKey.findByPk(key.id))!.lastUsedAt!.getTime()).toBe(first!.getTime());
    expect(await uses(key.id)).toBe(2);
    const audit = await AuditEvent.findOne({ where: { action: 'api_key.use', targetId: String(key.id) } });
    expect(audit).toMatchObject({ actorUserId: null, actorEmail: `API key "Reader" (${key.prefix})`, workspaceId: w.workspace.id });
    expect(audit!.detail).toMatchObject({ method: 'GET', path: '/api/v1/usage', scope: 'read' });
    expect(detailSummary(audit!.detail)).toContain('Address: /api/v1/usage');

    // Older than the resolution: the next use moves it.
    const old = new Date(Date.now() - LAST_USED_RESOLUTION_MS - 1000);
    await ApiKey.update({ lastUsedAt: old }, { where: { id: key.id } });
    await usage(key.secret);
    expect((await ApiKey.findByPk(key.id))!.lastUsedAt!.getTime()).toBeGreaterThan(old.getTime());
  });

  it('answers 401 without a bearer key, also to a signed-in session cookie, and to unknown or altered keys', async () => {
    const none = await usage(null);
    expect(none.status).toBe(401);
    expect(none.headers.get('www-authenticate')).toMatch(/^Bearer/);
    const cookie = await makeRequest('/api/v1/usage', { userId: w.owner.id, workspaceId: w.workspace.id });
    const withCookie = await usageRoute(cookie, ctx());
    expect(withCookie.status).toBe(401);
    expect((await withCookie.json()).error.message).toMatch(/not a signed-in session/);

    const key = await keyFor(w.owner, w.workspace.id, ['read']);
    const unknown = generateApiKey().key;
    const altered = key.secret.slice(0, -1) + (key.secret.endsWith('a') ? 'b' : 'a');
    for (const bad of [unknown, altered]) {
      const res = await usage(bad);
      expect(res.status).toBe(401);
      expect((await res.json()).error.message).toMatch(/not known/);
    }
    for (const header of ['Basic abc', 'Bearer', `Bearer not-a-key`, key.secret]) {
      const res = await usageRoute(new Request('http://localhost:3000/api/v1/usage', { headers: { authorization: header } }), ctx());
      expect(res.status, header).toBe(401);
    }
    expect(await uses(key.id)).toBe(0);
  });

  it('refuses a revoked key (401, saying so) from the next call on, and audits the refusal', async () => {
    const key = await keyFor(w.owner, w.workspace.id, ['read'], { name: 'Soon revoked' });
    expect((await usage(key.secret)).status).toBe(200);
    const member = await revokeKeyRoute(await makeRequest(`/api/workspaces/current/api-keys/${key.id}`, { method: 'DELETE', userId: w.member.id }), ctx({ id: String(key.id) }));
    expect(member.status).toBe(403);
    const outsider = await revokeKeyRoute(await makeRequest(`/api/workspaces/current/api-keys/${key.id}`, { method: 'DELETE', userId: w.outsider.id }), ctx({ id: String(key.id) }));
    expect(outsider.status).toBe(404);
    expect((await usage(key.secret)).status).toBe(200);
    const revoked = await revokeKeyRoute(await makeRequest(`/api/workspaces/current/api-keys/${key.id}`, { method: 'DELETE', userId: w.owner.id }), ctx({ id: String(key.id) }));
    expect(revoked.status).toBe(200);
    expect((await revoked.json()).key.revokedAt).toBeTruthy();
    const res = await usage(key.secret);
    expect(res.status).toBe(401);
    expect((await res.json()).error.message).toMatch(/revoked/);
    expect(await uses(key.id)).toBe(2);
    expect(await AuditEvent.count({ where: { action: 'api_key.refused', targetId: String(key.id) } })).toBe(1);
    expect(await AuditEvent.count({ where: { action: 'api_key.revoke', targetId: String(key.id) } })).toBe(1);
  });

  it('refuses an expired key with 401 that says so', async () => {
    const key = await keyFor(w.owner, w.workspace.id, ['read'], { expiresInDays: 1 });
    expect((await usage(key.secret)).status).toBe(200);
    await ApiKey.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { id: key.id } });
    const res = await usage(key.secret);
    expect(res.status).toBe(401);
    expect((await res.json()).error.message).toMatch(/expired/);
  });

  it('refuses a key without the scope (403 naming it) and writes nothing', async () => {
    const key = await keyFor(w.owner, w.workspace.id, ['read']);
    const res = await fitsRoute(keyRequest('/api/v1/fits', key.secret, { json: { datasetId: 1, features: ['a'] } }), ctx());
    expect(res.status).toBe(403);
    expect((await res.json()).error.message).toMatch(/lacks the "fit" scope/);
    expect(await uses(key.id)).toBe(0);
  });

  it('refuses the keys of a suspended workspace (403)', async () => {
    const key = await keyFor(w.outsider, w.other.id, ['read']);
    expect((await usage(key.secret)).status).toBe(200);
    await Workspace.update({ suspendedAt: new Date(), suspendedReason: 'test' }, { where: { id: w.other.id } });
    expect((await usage(key.secret)).status).toBe(403);
    await Workspace.update({ suspendedAt: null, suspendedReason: null }, { where: { id: w.other.id } });
  });
});
