import { DataTypes, type QueryInterface } from 'sequelize';
import type { MigrationContext } from '@/lib/db/migrator';

const id = { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true, allowNull: false };
const stamps = {
  created_at: { type: DataTypes.DATE, allowNull: false },
  updated_at: { type: DataTypes.DATE, allowNull: false },
};
const ref = (table: string, allowNull = false, onDelete: 'CASCADE' | 'SET NULL' = 'CASCADE') => ({
  type: DataTypes.INTEGER,
  allowNull,
  references: { model: table, key: 'id' },
  onDelete: allowNull && onDelete === 'CASCADE' ? 'SET NULL' : onDelete,
});

/** Tables in creation order; dropped in reverse. */
const tables: [string, (q: QueryInterface) => Promise<void>][] = [
  ['users', async (q) => {
    await q.createTable('users', {
      id,
      email: { type: DataTypes.STRING(320), allowNull: false, unique: true },
      name: { type: DataTypes.STRING(120), allowNull: false, defaultValue: '' },
      password_hash: { type: DataTypes.STRING(100), allowNull: false },
      email_verified_at: { type: DataTypes.DATE, allowNull: true },
      is_staff: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      ...stamps,
    });
  }],
  ['workspaces', async (q) => {
    await q.createTable('workspaces', {
      id,
      name: { type: DataTypes.STRING(120), allowNull: false },
      slug: { type: DataTypes.STRING(80), allowNull: false, unique: true },
      suspended_at: { type: DataTypes.DATE, allowNull: true },
      suspended_reason: { type: DataTypes.TEXT, allowNull: true },
      ...stamps,
    });
  }],
  ['memberships', async (q) => {
    await q.createTable('memberships', {
      id,
      user_id: ref('users'),
      workspace_id: ref('workspaces'),
      role: { type: DataTypes.STRING(16), allowNull: false },
      ...stamps,
    });
    await q.addIndex('memberships', ['user_id', 'workspace_id'], { unique: true });
    await q.addIndex('memberships', ['workspace_id']);
  }],
  ['invitations', async (q) => {
    await q.createTable('invitations', {
      id,
      workspace_id: ref('workspaces'),
      email: { type: DataTypes.STRING(320), allowNull: false },
      role: { type: DataTypes.STRING(16), allowNull: false },
      token_hash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
      invited_by_id: ref('users'),
      expires_at: { type: DataTypes.DATE, allowNull: false },
      accepted_at: { type: DataTypes.DATE, allowNull: true },
      ...stamps,
    });
  }],
  ['auth_tokens', async (q) => {
    await q.createTable('auth_tokens', {
      id,
      user_id: ref('users'),
      purpose: { type: DataTypes.STRING(32), allowNull: false },
      token_hash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
      expires_at: { type: DataTypes.DATE, allowNull: false },
      used_at: { type: DataTypes.DATE, allowNull: true },
      ...stamps,
    });
  }],
  ['datasets', async (q) => {
    await q.createTable('datasets', {
      id,
      workspace_id: ref('workspaces'),
      created_by_id: ref('users', true),
      name: { type: DataTypes.STRING(200), allowNull: false },
      original_filename: { type: DataTypes.STRING(255), allowNull: false },
      original_csv: { type: DataTypes.BLOB, allowNull: false },
      columns: { type: DataTypes.JSON, allowNull: false },
      cells: { type: DataTypes.JSON, allowNull: false },
      row_count: { type: DataTypes.INTEGER, allowNull: false },
      ...stamps,
    });
    await q.addIndex('datasets', ['workspace_id']);
  }],
  ['fits', async (q) => {
    await q.createTable('fits', {
      id,
      workspace_id: ref('workspaces'),
      dataset_id: ref('datasets'),
      created_by_id: ref('users', true),
      status: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'queued' },
      params: { type: DataTypes.JSON, allowNull: false },
      progress: { type: DataTypes.JSON, allowNull: true },
      result: { type: DataTypes.JSON, allowNull: true },
      error: { type: DataTypes.TEXT, allowNull: true },
      cancel_requested: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      runner_id: { type: DataTypes.STRING(64), allowNull: true },
      started_at: { type: DataTypes.DATE, allowNull: true },
      finished_at: { type: DataTypes.DATE, allowNull: true },
      ...stamps,
    });
    await q.addIndex('fits', ['status']);
    await q.addIndex('fits', ['workspace_id']);
  }],
  ['mixture_models', async (q) => {
    await q.createTable('mixture_models', {
      id,
      workspace_id: ref('workspaces'),
      fit_id: ref('fits', true),
      dataset_id: ref('datasets', true),
      created_by_id: ref('users', true),
      name: { type: DataTypes.STRING(200), allowNull: false },
      model: { type: DataTypes.JSON, allowNull: false },
      clusters: { type: DataTypes.JSON, allowNull: false },
      fields: { type: DataTypes.JSON, allowNull: false },
      caution: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
      selection_note: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
      ...stamps,
    });
  }],
  ['embeds', async (q) => {
    await q.createTable('embeds', {
      id,
      workspace_id: ref('workspaces'),
      mixture_model_id: ref('mixture_models', true),
      token: { type: DataTypes.STRING(64), allowNull: false, unique: true },
      title: { type: DataTypes.STRING(200), allowNull: false },
      // No FK: versions reference embeds, and a circular constraint buys nothing here.
      active_version_id: { type: DataTypes.INTEGER, allowNull: true },
      status: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'active' },
      allowed_origins: { type: DataTypes.JSON, allowNull: false, defaultValue: '[]' },
      theme: { type: DataTypes.STRING(8), allowNull: false, defaultValue: 'light' },
      accent_color: { type: DataTypes.STRING(9), allowNull: false, defaultValue: '#2f6f5e' },
      typicality_threshold: { type: DataTypes.FLOAT, allowNull: false, defaultValue: 1 },
      disabled_reason: { type: DataTypes.TEXT, allowNull: true },
      disabled_at: { type: DataTypes.DATE, allowNull: true },
      flagged_at: { type: DataTypes.DATE, allowNull: true },
      ...stamps,
    });
    await q.addIndex('embeds', ['workspace_id']);
  }],
  ['model_versions', async (q) => {
    await q.createTable('model_versions', {
      id,
      embed_id: ref('embeds'),
      mixture_model_id: ref('mixture_models', true),
      created_by_id: ref('users', true),
      number: { type: DataTypes.INTEGER, allowNull: false },
      payload: { type: DataTypes.JSON, allowNull: false },
      checksum: { type: DataTypes.STRING(64), allowNull: false },
      ...stamps,
    });
    await q.addIndex('model_versions', ['embed_id', 'number'], { unique: true });
  }],
  ['usage_counters', async (q) => {
    await q.createTable('usage_counters', {
      id,
      embed_id: ref('embeds'),
      workspace_id: ref('workspaces'),
      granularity: { type: DataTypes.STRING(8), allowNull: false },
      period: { type: DataTypes.STRING(16), allowNull: false },
      count: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      ...stamps,
    });
    await q.addIndex('usage_counters', ['embed_id', 'granularity', 'period'], { unique: true });
    await q.addIndex('usage_counters', ['workspace_id', 'granularity', 'period']);
  }],
  ['subscriptions', async (q) => {
    await q.createTable('subscriptions', {
      id,
      workspace_id: { ...ref('workspaces'), unique: true },
      plan: { type: DataTypes.STRING(32), allowNull: false },
      status: { type: DataTypes.STRING(32), allowNull: false, defaultValue: 'active' },
      customer_ref: { type: DataTypes.STRING(64), allowNull: true },
      subscription_ref: { type: DataTypes.STRING(64), allowNull: true },
      current_period_start: { type: DataTypes.DATE, allowNull: true },
      current_period_end: { type: DataTypes.DATE, allowNull: true },
      cancel_at_period_end: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      ...stamps,
    });
  }],
  ['invoices', async (q) => {
    await q.createTable('invoices', {
      id,
      workspace_id: ref('workspaces'),
      invoice_ref: { type: DataTypes.STRING(64), allowNull: false, unique: true },
      number: { type: DataTypes.STRING(64), allowNull: true },
      amount_due: { type: DataTypes.INTEGER, allowNull: false },
      amount_paid: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      currency: { type: DataTypes.STRING(3), allowNull: false, defaultValue: 'eur' },
      status: { type: DataTypes.STRING(16), allowNull: false },
      period_start: { type: DataTypes.DATE, allowNull: true },
      period_end: { type: DataTypes.DATE, allowNull: true },
      paid_at: { type: DataTypes.DATE, allowNull: true },
      receipt_sent_at: { type: DataTypes.DATE, allowNull: true },
      ...stamps,
    });
  }],
  ['abuse_reports', async (q) => {
    await q.createTable('abuse_reports', {
      id,
      embed_id: ref('embeds'),
      reason: { type: DataTypes.STRING(32), allowNull: false },
      message: { type: DataTypes.TEXT, allowNull: false },
      reporter_email: { type: DataTypes.STRING(320), allowNull: true },
      reporter_address: { type: DataTypes.STRING(64), allowNull: true },
      host_origin: { type: DataTypes.STRING(255), allowNull: true },
      status: { type: DataTypes.STRING(8), allowNull: false, defaultValue: 'open' },
      ...stamps,
    });
    await q.addIndex('abuse_reports', ['embed_id', 'status']);
  }],
  ['audit_events', async (q) => {
    await q.createTable('audit_events', {
      id,
      // Plain columns: the trail must outlive the users and workspaces it names.
      actor_user_id: { type: DataTypes.INTEGER, allowNull: true },
      actor_email: { type: DataTypes.STRING(320), allowNull: true },
      workspace_id: { type: DataTypes.INTEGER, allowNull: true },
      action: { type: DataTypes.STRING(64), allowNull: false },
      target_type: { type: DataTypes.STRING(32), allowNull: true },
      target_id: { type: DataTypes.STRING(64), allowNull: true },
      detail: { type: DataTypes.JSON, allowNull: false, defaultValue: '{}' },
      address: { type: DataTypes.STRING(64), allowNull: true },
      ...stamps,
    });
    await q.addIndex('audit_events', ['action', 'created_at']);
    await q.addIndex('audit_events', ['workspace_id', 'created_at']);
  }],
  ['mail_outbox', async (q) => {
    await q.createTable('mail_outbox', {
      id,
      to: { type: DataTypes.STRING(320), allowNull: false },
      subject: { type: DataTypes.STRING(300), allowNull: false },
      text: { type: DataTypes.TEXT, allowNull: false },
      html: { type: DataTypes.TEXT, allowNull: true },
      kind: { type: DataTypes.STRING(32), allowNull: false },
      status: { type: DataTypes.STRING(8), allowNull: false, defaultValue: 'pending' },
      attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      last_error: { type: DataTypes.TEXT, allowNull: true },
      sent_at: { type: DataTypes.DATE, allowNull: true },
      ...stamps,
    });
    await q.addIndex('mail_outbox', ['status']);
  }],
  ['webhook_events', async (q) => {
    await q.createTable('webhook_events', {
      id,
      event_ref: { type: DataTypes.STRING(64), allowNull: false, unique: true },
      type: { type: DataTypes.STRING(64), allowNull: false },
      processed_at: { type: DataTypes.DATE, allowNull: false },
      ...stamps,
    });
  }],
];

export async function up({ context }: { context: MigrationContext }) {
  for (const [, create] of tables) await create(context.queryInterface);
}

export async function down({ context }: { context: MigrationContext }) {
  for (const [name] of [...tables].reverse()) await context.queryInterface.dropTable(name);
}
