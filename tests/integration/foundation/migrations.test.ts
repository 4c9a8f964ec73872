import { afterAll, describe, expect, it } from 'vitest';
import { createMigrator, migrationFiles, migrationState } from '@/lib/db/migrator';
import { databaseDialect, openSequelize } from '@/models/db';
import { emptyDatabase } from '../../helpers/databases';

/**
 * Every migration, up and down, on the project's dialect: a SQLite file in
 * `integration`, a PostgreSQL database in `integration-pg` (tests/unit/db covers
 * SQLite's own pragmas).
 */
const opened: { close(): Promise<void> }[] = [];
afterAll(async () => {
  while (opened.length) await opened.pop()!.close();
});

async function tables(sequelize: ReturnType<typeof openSequelize>): Promise<string[]> {
  const names = (await sequelize.getQueryInterface().showAllTables()) as unknown[];
  return names.map((n) => (typeof n === 'string' ? n : String((n as { tableName: string }).tableName))).filter((n) => !n.startsWith('sqlite_')).sort();
}

describe('migrations on this dialect', () => {
  it('apply on an empty database, state reads pending before the first, revert to nothing, apply again', async () => {
    const location = await emptyDatabase();
    expect(databaseDialect(location)).toBe(process.env.PARTWISE_TEST_DIALECT === 'postgres' ? 'postgres' : 'sqlite');
    const sequelize = openSequelize(location);
    opened.push(sequelize);
    expect(sequelize.getDialect()).toBe(databaseDialect(location));
    // No storage table yet: everything is pending, nothing throws.
    expect((await migrationState(sequelize)).pending).toEqual(migrationFiles());

    const migrator = createMigrator(sequelize);
    expect((await migrator.up()).map((m) => m.name)).toEqual(migrationFiles());
    const afterUp = await tables(sequelize);
    for (const table of ['users', 'workspaces', 'memberships', 'datasets', 'fits', 'mixture_models', 'model_versions', 'embeds', 'usage_counters', 'usage_alerts', 'subscriptions', 'invoices', 'abuse_reports', 'audit_events', 'mail_outbox', 'webhook_events']) {
      expect(afterUp).toContain(table);
    }
    expect((await migrationState(sequelize)).upToDate).toBe(true);

    await migrator.down({ to: 0 });
    expect(await tables(sequelize)).toEqual(['schema_migrations']);
    expect((await migrationState(sequelize)).pending).toEqual(migrationFiles());

    await migrator.up();
    expect(await tables(sequelize)).toEqual(afterUp);
  });
});
