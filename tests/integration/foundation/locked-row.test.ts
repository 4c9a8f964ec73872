/**
 * PostgreSQL's counterpart of locked-database.test.ts: another connection holding a
 * workspace's row lock. A plan-limited write of that workspace waits for it (its
 * transaction takes the same lock first: lockWorkspace in models/db.ts), and gives a
 * 503 with Retry-After once the wait passes the busy timeout (lock_timeout), leaving
 * nothing half-written; another workspace's writes do not wait at all. Runs in the
 * integration-pg project only (vitest.config.mts): on SQLite the file lock is the test.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Sequelize, Transaction } from 'sequelize';
import { POST as publishRoute } from '@/app/api/embeds/route';
import { Embed } from '@/models';
import { openSequelize } from '@/models/db';
import { makeRequest } from '../../helpers/auth';
import { modelWorkspace } from '../embeds/fixtures';

const noParams = { params: Promise.resolve({}) };
let other: Sequelize;
let locked: Awaited<ReturnType<typeof modelWorkspace>>;
let free: Awaited<ReturnType<typeof modelWorkspace>>;

beforeAll(async () => {
  locked = await modelWorkspace({ plan: 'lab' });
  free = await modelWorkspace({ plan: 'lab' });
  other = openSequelize(process.env.DATABASE_URL!);
});
afterAll(() => other.close());

async function holdRowLock(workspaceId: number): Promise<Transaction> {
  const t = await other.transaction();
  await other.query('SELECT id FROM workspaces WHERE id = ? FOR UPDATE', { replacements: [workspaceId], transaction: t });
  return t;
}

async function publishIn(w: typeof locked, title: string) {
  return publishRoute(await makeRequest('/api/embeds', { userId: w.owner.id, workspaceId: w.workspace.id, json: { mixtureModelId: w.model.id, title } }), noParams);
}

describe('a workspace row locked by another connection (PostgreSQL)', () => {
  it('a publish waits for a short lock and then succeeds; another workspace publishes meanwhile', async () => {
    const t = await holdRowLock(locked.workspace.id);
    let released = false;
    const waiting = publishIn(locked, 'After the lock').then((r) => ({ r, afterRelease: released }));
    const elsewhere = await publishIn(free, 'Not waiting');
    expect(elsewhere.status).toBe(201);
    await new Promise((r) => setTimeout(r, 300));
    released = true;
    await t.commit();
    const { r, afterRelease } = await waiting;
    expect(r.status).toBe(201);
    // It could only finish once the lock was gone.
    expect(afterRelease).toBe(true);
  });

  it('a lock held past the busy timeout gives 503 with Retry-After, and no calculator is half-written', async () => {
    const before = await Embed.count({ where: { workspaceId: locked.workspace.id } });
    const t = await holdRowLock(locked.workspace.id);
    try {
      const response = await publishIn(locked, 'Never');
      expect(response.status).toBe(503);
      expect(response.headers.get('retry-after')).toBe('2');
      expect((await response.json()).error.code).toBe('unavailable');
    } finally {
      await t.rollback();
    }
    expect(await Embed.count({ where: { workspaceId: locked.workspace.id } })).toBe(before);
  }, 30_000);
});
