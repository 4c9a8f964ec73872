import { Op } from 'sequelize';
import { InsightCount } from '@/models';
import { retentionCutoffDay } from './aggregate';
import { sweepInsightAlerts } from './alerts';

/**
 * Answer insight's periodic work, run by the server's sweep timer (lib/support/timers.ts):
 * delete daily aggregates older than RETENTION_MONTHS, then send the weekly mails due.
 */
export async function sweepInsightRetention(now = new Date()): Promise<{ deleted: number; keptFrom: string }> {
  const keptFrom = retentionCutoffDay(now);
  const deleted = await InsightCount.destroy({ where: { day: { [Op.lt]: keptFrom } } });
  return { deleted, keptFrom };
}

export async function sweepInsight(now = new Date()): Promise<void> {
  await sweepInsightRetention(now);
  await sweepInsightAlerts(now);
}
