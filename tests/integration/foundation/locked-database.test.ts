import { describe, expect, it } from 'vitest';
import sqlite3 from 'sqlite3';
import { AuditEvent } from '@/models';
import { databasePath } from '@/models/db';
import { route } from '@/lib/http/handler';

/** Another process holding the write lock: a second sqlite3 handle with BEGIN EXCLUSIVE. */
async function holdWriteLock(ms: number): Promise<void> {
  const db = await new Promise<sqlite3.Database>((resolve, reject) => {
    const d = new sqlite3.Database(databasePath(), (e) => (e ? reject(e) : resolve(d)));
  });
  await new Promise<void>((resolve, reject) => db.exec('BEGIN EXCLUSIVE', (e) => (e ? reject(e) : resolve())));
  setTimeout(() => db.exec('COMMIT', () => db.close()), ms);
}

// A handler that writes one row, wrapped like every route handler.
const write = route(async () => {
  const row = await AuditEvent.create({ action: 'locked.write' });
  return Response.json({ id: row.id }, { status: 201 });
});
const call = () => write(new Request('http://localhost/x', { method: 'POST' }), { params: Promise.resolve({}) });

describe('database locked by another writer', () => {
  it('a request waits for a short lock and then succeeds', async () => {
    await holdWriteLock(400);
    const started = Date.now();
    const response = await call();
    expect(response.status).toBe(201);
    expect(Date.now() - started).toBeGreaterThanOrEqual(300);
    expect(await AuditEvent.count({ where: { action: 'locked.write' } })).toBe(1);
  });

  it('a lock held past the busy timeout gives 503 with Retry-After, and no row is half-written', async () => {
    const before = await AuditEvent.count();
    await holdWriteLock(Number(process.env.DB_BUSY_TIMEOUT_MS ?? 5000) + 3000);
    const response = await call();
    expect(response.status).toBe(503);
    expect(response.headers.get('retry-after')).toBe('2');
    expect((await response.json()).error.code).toBe('unavailable');
    await new Promise((r) => setTimeout(r, 3500));
    expect(await AuditEvent.count()).toBe(before);
  }, 30_000);
});
