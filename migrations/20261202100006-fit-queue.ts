import { DataTypes } from 'sequelize';
import type { MigrationContext } from '@/lib/db/migrator';

/**
 * Fair fit queue: when a fit last held a fitting slot (a workspace's latest orders the
 * round-robin between workspaces), and the candidates a paused fit has already fitted
 * so it resumes where it stopped. The index serves the per-workspace cap count.
 */
export async function up({ context }: { context: MigrationContext }) {
  const q = context.queryInterface;
  await q.addColumn('fits', 'last_turn_at', { type: DataTypes.DATE, allowNull: true });
  await q.addColumn('fits', 'checkpoint', { type: DataTypes.JSON, allowNull: true });
  await q.addIndex('fits', ['workspace_id', 'status'], { name: 'fits_workspace_status' });
}

export async function down({ context }: { context: MigrationContext }) {
  const q = context.queryInterface;
  await q.removeIndex('fits', 'fits_workspace_status');
  await q.removeColumn('fits', 'checkpoint');
  await q.removeColumn('fits', 'last_turn_at');
}
