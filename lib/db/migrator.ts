import path from 'node:path';
import fs from 'node:fs';
import { pathToFileURL } from 'node:url';
import { Umzug, SequelizeStorage } from 'umzug';
import type { QueryInterface, Sequelize } from 'sequelize';

/**
 * The one migration runner: used by `npm run db:migrate`, by start-up and by tests.
 * Migrations are timestamped TypeScript files in migrations/, each with up and down.
 */
export interface MigrationContext {
  queryInterface: QueryInterface;
  sequelize: Sequelize;
}

export const MIGRATIONS_DIR = path.resolve(/*turbopackIgnore: true*/ process.cwd(), 'migrations');
const MIGRATION_FILE = /^\d{14}-[a-z0-9-]+\.ts$/;

export function migrationFiles(dir = MIGRATIONS_DIR): string[] {
  return fs.readdirSync(/*turbopackIgnore: true*/ dir).filter((f) => MIGRATION_FILE.test(f)).sort();
}

export function createMigrator(sequelize: Sequelize, dir = MIGRATIONS_DIR, quiet = true) {
  return new Umzug<MigrationContext>({
    migrations: migrationFiles(dir).map((file) => {
      const full = path.join(/*turbopackIgnore: true*/ dir, file);
      const load = () => import(pathToFileURL(full).href) as Promise<{ up: Fn; down: Fn }>;
      return {
        name: file,
        path: full,
        up: async (params) => (await load()).up(params),
        down: async (params) => (await load()).down(params),
      };
    }),
    context: { queryInterface: sequelize.getQueryInterface(), sequelize },
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
    logger: quiet ? undefined : console,
  });
}
type Fn = (p: { name: string; path?: string; context: MigrationContext }) => Promise<unknown>;

/**
 * Migration state without loading migration code, so the running Next server can
 * report it: files on disk versus rows in the storage table.
 */
export async function migrationState(sequelize: Sequelize, dir = MIGRATIONS_DIR) {
  const files = migrationFiles(dir);
  let applied: string[] = [];
  try {
    const [rows] = await sequelize.query('SELECT name FROM schema_migrations ORDER BY name');
    applied = (rows as { name: string }[]).map((r) => r.name);
  } catch (e) {
    // SQLite says "no such table", PostgreSQL 'relation "schema_migrations" does not exist'.
    if (!/no such table|relation "schema_migrations" does not exist/i.test(String((e as Error).message))) throw e;
  }
  const pending = files.filter((f) => !applied.includes(f));
  return { applied, pending, upToDate: pending.length === 0 };
}
