import { DataTypes } from 'sequelize';
import type { MigrationContext } from '@/lib/db/migrator';

/**
 * Datasets and fits get a number of their own within their workspace (a new
 * workspace's first fit is Fit 1, whatever other workspaces did). Existing rows are
 * numbered in the order they were created; the unique index keeps numbers from
 * repeating. Ids stay as they are (addresses keep using them).
 */
const TABLES = ['datasets', 'fits'] as const;

export async function up({ context }: { context: MigrationContext }) {
  const q = context.queryInterface;
  for (const table of TABLES) {
    await q.addColumn(table, 'number', { type: DataTypes.INTEGER, allowNull: true });
    await context.sequelize.query(
      `UPDATE ${table} SET number = (SELECT n FROM (SELECT id, ROW_NUMBER() OVER (PARTITION BY workspace_id ORDER BY id) AS n FROM ${table}) AS ranked WHERE ranked.id = ${table}.id)`,
    );
    await q.addIndex(table, ['workspace_id', 'number'], { unique: true, name: `${table}_workspace_number` });
  }
}

export async function down({ context }: { context: MigrationContext }) {
  for (const table of TABLES) {
    await context.queryInterface.removeIndex(table, `${table}_workspace_number`);
    await context.sequelize.query(`ALTER TABLE ${table} DROP COLUMN number`);
  }
}
