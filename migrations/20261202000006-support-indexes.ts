import type { MigrationContext } from '@/lib/db/migrator';

/**
 * Support console lookups: an embed's audit trail (by target), and the spike sweep,
 * which reads every embed's latest hour buckets (by granularity and period).
 */
export async function up({ context }: { context: MigrationContext }) {
  const q = context.queryInterface;
  await q.addIndex('audit_events', ['target_type', 'target_id', 'created_at'], { name: 'audit_events_target' });
  await q.addIndex('usage_counters', ['granularity', 'period'], { name: 'usage_counters_granularity_period' });
  await q.addIndex('abuse_reports', ['host_origin'], { name: 'abuse_reports_host_origin' });
}

export async function down({ context }: { context: MigrationContext }) {
  const q = context.queryInterface;
  await q.removeIndex('abuse_reports', 'abuse_reports_host_origin');
  await q.removeIndex('usage_counters', 'usage_counters_granularity_period');
  await q.removeIndex('audit_events', 'audit_events_target');
}
