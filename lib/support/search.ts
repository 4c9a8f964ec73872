import { QueryTypes } from 'sequelize';
import { PLAN_IN_FORCE_STATUSES } from '@/lib/billing/limits';
import { DEFAULT_PLAN, PLAN_IDS, getPlan } from '@/lib/plans';
import { flushUsage, monthPeriod } from '@/lib/usage';
import { sequelize } from '@/models';
import { hourWindow } from './rates';
import type { SearchQuery, SortKey } from './schemas';

/**
 * Staff search over every workspace's calculators. One SQL query filters, sorts and
 * pages on the server (the console never loads all calculators); a second one adds
 * the owners of the page's workspaces.
 */
export interface CalculatorRow {
  id: number;
  token: string;
  title: string;
  status: 'active' | 'disabled' | 'retired';
  flaggedAt: string | null;
  disabledAt: string | null;
  disabledReason: string | null;
  createdAt: string;
  allowedOrigins: string[];
  workspace: { id: number; name: string; slug: string; suspendedAt: string | null };
  plan: { id: string; name: string };
  monthAnswers: number;
  lastHourAnswers: number;
  openReports: number;
  owners: string[];
}

export interface CalculatorPage {
  rows: CalculatorRow[];
  total: number;
  page: number;
  pageSize: number;
  pageCount: number;
  sort: SortKey;
  dir: 'asc' | 'desc';
}

interface RawRow {
  id: number;
  token: string;
  title: string;
  status: CalculatorRow['status'];
  flagged_at: string | null;
  disabled_at: string | null;
  disabled_reason: string | null;
  created_at: string;
  allowed_origins: string | string[] | null;
  workspace_id: number;
  workspace_name: string;
  workspace_slug: string;
  suspended_at: string | null;
  plan: string;
  month_answers: number;
  last_hour_answers: number;
  open_reports: number;
}

const iso = (v: string | Date | null): string | null => (v === null ? null : new Date(v).toISOString());

function escapeLike(s: string): string {
  return s.replace(/[!%_]/g, (c) => `!${c}`);
}

/** A pasted page address searches by its origin; anything else as typed. */
export function searchTerm(q: string): string {
  const trimmed = q.trim();
  if (/^https?:\/\//i.test(trimmed)) {
    try {
      return new URL(trimmed).origin.toLowerCase();
    } catch {}
  }
  return trimmed.toLowerCase();
}

// Billing's rule (lib/billing/limits) in SQL: the paid plan only while its subscription is in force.
const PLAN_SQL = `CASE WHEN s.status IN (${PLAN_IN_FORCE_STATUSES.map((s) => `'${s}'`).join(', ')}) THEN s.plan ELSE :defaultPlan END`;
const PLAN_RANK_SQL = `CASE ${PLAN_IDS.map((id, i) => `WHEN ${PLAN_SQL} = '${id}' THEN ${i}`).join(' ')} ELSE 0 END`;
const OPEN_REPORTS_SQL = `(SELECT COUNT(*) FROM abuse_reports r WHERE r.embed_id = e.id AND r.status = 'open')`;
const LAST_HOUR_SQL = `(COALESCE(uh.count, 0) + COALESCE(up.count, 0) * :previousWeight)`;

const ORDER: Record<SortKey, string[]> = {
  attention: ['(e.flagged_at IS NOT NULL)', OPEN_REPORTS_SQL, LAST_HOUR_SQL, 'COALESCE(um.count, 0)'],
  title: ['LOWER(e.title)'],
  status: ['e.status'],
  workspace: ['LOWER(w.name)'],
  plan: [PLAN_RANK_SQL],
  monthAnswers: ['COALESCE(um.count, 0)'],
  hourAnswers: [LAST_HOUR_SQL],
  openReports: [OPEN_REPORTS_SQL],
  createdAt: ['e.created_at'],
};

function whereClause(query: Pick<SearchQuery, 'q' | 'status'>, replacements: Record<string, unknown>): string {
  const where: string[] = [];
  const term = searchTerm(query.q);
  if (term) {
    replacements.exact = query.q.trim();
    replacements.like = `%${escapeLike(term)}%`;
    where.push(`(
      e.token = :exact
      OR LOWER(e.token) LIKE :like ESCAPE '!'
      OR LOWER(e.title) LIKE :like ESCAPE '!'
      OR LOWER(CAST(e.allowed_origins AS TEXT)) LIKE :like ESCAPE '!'
      OR LOWER(w.name) LIKE :like ESCAPE '!'
      OR LOWER(w.slug) LIKE :like ESCAPE '!'
      OR EXISTS (SELECT 1 FROM abuse_reports ar WHERE ar.embed_id = e.id AND LOWER(ar.host_origin) LIKE :like ESCAPE '!')
      OR EXISTS (SELECT 1 FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.workspace_id = w.id AND LOWER(u.email) LIKE :like ESCAPE '!')
    )`);
  }
  switch (query.status) {
    case 'active':
    case 'disabled':
    case 'retired':
      replacements.status = query.status;
      where.push('e.status = :status');
      break;
    case 'flagged':
      where.push('e.flagged_at IS NOT NULL');
      break;
    case 'reported':
      where.push(`EXISTS (SELECT 1 FROM abuse_reports ro WHERE ro.embed_id = e.id AND ro.status = 'open')`);
      break;
    case 'suspended':
      where.push('w.suspended_at IS NOT NULL');
      break;
  }
  return where.length ? `WHERE ${where.join(' AND ')}` : '';
}

export async function searchCalculators(query: SearchQuery, now = new Date()): Promise<CalculatorPage> {
  const window = hourWindow(now);
  const replacements: Record<string, unknown> = {
    month: monthPeriod(now),
    hour: window.current,
    previousHour: window.previous,
    previousWeight: window.previousWeight,
    defaultPlan: DEFAULT_PLAN,
  };
  const where = whereClause(query, replacements);
  await flushUsage();
  const joins = `
    FROM embeds e
    JOIN workspaces w ON w.id = e.workspace_id
    LEFT JOIN subscriptions s ON s.workspace_id = w.id
    LEFT JOIN usage_counters um ON um.embed_id = e.id AND um.granularity = 'month' AND um.period = :month
    LEFT JOIN usage_counters uh ON uh.embed_id = e.id AND uh.granularity = 'hour' AND uh.period = :hour
    LEFT JOIN usage_counters up ON up.embed_id = e.id AND up.granularity = 'hour' AND up.period = :previousHour`;

  const [{ total }] = await sequelize.query<{ total: number }>(`SELECT COUNT(*) AS total ${joins} ${where}`, { replacements, type: QueryTypes.SELECT });
  const count = Number(total);
  const pageCount = Math.max(1, Math.ceil(count / query.pageSize));
  const page = Math.min(query.page, pageCount);
  const dir = query.dir === 'asc' ? 'ASC' : 'DESC';
  const order = [...ORDER[query.sort].map((expr) => `${expr} ${dir}`), `e.id ${dir}`].join(', ');
  replacements.limit = query.pageSize;
  replacements.offset = (page - 1) * query.pageSize;

  const raw = await sequelize.query<RawRow>(
    `SELECT e.id, e.token, e.title, e.status, e.flagged_at, e.disabled_at, e.disabled_reason, e.created_at, e.allowed_origins,
            w.id AS workspace_id, w.name AS workspace_name, w.slug AS workspace_slug, w.suspended_at,
            ${PLAN_SQL} AS plan,
            COALESCE(um.count, 0) AS month_answers,
            ${LAST_HOUR_SQL} AS last_hour_answers,
            ${OPEN_REPORTS_SQL} AS open_reports
     ${joins} ${where}
     ORDER BY ${order}
     LIMIT :limit OFFSET :offset`,
    { replacements, type: QueryTypes.SELECT },
  );

  const owners = await ownersOf([...new Set(raw.map((r) => r.workspace_id))]);
  const rows = raw.map((r): CalculatorRow => {
    const plan = getPlan(r.plan);
    return {
      id: r.id,
      token: r.token,
      title: r.title,
      status: r.status,
      flaggedAt: iso(r.flagged_at),
      disabledAt: iso(r.disabled_at),
      disabledReason: r.disabled_reason,
      createdAt: iso(r.created_at)!,
      allowedOrigins: parseOrigins(r.allowed_origins),
      workspace: { id: r.workspace_id, name: r.workspace_name, slug: r.workspace_slug, suspendedAt: iso(r.suspended_at) },
      plan: { id: plan.id, name: plan.name },
      monthAnswers: Number(r.month_answers),
      lastHourAnswers: Math.round(Number(r.last_hour_answers)),
      openReports: Number(r.open_reports),
      owners: owners.get(r.workspace_id) ?? [],
    };
  });
  return { rows, total: count, page, pageSize: query.pageSize, pageCount, sort: query.sort, dir: query.dir };
}

export function parseOrigins(value: string | string[] | null): string[] {
  if (Array.isArray(value)) return value.map(String);
  if (!value) return [];
  try {
    const parsed = JSON.parse(value);
    return Array.isArray(parsed) ? parsed.map(String) : [];
  } catch {
    return [];
  }
}

/** Owners' e-mails per workspace, for a page of results. */
export async function ownersOf(workspaceIds: number[]): Promise<Map<number, string[]>> {
  const map = new Map<number, string[]>();
  if (!workspaceIds.length) return map;
  const rows = await sequelize.query<{ workspace_id: number; email: string }>(
    `SELECT m.workspace_id, u.email FROM memberships m JOIN users u ON u.id = m.user_id
     WHERE m.role = 'owner' AND m.workspace_id IN (:ids) ORDER BY m.id`,
    { replacements: { ids: workspaceIds }, type: QueryTypes.SELECT },
  );
  for (const r of rows) map.set(r.workspace_id, [...(map.get(r.workspace_id) ?? []), r.email]);
  return map;
}
