import { DataTypes } from 'sequelize';
import type { MigrationContext } from '@/lib/db/migrator';

/**
 * Workspace API keys for the REST API: the public prefix (unique, used to find the key)
 * and the SHA-256 of the whole key; never the key itself.
 */
export async function up({ context }: { context: MigrationContext }) {
  const q = context.queryInterface;
  await q.createTable('api_keys', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true, allowNull: false },
    workspace_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'workspaces', key: 'id' }, onDelete: 'CASCADE' },
    name: { type: DataTypes.STRING(120), allowNull: false },
    prefix: { type: DataTypes.STRING(16), allowNull: false },
    secret_hash: { type: DataTypes.STRING(64), allowNull: false },
    scopes: { type: DataTypes.JSON, allowNull: false },
    expires_at: { type: DataTypes.DATE, allowNull: true },
    last_used_at: { type: DataTypes.DATE, allowNull: true },
    revoked_at: { type: DataTypes.DATE, allowNull: true },
    created_by_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL' },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('api_keys', ['prefix'], { name: 'api_keys_prefix', unique: true });
  await q.addIndex('api_keys', ['workspace_id', 'created_at'], { name: 'api_keys_workspace' });
}

export async function down({ context }: { context: MigrationContext }) {
  await context.queryInterface.dropTable('api_keys');
}
