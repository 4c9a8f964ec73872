import { DataTypes } from 'sequelize';
import type { MigrationContext } from '@/lib/db/migrator';

/**
 * Usage alerts already sent: one row per workspace, month and threshold (80, 100),
 * so the owner hears about each threshold once per period however many answers
 * cross it at the same moment.
 */
export async function up({ context }: { context: MigrationContext }) {
  const q = context.queryInterface;
  await q.createTable('usage_alerts', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true, allowNull: false },
    workspace_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'workspaces', key: 'id' }, onDelete: 'CASCADE' },
    period: { type: DataTypes.STRING(16), allowNull: false },
    threshold: { type: DataTypes.INTEGER, allowNull: false },
    used: { type: DataTypes.INTEGER, allowNull: false },
    answer_limit: { type: DataTypes.INTEGER, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('usage_alerts', ['workspace_id', 'period', 'threshold'], { unique: true, name: 'usage_alerts_once' });
}

export async function down({ context }: { context: MigrationContext }) {
  await context.queryInterface.dropTable('usage_alerts');
}
