import { DataTypes } from 'sequelize';
import type { MigrationContext } from '@/lib/db/migrator';

/**
 * Answer insight (lib/insight): per published version the bins fixed at publish time and
 * the training data's counts on them; per calculator, version and UTC day the answer
 * counters (one row per counter, so concurrent flushes add up exactly); per member their
 * weekly-mail thresholds; and a switch per calculator (on for existing ones).
 * No table here has room for a visitor's value or address: only counts per bin.
 */
const ref = (table: string) => ({ type: DataTypes.INTEGER, allowNull: false, references: { model: table, key: 'id' }, onDelete: 'CASCADE' });

export async function up({ context }: { context: MigrationContext }) {
  const q = context.queryInterface;
  await q.addColumn('embeds', 'insight_enabled', { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true });
  await q.createTable('insight_bins', {
    version_id: { ...ref('model_versions'), primaryKey: true },
    bins: { type: DataTypes.JSON, allowNull: false },
    training: { type: DataTypes.JSON, allowNull: false },
    source: { type: DataTypes.STRING(16), allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.createTable('insight_counts', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true, allowNull: false },
    embed_id: ref('embeds'),
    version_id: ref('model_versions'),
    day: { type: DataTypes.STRING(10), allowNull: false },
    kind: { type: DataTypes.STRING(12), allowNull: false },
    field: { type: DataTypes.STRING(200), allowNull: false, defaultValue: '' },
    bin: { type: DataTypes.INTEGER, allowNull: false, defaultValue: -1 },
    count: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    demo: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
  });
  await q.addIndex('insight_counts', ['embed_id', 'version_id', 'day', 'kind', 'field', 'bin'], { unique: true, name: 'insight_counts_key' });
  await q.addIndex('insight_counts', ['embed_id', 'day'], { name: 'insight_counts_embed_day' });
  await q.addIndex('insight_counts', ['day'], { name: 'insight_counts_day' });
  await q.createTable('insight_alerts', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true, allowNull: false },
    embed_id: ref('embeds'),
    user_id: ref('users'),
    subscribed: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    drift_threshold: { type: DataTypes.FLOAT, allowNull: false },
    unusual_share: { type: DataTypes.FLOAT, allowNull: false },
    last_sent_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('insight_alerts', ['embed_id', 'user_id'], { unique: true, name: 'insight_alerts_member' });
}

export async function down({ context }: { context: MigrationContext }) {
  const q = context.queryInterface;
  await q.dropTable('insight_alerts');
  await q.dropTable('insight_counts');
  await q.dropTable('insight_bins');
  await context.sequelize.query('ALTER TABLE embeds DROP COLUMN insight_enabled');
}
