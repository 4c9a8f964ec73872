import type { MigrationContext } from '@/lib/db/migrator';

/**
 * Usage alerts also record a calculator's burst refusals (fair use of scoring), so the
 * owner is told once per calculator per clock hour and the studio lists them beside the
 * monthly thresholds.
 *
 * kind 'allowance': the monthly thresholds as before (period = month, threshold = 80,
 * 100, or the pause line's percent). kind 'burst': embed_id is the calculator, period
 * the UTC hour ("2026-12-02T14"), threshold the refusing window in minutes (1, 60, 1440),
 * answer_limit that window's answers and used the month's answers at the time. Rows go
 * with their workspace (workspace_id cascades); embeds are retired, not deleted.
 */
export async function up({ context }: { context: MigrationContext }) {
  const run = (sql: string) => context.sequelize.query(sql);
  await run(`ALTER TABLE usage_alerts ADD COLUMN kind VARCHAR(16) NOT NULL DEFAULT 'allowance'`);
  await run('ALTER TABLE usage_alerts ADD COLUMN embed_id INTEGER');
  await run('DROP INDEX usage_alerts_once');
  await run(`CREATE UNIQUE INDEX usage_alerts_once ON usage_alerts (workspace_id, period, threshold) WHERE kind = 'allowance'`);
  await run(`CREATE UNIQUE INDEX usage_alerts_burst_once ON usage_alerts (embed_id, period) WHERE kind = 'burst'`);
  await run('CREATE INDEX usage_alerts_workspace_created ON usage_alerts (workspace_id, created_at)');
}

export async function down({ context }: { context: MigrationContext }) {
  const run = (sql: string) => context.sequelize.query(sql);
  await run(`DELETE FROM usage_alerts WHERE kind <> 'allowance'`);
  await run('DROP INDEX usage_alerts_workspace_created');
  await run('DROP INDEX usage_alerts_burst_once');
  await run('DROP INDEX usage_alerts_once');
  await run('ALTER TABLE usage_alerts DROP COLUMN embed_id');
  await run('ALTER TABLE usage_alerts DROP COLUMN kind');
  await run('CREATE UNIQUE INDEX usage_alerts_once ON usage_alerts (workspace_id, period, threshold)');
}
