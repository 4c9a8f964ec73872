import { Op, type WhereOptions } from 'sequelize';
import { AuditEvent, Workspace } from '@/models';
import { likeAnyCase } from '@/models/db';
import { auditRow, type AuditRow } from './detail';
import type { AuditQuery } from './schemas';

/**
 * The audit log across the app, for staff: filter by action (exact, or a prefix such
 * as `support.`), actor e-mail (part of it), workspace (id, name or slug) and a UTC
 * date range; newest first, paged on the server.
 */
export interface AuditPage {
  events: (AuditRow & { workspaceName: string | null })[];
  total: number;
  page: number;
  pageSize: number;
  pageCount: number;
  actions: string[];
}

// LIKE without ESCAPE: a `_` typed into a filter matches any one character, which
// only widens a staff search a little; `%` is stripped so it cannot match everything.
const likeSafe = (s: string) => s.replace(/%/g, '');

async function workspaceIdsFor(term: string): Promise<number[]> {
  if (/^\d+$/.test(term)) return [Number(term)];
  const like = `%${likeSafe(term.toLowerCase())}%`;
  const rows = await Workspace.findAll({
    where: { [Op.or]: [{ name: { [likeAnyCase()]: like } }, { slug: { [likeAnyCase()]: like } }] },
    attributes: ['id'],
    limit: 500,
  });
  return rows.map((w) => w.id);
}

export async function searchAudit(query: AuditQuery): Promise<AuditPage> {
  const and: WhereOptions<AuditEvent>[] = [];
  if (query.action) {
    and.push(query.action.endsWith('.') || query.action.endsWith('*') ? { action: { [likeAnyCase()]: `${likeSafe(query.action.replace(/\*$/, ''))}%` } } : { action: query.action });
  }
  if (query.actor) and.push({ actorEmail: { [likeAnyCase()]: `%${likeSafe(query.actor.toLowerCase())}%` } });
  if (query.workspace) and.push({ workspaceId: { [Op.in]: await workspaceIdsFor(query.workspace) } });
  if (query.from) and.push({ createdAt: { [Op.gte]: new Date(`${query.from}T00:00:00.000Z`) } });
  if (query.to) and.push({ createdAt: { [Op.lt]: new Date(Date.parse(`${query.to}T00:00:00.000Z`) + 86_400_000) } });
  const where = and.length ? { [Op.and]: and } : {};

  const total = await AuditEvent.count({ where });
  const pageCount = Math.max(1, Math.ceil(total / query.pageSize));
  const page = Math.min(query.page, pageCount);
  const rows = await AuditEvent.findAll({ where, order: [['createdAt', 'DESC'], ['id', 'DESC']], limit: query.pageSize, offset: (page - 1) * query.pageSize });
  const wsIds = [...new Set(rows.map((r) => r.workspaceId).filter((id): id is number => id !== null))];
  const names = new Map((await Workspace.findAll({ where: { id: wsIds }, attributes: ['id', 'name'] })).map((w) => [w.id, w.name]));
  const actions = (await AuditEvent.findAll({ attributes: ['action'], group: ['action'], order: [['action', 'ASC']], raw: true })).map((r) => r.action);
  return {
    events: rows.map((r) => ({ ...auditRow(r), workspaceName: r.workspaceId ? (names.get(r.workspaceId) ?? null) : null })),
    total,
    page,
    pageSize: query.pageSize,
    pageCount,
    actions,
  };
}
