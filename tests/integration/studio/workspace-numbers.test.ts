/**
 * Datasets and fits are numbered within their workspace: a new workspace's first fit is
 * Fit 1 whatever other workspaces did, numbers are taken with the insert, and the
 * migration numbered rows that existed before it.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import { POST as uploadRoute } from '@/app/api/datasets/route';
import { POST as startFit } from '@/app/api/fits/route';
import { GET as pollRoute } from '@/app/api/fits/[id]/route';
import { createMigrator } from '@/lib/db/migrator';
import { openSequelize } from '@/models/db';
import { Dataset, Fit, Membership, User, Workspace } from '@/models';
import { makeRequest } from '../../helpers/auth';
import { emptyDatabase } from '../../helpers/databases';
import { csvForm, studioWorld } from './helpers';

const none = { params: Promise.resolve({}) };
const csv = ['speed,distance', ...Array.from({ length: 40 }, (_, i) => `${20 + (i % 9) + (i % 2) * 6},${60 + i * 4}`)].join('\n') + '\n';

let w: Awaited<ReturnType<typeof studioWorld>>;
beforeAll(async () => {
  w = await studioWorld();
});

async function upload(userId: number, workspaceId: number) {
  const res = await uploadRoute(await makeRequest('/api/datasets', { method: 'POST', userId, workspaceId, body: csvForm(csv, 'rides.csv') }), none);
  expect(res.status).toBe(201);
  return (await res.json()).dataset as { id: number; number: number };
}

async function fit(userId: number, workspaceId: number, datasetId: number) {
  const res = await startFit(await makeRequest('/api/fits', { method: 'POST', userId, workspaceId, json: { datasetId, features: ['speed', 'distance'], minComponents: 1, maxComponents: 2, covariances: ['diagonal'], restarts: 1 } }), none);
  expect(res.status).toBe(202);
  return (await res.json()).fit as { id: number; number: number };
}

describe('numbers within a workspace', () => {
  it("a new workspace's first dataset and fit are number 1, whatever other workspaces hold", async () => {
    const a1 = await upload(w.member.id, w.workspace.id);
    const a2 = await upload(w.member.id, w.workspace.id);
    const f1 = await fit(w.member.id, w.workspace.id, a1.id);
    const f2 = await fit(w.member.id, w.workspace.id, a2.id);
    const f3 = await fit(w.member.id, w.workspace.id, a2.id);
    expect([a1.number, a2.number]).toEqual([1, 2]);
    expect([f1.number, f2.number, f3.number]).toEqual([1, 2, 3]);

    // Someone new signs up: their workspace starts at 1, though ids are global.
    const newcomer = await User.create({ email: 'new@numbers.test', name: 'New', passwordHash: 'unused', emailVerifiedAt: new Date() });
    const fresh = await Workspace.create({ name: 'Fresh', slug: 'fresh-numbers' });
    await Membership.create({ userId: newcomer.id, workspaceId: fresh.id, role: 'owner' });
    const d = await upload(newcomer.id, fresh.id);
    const f = await fit(newcomer.id, fresh.id, d.id);
    expect(d.number).toBe(1);
    expect(f.number).toBe(1);
    expect(f.id).toBeGreaterThan(f3.id);

    // The poll route (what the fit page reads) carries the number too.
    const polled = await (await pollRoute(await makeRequest(`/api/fits/${f.id}`, { userId: newcomer.id, workspaceId: fresh.id }), { params: Promise.resolve({ id: String(f.id) }) })).json();
    expect(polled.fit.number).toBe(1);
  });

  it('uploads at the same moment get distinct numbers', async () => {
    const before = await Dataset.count({ where: { workspaceId: w.workspace.id } });
    const made = await Promise.all(Array.from({ length: 8 }, () => upload(w.member.id, w.workspace.id)));
    expect(made.map((d) => d.number).sort((x, y) => x - y)).toEqual([1, 2, 3, 4, 5, 6, 7, 8].map((n) => n + before));
    const stored = await Dataset.findAll({ where: { workspaceId: w.workspace.id }, attributes: ['number'] });
    expect(new Set(stored.map((d) => d.number)).size).toBe(stored.length);
  });

  it('the database refuses a repeated number in one workspace', async () => {
    const existing = await Fit.findOne({ where: { workspaceId: w.workspace.id }, order: [['id', 'ASC']] });
    await expect(Fit.create({ workspaceId: w.workspace.id, datasetId: existing!.datasetId, number: existing!.number, status: 'failed', params: {} })).rejects.toThrow();
  });

  it('the migration numbers existing rows per workspace, in order of creation, and reverts', async () => {
    const db = openSequelize(await emptyDatabase());
    try {
      const migrator = createMigrator(db);
      await migrator.up({ to: '20261202000006-support-indexes.ts' });
      const now = new Date().toISOString();
      await db.query(`INSERT INTO workspaces (id, name, slug, created_at, updated_at) VALUES (1, 'A', 'a', '${now}', '${now}'), (2, 'B', 'b', '${now}', '${now}')`);
      // Interleaved ids across two workspaces, as a shared sequence leaves them.
      for (const [id, ws] of [[1, 1], [2, 2], [3, 1], [4, 2], [5, 2]]) {
        // A one-byte blob and false as bound values: their literals differ between SQLite and PostgreSQL.
        await db.query(`INSERT INTO datasets (id, workspace_id, name, original_filename, original_csv, columns, cells, row_count, created_at, updated_at) VALUES (${id}, ${ws}, 'd', 'd.csv', ?, '[]', '[]', 0, '${now}', '${now}')`, { replacements: [Buffer.from([0])] });
        await db.query(`INSERT INTO fits (id, workspace_id, dataset_id, status, params, cancel_requested, created_at, updated_at) VALUES (${id}, ${ws}, ${id}, 'failed', '{}', ?, '${now}', '${now}')`, { replacements: [false] });
      }
      await migrator.up();
      for (const table of ['datasets', 'fits']) {
        const rows = await db.query<{ id: number; number: number }>(`SELECT id, number FROM ${table} ORDER BY id`, { type: QueryTypes.SELECT });
        expect(rows.map((r) => r.number)).toEqual([1, 1, 2, 2, 3]);
      }
      await migrator.down({ to: '20261202100008-workspace-numbers.ts' });
      const columns = Object.keys(await db.getQueryInterface().describeTable('fits'));
      expect(columns).toContain('dataset_id');
      expect(columns).not.toContain('number');
    } finally {
      await db.close();
    }
  });
});
