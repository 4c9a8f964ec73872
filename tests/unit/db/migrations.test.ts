import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import { openSequelize } from '@/models/db';
import { createMigrator, migrationFiles, migrationState } from '@/lib/db/migrator';

const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'partwise-migrate-'));
const opened: { close(): Promise<void> }[] = [];
afterEach(async () => {
  while (opened.length) await opened.pop()!.close();
});

async function tableNames(sequelize: ReturnType<typeof openSequelize>) {
  const [rows] = await sequelize.query("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%'");
  return (rows as { name: string }[]).map((r) => r.name).sort();
}

describe('migrations', () => {
  it('apply on an empty file, then revert to nothing, then apply again', async () => {
    const sequelize = openSequelize(path.join(tmp, 'roundtrip.sqlite'));
    opened.push(sequelize);
    const migrator = createMigrator(sequelize);

    const applied = await migrator.up();
    expect(applied.map((m) => m.name)).toEqual(migrationFiles());
    const afterUp = await tableNames(sequelize);
    for (const table of ['users', 'workspaces', 'memberships', 'datasets', 'fits', 'mixture_models', 'model_versions', 'embeds', 'usage_counters', 'subscriptions', 'invoices', 'abuse_reports', 'audit_events']) {
      expect(afterUp).toContain(table);
    }
    expect((await migrationState(sequelize)).upToDate).toBe(true);

    await migrator.down({ to: 0 });
    expect(await tableNames(sequelize)).toEqual(['schema_migrations']);
    const state = await migrationState(sequelize);
    expect(state.pending).toEqual(migrationFiles());
    expect(state.upToDate).toBe(false);

    await migrator.up();
    expect(await tableNames(sequelize)).toEqual(afterUp);
  });

  it('uses WAL journaling and a busy timeout on every connection', async () => {
    const sequelize = openSequelize(path.join(tmp, 'wal.sqlite'));
    opened.push(sequelize);
    await createMigrator(sequelize).up();
    const pragma = async (name: string) => {
      const rows = await sequelize.query<Record<string, unknown>>(`PRAGMA ${name}`, { type: QueryTypes.SELECT });
      return Object.values(rows[0])[0];
    };
    expect(await pragma('journal_mode')).toBe('wal');
    expect(Number(await pragma('busy_timeout'))).toBeGreaterThanOrEqual(1000);
    expect(Number(await pragma('foreign_keys'))).toBe(1);
  });

  it('migration names are timestamped and every file exports up and down', async () => {
    for (const file of migrationFiles()) {
      expect(file).toMatch(/^\d{14}-[a-z0-9-]+\.ts$/);
      const mod = await import(path.resolve('migrations', file));
      expect(typeof mod.up).toBe('function');
      expect(typeof mod.down).toBe('function');
    }
  });
});
