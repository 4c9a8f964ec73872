import 'server-only';
import { z } from 'zod';
import { findEmbed, type Acting } from '@/lib/embeds/service';
import { AppError } from '@/lib/errors';
import { decimalId, decimalIndex } from '@/lib/http/ids';
import { InsightAlert, ModelVersion } from '@/models';
import { addDays, analyseFields, binsOfVersions, dailyRows, readCounts, RETENTION_MONTHS, versionGroups } from './aggregate';
import { utcDay } from './counters';
import type { InsightAlertSettings, InsightReport } from './types';

/** The longest window a report reads: the retention period (13 months ≈ 396 days). */
export const MAX_REPORT_DAYS = 400;

export const reportQuery = z
  .object({
    days: decimalIndex('days must be a whole number of days, like 30.')
      .refine((n) => n >= 1 && n <= MAX_REPORT_DAYS, `days must be between 1 and ${MAX_REPORT_DAYS}.`)
      .default(30),
    version: decimalId('version must be the id of one of the calculator’s versions, written in digits.').optional(),
  })
  .strict();
export type ReportQuery = z.infer<typeof reportQuery>;

/** A member's weekly mail settings before they choose any. */
export const DEFAULT_ALERTS = { subscribed: false, driftThreshold: 0.25, unusualShare: 0.2 } as const;

export function describeAlerts(row: InsightAlert | null): InsightAlertSettings {
  if (!row) return { ...DEFAULT_ALERTS, lastSentAt: null };
  return { subscribed: row.subscribed, driftThreshold: row.driftThreshold, unusualShare: row.unusualShare, lastSentAt: row.lastSentAt ? new Date(row.lastSentAt).toISOString() : null };
}

/**
 * The insight report of one calculator of the acting member's workspace (404 for any
 * other): answers per day and version, group shares, unusual and blank answers, and per
 * field the visitors' bins beside the training data's with the drift of the last 7 and
 * 30 days. With a version filter everything is about that version; without, the days
 * cover all versions and the fields are the served version's (adding up every version
 * whose bins of the field are the same).
 */
export async function insightReport(acting: Acting, embedId: number, query: ReportQuery, now = new Date()): Promise<InsightReport> {
  const embed = await findEmbed(acting, embedId);
  const versionRows = await ModelVersion.findAll({ where: { embedId: embed.id }, attributes: ['id', 'number', 'payload'], order: [['number', 'ASC']] });
  const versions = versionRows.map(versionGroups);
  const filter = query.version ?? null;
  if (filter !== null && !versions.some((v) => v.id === filter)) throw new AppError('not_found', 'This calculator has no such version.');

  const to = utcDay(now);
  const from = addDays(to, -(query.days - 1));
  const readFrom = addDays(to, -29) < from ? addDays(to, -29) : from;
  const rows = await readCounts(embed.id, readFrom, to, filter);
  const groupsOf = new Map(versions.map((v) => [v.id, v.groups.length]));
  // Mail settings are a member's own; a key acts for no one, so it sees the defaults.
  const alertRow = acting.user ? await InsightAlert.findOne({ where: { embedId: embed.id, userId: acting.user.id } }) : null;

  const chosenId = filter ?? embed.activeVersionId ?? versions.at(-1)?.id ?? null;
  let analysis: ReturnType<typeof analyseFields> | null = null;
  if (chosenId !== null) {
    const { chosen, others } = await binsOfVersions(chosenId, rows);
    analysis = analyseFields(chosen, filter !== null ? [] : others, rows, from, to);
  }
  const none = { psi: null, band: null, answers: 0 };
  return {
    embedId: embed.id,
    enabled: embed.insightEnabled !== false,
    retentionMonths: RETENTION_MONTHS,
    demo: rows.some((r) => r.demo && r.day >= from),
    from,
    to,
    versionId: filter,
    servedVersionId: embed.activeVersionId ?? null,
    versions,
    days: dailyRows(rows, from, to, groupsOf),
    fields: analysis?.fields ?? [],
    trainingSource: analysis?.trainingSource ?? 'model-sample',
    overall: analysis?.overall ?? { last7: none, last30: none },
    alerts: describeAlerts(alertRow),
  };
}
