import { afterEach, describe, expect, it } from 'vitest';
import { GET } from '@/app/api/health/route';
import { registerHealthCheck } from '@/lib/health';
import { closeRedis } from '@/lib/shared/redis';
import { testRedisUrl } from '../../helpers/redis';

const call = () => GET(new Request('http://localhost/api/health'), { params: Promise.resolve({}) });

describe('GET /api/health', () => {
  it('answers 200 with a reachable, migrated database', async () => {
    const response = await call();
    expect(response.status).toBe(200);
    const body = await response.json();
    expect(body).toMatchObject({ ok: true, status: 'ok', database: { ok: true, reachable: true }, migrations: { upToDate: true, pending: [] } });
    // Not configured here: reported as absent, not as failing.
    expect(body.redis).toBeNull();
    expect(body.queue).toBeNull();
  });

  it('answers 503 when the database cannot be opened, without leaking the path', async () => {
    const saved = process.env.DATABASE_URL;
    process.env.DATABASE_URL = '/dev/null/partwise/db.sqlite';
    try {
      const response = await call();
      expect(response.status).toBe(503);
      const body = await response.json();
      expect(body.ok).toBe(false);
      expect(body.status).toBe('failing');
      expect(body.database).toMatchObject({ ok: false, reachable: false });
      expect(JSON.stringify(body)).not.toContain('/dev/null');
    } finally {
      process.env.DATABASE_URL = saved;
    }
  });

  it('answers 503 while a migration is pending', async () => {
    const { getSequelize } = await import('@/models/db');
    const sequelize = getSequelize();
    const [rows] = await sequelize.query('SELECT name FROM schema_migrations ORDER BY name DESC LIMIT 1');
    const last = (rows as { name: string }[])[0].name;
    await sequelize.query('DELETE FROM schema_migrations WHERE name = ?', { replacements: [last] });
    try {
      const response = await call();
      expect(response.status).toBe(503);
      expect((await response.json()).migrations.pending).toEqual([last]);
    } finally {
      await sequelize.query('INSERT INTO schema_migrations (name) VALUES (?)', { replacements: [last] });
    }
  });

  describe('the parts a deployment adds', () => {
    afterEach(async () => {
      registerHealthCheck('queue', null);
      delete process.env.REDIS_URL;
      await closeRedis();
    });

    it('reports the queue through the hook the queue registers, and fails with it', async () => {
      registerHealthCheck('queue', async () => ({ ok: true, waiting: 3 }));
      let body = await (await call()).json();
      expect(body).toMatchObject({ ok: true, queue: { ok: true, waiting: 3 } });
      registerHealthCheck('queue', async () => {
        throw new Error('queue tables missing');
      });
      const response = await call();
      expect(response.status).toBe(503);
      body = await response.json();
      expect(body).toMatchObject({ ok: false, status: 'failing', database: { ok: true }, queue: { ok: false } });
      expect(body.queue.error).toContain('queue tables missing');
    });

    it('reports Redis separately: up on the test Redis, down on a closed port', async () => {
      process.env.REDIS_URL = testRedisUrl();
      let response = await call();
      expect(response.status).toBe(200);
      expect((await response.json()).redis).toMatchObject({ ok: true });
      await closeRedis();
      process.env.REDIS_URL = 'redis://127.0.0.1:1';
      response = await call();
      expect(response.status).toBe(503);
      const body = await response.json();
      expect(body).toMatchObject({ ok: false, database: { ok: true }, redis: { ok: false, error: 'Redis cannot be reached' } });
    });
  });
});
