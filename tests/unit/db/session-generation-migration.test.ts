import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import { openSequelize } from '@/models/db';
import { createMigrator } from '@/lib/db/migrator';

const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'partwise-gen-'));
afterAll(() => fs.rmSync(tmp, { recursive: true, force: true }));

describe('migration 20261202100001-user-session-generation', () => {
  it('adds users.session_generation (0 for existing people), and its down keeps users and memberships', async () => {
    const sequelize = openSequelize(path.join(tmp, 'gen.sqlite'));
    try {
      const migrator = createMigrator(sequelize);
      await migrator.up({ to: '20261202000006-support-indexes.ts' });
      const now = new Date().toISOString();
      await sequelize.query(`INSERT INTO users (email, name, password_hash, is_staff, created_at, updated_at) VALUES ('kept@gen.test', 'Kept', 'x', 0, '${now}', '${now}')`);
      await sequelize.query(`INSERT INTO workspaces (name, slug, created_at, updated_at) VALUES ('Club', 'club', '${now}', '${now}')`);
      await sequelize.query(`INSERT INTO memberships (user_id, workspace_id, role, created_at, updated_at) VALUES (1, 1, 'owner', '${now}', '${now}')`);
      await migrator.up();
      const [row] = await sequelize.query<{ session_generation: number }>('SELECT session_generation FROM users', { type: QueryTypes.SELECT });
      expect(row.session_generation).toBe(0);
      await migrator.down({ to: '20261202100001-user-session-generation.ts' });
      const columns = await sequelize.query<{ name: string }>('PRAGMA table_info(users)', { type: QueryTypes.SELECT });
      expect(columns.map((c) => c.name)).not.toContain('session_generation');
      const [{ count }] = await sequelize.query<{ count: number }>('SELECT COUNT(*) AS count FROM memberships', { type: QueryTypes.SELECT });
      expect(count, 'dropping the column must not cascade into memberships').toBe(1);
    } finally {
      await sequelize.close();
    }
  });
});
