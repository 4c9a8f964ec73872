import { Op, QueryTypes } from 'sequelize';
import { sequelize, UsageCounter } from '@/models';

/**
 * Metering: one scored answer adds one to its embed's month bucket (billing) and hour
 * bucket (spike detection). Each increment is a single UPSERT, so concurrent answers
 * on SQLite never lose a count.
 */
export function monthPeriod(at = new Date()): string {
  return at.toISOString().slice(0, 7);
}

export function hourPeriod(at = new Date()): string {
  return at.toISOString().slice(0, 13);
}

export async function recordAnswer(embed: { id: number; workspaceId: number }, at = new Date()): Promise<void> {
  const now = at.toISOString();
  await sequelize.query(
    `INSERT INTO usage_counters (embed_id, workspace_id, granularity, period, count, created_at, updated_at)
     VALUES (?, ?, 'month', ?, 1, ?, ?), (?, ?, 'hour', ?, 1, ?, ?)
     ON CONFLICT (embed_id, granularity, period) DO UPDATE SET count = count + 1, updated_at = excluded.updated_at`,
    { replacements: [embed.id, embed.workspaceId, monthPeriod(at), now, now, embed.id, embed.workspaceId, hourPeriod(at), now, now], type: QueryTypes.INSERT },
  );
}

/** Answers of all a workspace's calculators in a month. */
export async function workspaceMonthlyAnswers(workspaceId: number, period = monthPeriod()): Promise<number> {
  const total = await UsageCounter.sum('count', { where: { workspaceId, granularity: 'month', period } });
  return Number(total ?? 0);
}

export async function embedMonthlyAnswers(embedId: number, period = monthPeriod()): Promise<number> {
  const row = await UsageCounter.findOne({ where: { embedId, granularity: 'month', period } });
  return row?.count ?? 0;
}

/** Hour buckets of one embed from `since` on, oldest first. */
export async function embedHourlyAnswers(embedId: number, since: Date): Promise<{ period: string; count: number }[]> {
  const rows = await UsageCounter.findAll({
    where: { embedId, granularity: 'hour', period: { [Op.gte]: hourPeriod(since) } },
    order: [['period', 'ASC']],
  });
  return rows.map((r) => ({ period: r.period, count: r.count }));
}
