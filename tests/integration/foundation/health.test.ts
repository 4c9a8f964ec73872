import { describe, expect, it } from 'vitest';
import { GET } from '@/app/api/health/route';

const call = () => GET(new Request('http://localhost/api/health'), { params: Promise.resolve({}) });

describe('GET /api/health', () => {
  it('answers 200 with a reachable, migrated database', async () => {
    const response = await call();
    expect(response.status).toBe(200);
    const body = await response.json();
    expect(body).toMatchObject({ ok: true, database: { reachable: true }, migrations: { upToDate: true, pending: [] } });
  });

  it('answers 503 when the database cannot be opened, without leaking the path', async () => {
    const saved = process.env.DATABASE_URL;
    process.env.DATABASE_URL = '/dev/null/partwise/db.sqlite';
    try {
      const response = await call();
      expect(response.status).toBe(503);
      const body = await response.json();
      expect(body.ok).toBe(false);
      expect(body.database.reachable).toBe(false);
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
});
