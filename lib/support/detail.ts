import { Op, QueryTypes } from 'sequelize';
import { workspacePlan } from '@/lib/billing/limits';
import { AppError } from '@/lib/errors';
import { embedMonthlyAnswers, flushUsage } from '@/lib/usage';
import { AbuseReport, AuditEvent, Embed, ModelVersion, User, Workspace, sequelize } from '@/models';
import { hourWindow, lastDays, lastHourEstimate } from './rates';
import { ownersOf, parseOrigins } from './search';

/**
 * Everything staff need on one calculator's support page. Staff see usage and
 * reports, never the dataset behind the model nor the model internals.
 */
export interface CalculatorDetail {
  id: number;
  token: string;
  title: string;
  status: 'active' | 'disabled' | 'retired';
  disabledReason: string | null;
  disabledAt: string | null;
  flaggedAt: string | null;
  createdAt: string;
  allowedOrigins: string[];
  workspace: { id: number; name: string; slug: string; suspendedAt: string | null; suspendedReason: string | null; owners: string[] };
  plan: { id: string; name: string; answersPerMonth: number };
  activeVersionId: number | null;
  versions: { id: number; number: number; createdAt: string; createdBy: string | null; checksumEnd: string; active: boolean }[];
  usage: { monthAnswers: number; lastHourAnswers: number; daily: { day: string; answers: number }[] };
  reports: { id: number; reason: string; message: string; reporterEmail: string | null; hostOrigin: string | null; status: 'open' | 'closed'; createdAt: string }[];
  audit: AuditRow[];
}

export interface AuditRow {
  id: number;
  action: string;
  actorEmail: string | null;
  workspaceId: number | null;
  targetType: string | null;
  targetId: string | null;
  detail: Record<string, unknown>;
  address: string | null;
  createdAt: string;
}

export function auditRow(e: AuditEvent): AuditRow {
  return {
    id: e.id,
    action: e.action,
    actorEmail: e.actorEmail,
    workspaceId: e.workspaceId,
    targetType: e.targetType,
    targetId: e.targetId,
    detail: typeof e.detail === 'string' ? safeJson(e.detail) : (e.detail ?? {}),
    address: e.address,
    createdAt: e.createdAt.toISOString(),
  };
}

function safeJson(s: string): Record<string, unknown> {
  try {
    return JSON.parse(s);
  } catch {
    return {};
  }
}

export const USAGE_DAYS = 30;

/** Daily totals (UTC) over the last `days` days, summed from the hour buckets; days without answers are 0. */
export async function dailyAnswers(embedId: number, days = USAGE_DAYS, now = new Date()): Promise<{ day: string; answers: number }[]> {
  const dayList = lastDays(days, now);
  await flushUsage();
  const rows = await sequelize.query<{ day: string; answers: number }>(
    `SELECT SUBSTR(period, 1, 10) AS day, SUM(count) AS answers FROM usage_counters
     WHERE embed_id = :embedId AND granularity = 'hour' AND period >= :since
     GROUP BY SUBSTR(period, 1, 10)`,
    { replacements: { embedId, since: `${dayList[0]}T00` }, type: QueryTypes.SELECT },
  );
  const byDay = new Map(rows.map((r) => [r.day, Number(r.answers)]));
  return dayList.map((day) => ({ day, answers: byDay.get(day) ?? 0 }));
}

async function lastHourAnswers(embedId: number, now: Date): Promise<number> {
  const window = hourWindow(now);
  await flushUsage();
  const rows = await sequelize.query<{ period: string; count: number }>(
    `SELECT period, count FROM usage_counters WHERE embed_id = :embedId AND granularity = 'hour' AND period IN (:periods)`,
    { replacements: { embedId, periods: [window.current, window.previous] }, type: QueryTypes.SELECT },
  );
  const at = (p: string) => Number(rows.find((r) => r.period === p)?.count ?? 0);
  return lastHourEstimate(at(window.current), at(window.previous), window);
}

const iso = (d: Date | null | undefined) => (d ? new Date(d).toISOString() : null);

export async function calculatorDetail(embedId: number, now = new Date()): Promise<CalculatorDetail> {
  const embed = await Embed.findByPk(embedId);
  if (!embed) throw new AppError('not_found', 'There is no calculator with that id.');
  const workspace = await Workspace.findByPk(embed.workspaceId);
  if (!workspace) throw new AppError('not_found', 'That calculator has no workspace any more.');

  const [plan, owners, versions, reports, audit, monthAnswers, lastHour, daily] = await Promise.all([
    workspacePlan(workspace.id),
    ownersOf([workspace.id]),
    ModelVersion.findAll({ where: { embedId: embed.id }, order: [['number', 'DESC']], attributes: ['id', 'number', 'createdAt', 'createdById', 'checksum'] }),
    AbuseReport.findAll({ where: { embedId: embed.id }, order: [['status', 'DESC'], ['createdAt', 'DESC'], ['id', 'DESC']], limit: 200 }),
    embedAuditTrail(embed.id, workspace.id),
    embedMonthlyAnswers(embed.id),
    lastHourAnswers(embed.id, now),
    dailyAnswers(embed.id, USAGE_DAYS, now),
  ]);
  const authorIds = [...new Set(versions.map((v) => v.createdById).filter((id): id is number => id !== null))];
  const authors = new Map((await User.findAll({ where: { id: authorIds }, attributes: ['id', 'email'] })).map((u) => [u.id, u.email]));

  return {
    id: embed.id,
    token: embed.token,
    title: embed.title,
    status: embed.status,
    disabledReason: embed.disabledReason,
    disabledAt: iso(embed.disabledAt),
    flaggedAt: iso(embed.flaggedAt),
    createdAt: embed.createdAt.toISOString(),
    allowedOrigins: parseOrigins(embed.allowedOrigins as unknown as string | string[]),
    workspace: { id: workspace.id, name: workspace.name, slug: workspace.slug, suspendedAt: iso(workspace.suspendedAt), suspendedReason: workspace.suspendedReason, owners: owners.get(workspace.id) ?? [] },
    plan: { id: plan.id, name: plan.name, answersPerMonth: plan.limits.answersPerMonth },
    activeVersionId: embed.activeVersionId,
    versions: versions.map((v) => ({ id: v.id, number: v.number, createdAt: v.createdAt.toISOString(), createdBy: v.createdById ? (authors.get(v.createdById) ?? null) : null, checksumEnd: v.checksum.slice(-8), active: v.id === embed.activeVersionId })),
    usage: { monthAnswers, lastHourAnswers: lastHour, daily },
    reports: reports.map((r) => ({ id: r.id, reason: r.reason, message: r.message, reporterEmail: r.reporterEmail, hostOrigin: r.hostOrigin, status: r.status, createdAt: r.createdAt.toISOString() })),
    audit: audit.map(auditRow),
  };
}

/** What happened to this calculator: its own events, and suspensions of its workspace. */
export async function embedAuditTrail(embedId: number, workspaceId: number, limit = 100): Promise<AuditEvent[]> {
  return AuditEvent.findAll({
    where: {
      [Op.or]: [
        { targetType: 'embed', targetId: String(embedId) },
        { workspaceId, action: { [Op.in]: ['support.workspace_suspended', 'support.workspace_restored'] } },
      ],
    },
    order: [['createdAt', 'DESC'], ['id', 'DESC']],
    limit,
  });
}

