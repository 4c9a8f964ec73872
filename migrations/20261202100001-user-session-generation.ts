import { DataTypes } from 'sequelize';
import type { MigrationContext } from '@/lib/db/migrator';

/**
 * Per-user session generation: every session cookie carries the generation it was
 * signed in under, and the guard refuses one that no longer matches. Signing out
 * everywhere, a password reset and a workspace suspension add one, which ends every
 * session of that person at once.
 */
export async function up({ context }: { context: MigrationContext }) {
  await context.queryInterface.addColumn('users', 'session_generation', { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 });
}

export async function down({ context }: { context: MigrationContext }) {
  // SQLite drops the column in place; a table rebuild would cascade into memberships.
  await context.queryInterface.sequelize.query('ALTER TABLE users DROP COLUMN session_generation');
}
