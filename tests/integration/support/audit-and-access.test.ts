import fs from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { GET as auditRoute } from '@/app/api/support/audit/route';
import { GET as searchRoute } from '@/app/api/support/calculators/route';
import type { AuditPage } from '@/lib/support';
import { AuditEvent, Dataset } from '@/models';
import { makeRequest } from '../../helpers/auth';
import { staffUser, workspaceWithOwner } from './fixtures';

let staffId: number;
let owner: { id: number };
let member: { id: number };
let workspaceId: number;
let otherWorkspaceId: number;
let datasetId: number;
const noParams = { params: Promise.resolve({}) };

async function audit(query: string) {
  const res = await auditRoute(await makeRequest(`/api/support/audit${query}`, { userId: staffId }), noParams);
  return { status: res.status, body: (await res.json()) as AuditPage & { error?: { issues: { field: string }[] } } };
}

beforeAll(async () => {
  staffId = (await staffUser('desk@partwise.test')).id;
  const a = await workspaceWithOwner({ name: 'Ridge Riders', slug: 'ridge-riders' });
  const b = await workspaceWithOwner({ name: 'Coast Cruisers', slug: 'coast' });
  owner = a.owner;
  member = a.member;
  workspaceId = a.workspace.id;
  otherWorkspaceId = b.workspace.id;
  datasetId = (await Dataset.create({ workspaceId, createdById: owner.id, name: 'Rides', originalFilename: 'r.csv', originalCsv: Buffer.from('a\n1\n'), columns: [], cells: [], rowCount: 1 })).id;
  const at = (d: string) => new Date(`${d}T12:00:00Z`);
  const rows = [
    { action: 'auth.signin_failed', actorEmail: 'someone@ridge.example', workspaceId: null, createdAt: at('2026-11-01') },
    { action: 'embed.publish', actorEmail: 'maren@ridge.example', workspaceId, createdAt: at('2026-11-02') },
    { action: 'embed.rotate_token', actorEmail: 'maren@ridge.example', workspaceId, createdAt: at('2026-11-03') },
    { action: 'support.embed_disabled', actorEmail: 'desk@partwise.test', workspaceId, createdAt: at('2026-11-04') },
    { action: 'support.embed_enabled', actorEmail: 'desk@partwise.test', workspaceId, createdAt: at('2026-11-05') },
    { action: 'billing.plan_changed', actorEmail: null, workspaceId: otherWorkspaceId, createdAt: at('2026-11-05') },
    { action: 'webhook.processed', actorEmail: null, workspaceId: otherWorkspaceId, createdAt: at('2026-11-06') },
  ];
  for (const r of rows) await AuditEvent.create({ ...r, address: '192.0.2.1', detail: {} });
  for (let i = 0; i < 55; i++) await AuditEvent.create({ action: 'team.role_changed', actorEmail: 'maren@ridge.example', workspaceId, createdAt: at('2026-11-07'), address: '192.0.2.1', detail: { i } });
});

describe('audit log viewer', () => {
  it('lists everything newest first, paged on the server, with the workspace named', async () => {
    const first = await audit('?pageSize=50');
    expect(first.body.total).toBe(62);
    expect(first.body.pageCount).toBe(2);
    expect(first.body.events).toHaveLength(50);
    expect(first.body.events[0]).toMatchObject({ action: 'team.role_changed', workspaceName: 'Ridge Riders', address: '192.0.2.1' });
    const second = await audit('?pageSize=50&page=2');
    expect(second.body.events).toHaveLength(12);
    expect(second.body.events.at(-1)!.action).toBe('auth.signin_failed');
    expect(first.body.actions).toEqual(['auth.signin_failed', 'billing.plan_changed', 'embed.publish', 'embed.rotate_token', 'support.embed_disabled', 'support.embed_enabled', 'team.role_changed', 'webhook.processed']);
  });

  it('filters by exact action or by a prefix', async () => {
    expect((await audit('?action=embed.publish')).body.total).toBe(1);
    expect((await audit('?action=support.')).body.events.map((e) => e.action)).toEqual(['support.embed_enabled', 'support.embed_disabled']);
    expect((await audit('?action=embed*')).body.total).toBe(2);
  });

  it('filters by actor e-mail, workspace (name, slug or id) and UTC date range', async () => {
    expect((await audit('?actor=desk@')).body.total).toBe(2);
    expect((await audit('?workspace=coast')).body.events.map((e) => e.action)).toEqual(['webhook.processed', 'billing.plan_changed']);
    expect((await audit(`?workspace=${otherWorkspaceId}`)).body.total).toBe(2);
    expect((await audit('?workspace=ridge%20riders&from=2026-11-03&to=2026-11-05')).body.events.map((e) => e.action)).toEqual(['support.embed_enabled', 'support.embed_disabled', 'embed.rotate_token']);
    expect((await audit('?from=2026-11-05&to=2026-11-05')).body.total).toBe(2);
    expect((await audit('?workspace=nobody-has-this')).body.total).toBe(0);
  });

  it('refuses bad filters with the field named', async () => {
    const r1 = await audit('?from=yesterday');
    expect(r1.status).toBe(422);
    expect(r1.body.error!.issues[0].field).toBe('from');
    const r2 = await audit('?from=2026-11-05&to=2026-11-01');
    expect(r2.status).toBe(422);
    expect(r2.body.error!.issues[0].field).toBe('from');
  });
});

describe('who may use support, and what staff may not do', () => {
  it('members, owners and visitors cannot reach support routes', async () => {
    for (const [userId, status] of [[owner.id, 403], [member.id, 403], [undefined, 401]] as const) {
      expect((await searchRoute(await makeRequest('/api/support/calculators', { userId, workspaceId }), noParams)).status).toBe(status);
      expect((await auditRoute(await makeRequest('/api/support/audit', { userId, workspaceId }), noParams)).status).toBe(status);
    }
  });

  it('staff cannot read datasets nor change billing, even naming the workspace', async () => {
    const calls: { file: string; method: string; url: string; params?: Record<string, string>; json?: unknown }[] = [
      { file: 'app/api/datasets/route.ts', method: 'GET', url: '/api/datasets' },
      { file: 'app/api/datasets/[id]/route.ts', method: 'GET', url: `/api/datasets/${datasetId}`, params: { id: String(datasetId) } },
      { file: 'app/api/models/[id]/download/route.ts', method: 'GET', url: '/api/models/1/download', params: { id: '1' } },
      { file: 'app/api/billing/plan/route.ts', method: 'POST', url: '/api/billing/plan', json: { plan: 'lab' } },
      { file: 'app/api/billing/checkout/route.ts', method: 'POST', url: '/api/billing/checkout', json: { plan: 'lab' } },
      { file: 'app/api/billing/cancel/route.ts', method: 'POST', url: '/api/billing/cancel', json: {} },
      { file: 'app/api/billing/invoices/route.ts', method: 'GET', url: '/api/billing/invoices' },
    ];
    const present = calls.filter((c) => fs.existsSync(c.file));
    // The dataset routes are always there; billing routes are checked whenever they exist.
    expect(present.map((c) => c.file)).toContain('app/api/datasets/[id]/route.ts');
    for (const c of present) {
      const mod = await import(path.resolve(c.file));
      const res = await mod[c.method](await makeRequest(c.url, { method: c.method, userId: staffId, workspaceId, json: c.json }), { params: Promise.resolve(c.params ?? {}) });
      expect(res.status, `${c.method} ${c.url}`).toBe(403);
    }
  });
});
