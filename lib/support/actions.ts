import { Op } from 'sequelize';
import { recordAudit } from '@/lib/audit';
import { AppError } from '@/lib/errors';
import { endWorkspaceSessions } from '@/lib/auth/sessions';
import { invalidateEmbed, invalidateWorkspace } from '@/lib/scoring';
import { AbuseReport, Embed, Workspace, sequelize } from '@/models';
import { notifyOwners } from './notify';

/**
 * What staff may change: an embed's serving status, a whole workspace's suspension,
 * a spike flag, a report's state. Each change is saved first, then the scoring cache
 * of this process forgets the embed (other processes re-read within the cache's short
 * TTL), then the audit entry and the owners' e-mail follow.
 */
export interface StaffActing {
  user: { id: number; email: string };
  request?: Request;
}

async function findEmbed(embedId: number): Promise<Embed> {
  const embed = await Embed.findByPk(embedId);
  if (!embed) throw new AppError('not_found', 'There is no calculator with that id.');
  return embed;
}

async function findWorkspace(workspaceId: number): Promise<Workspace> {
  const workspace = await Workspace.findByPk(workspaceId);
  if (!workspace) throw new AppError('not_found', 'There is no workspace with that id.');
  return workspace;
}

export async function disableEmbed(acting: StaffActing, embedId: number, input: { reason: string; closeReports?: boolean }): Promise<{ embed: Embed; closedReports: number; notified: string[] }> {
  const embed = await findEmbed(embedId);
  if (embed.status === 'retired') throw new AppError('conflict', 'This calculator is retired by its owner and serves nothing; there is nothing to switch off.');
  if (embed.status === 'disabled') throw new AppError('conflict', 'This calculator is already switched off.');
  const now = new Date();
  let closedReports = 0;
  await sequelize.transaction(async (transaction) => {
    // Conditional update: two staff pressing at once leave one entry, not two.
    const [changed] = await Embed.update({ status: 'disabled', disabledReason: input.reason, disabledAt: now }, { where: { id: embed.id, status: 'active' }, transaction });
    if (changed !== 1) throw new AppError('conflict', 'This calculator changed meanwhile; reload and try again.');
    if (input.closeReports) [closedReports] = await AbuseReport.update({ status: 'closed' }, { where: { embedId: embed.id, status: 'open' }, transaction });
  });
  invalidateEmbed(embed.token);
  invalidateEmbed(embed.id);
  await embed.reload();
  await recordAudit({ action: 'support.embed_disabled', actor: acting.user, workspaceId: embed.workspaceId, targetType: 'embed', targetId: embed.id, detail: { title: embed.title, reason: input.reason, closedReports }, request: acting.request });
  const notified = await notifyOwners(embed.workspaceId, { kind: 'embed-disabled', title: embed.title, token: embed.token, reason: input.reason });
  return { embed, closedReports, notified };
}

export async function enableEmbed(acting: StaffActing, embedId: number, input: { reason: string }): Promise<{ embed: Embed; notified: string[] }> {
  const embed = await findEmbed(embedId);
  if (embed.status !== 'disabled') throw new AppError('conflict', embed.status === 'retired' ? 'This calculator is retired by its owner; only they can publish it again.' : 'This calculator is not switched off.');
  const previousReason = embed.disabledReason;
  // A reviewed calculator leaves the review queue too.
  const [changed] = await Embed.update({ status: 'active', disabledReason: null, disabledAt: null, flaggedAt: null }, { where: { id: embed.id, status: 'disabled' } });
  if (changed !== 1) throw new AppError('conflict', 'This calculator changed meanwhile; reload and try again.');
  invalidateEmbed(embed.token);
  invalidateEmbed(embed.id);
  await embed.reload();
  await recordAudit({ action: 'support.embed_enabled', actor: acting.user, workspaceId: embed.workspaceId, targetType: 'embed', targetId: embed.id, detail: { title: embed.title, reason: input.reason, previousReason }, request: acting.request });
  const notified = await notifyOwners(embed.workspaceId, { kind: 'embed-enabled', title: embed.title, token: embed.token, reason: input.reason });
  return { embed, notified };
}

export async function suspendWorkspace(acting: StaffActing, workspaceId: number, input: { reason: string }): Promise<{ workspace: Workspace; notified: string[] }> {
  const workspace = await findWorkspace(workspaceId);
  if (workspace.suspendedAt) throw new AppError('conflict', 'This workspace is already suspended.');
  const [changed] = await Workspace.update({ suspendedAt: new Date(), suspendedReason: input.reason }, { where: { id: workspace.id, suspendedAt: null } });
  if (changed !== 1) throw new AppError('conflict', 'This workspace changed meanwhile; reload and try again.');
  invalidateWorkspace(workspace.id);
  // A suspended workspace's members are signed out everywhere (a misused account may be one of them); they can sign in again.
  const sessionsEnded = (await endWorkspaceSessions(workspace.id)).length;
  await workspace.reload();
  const calculators = await Embed.count({ where: { workspaceId: workspace.id, status: { [Op.ne]: 'retired' } } });
  await recordAudit({ action: 'support.workspace_suspended', actor: acting.user, workspaceId: workspace.id, targetType: 'workspace', targetId: workspace.id, detail: { name: workspace.name, reason: input.reason, calculators, sessionsEnded }, request: acting.request });
  const notified = await notifyOwners(workspace.id, { kind: 'workspace-suspended', workspaceName: workspace.name, reason: input.reason });
  return { workspace, notified };
}

export async function restoreWorkspace(acting: StaffActing, workspaceId: number, input: { reason: string }): Promise<{ workspace: Workspace; notified: string[] }> {
  const workspace = await findWorkspace(workspaceId);
  if (!workspace.suspendedAt) throw new AppError('conflict', 'This workspace is not suspended.');
  const previousReason = workspace.suspendedReason;
  const [changed] = await Workspace.update({ suspendedAt: null, suspendedReason: null }, { where: { id: workspace.id, suspendedAt: { [Op.ne]: null } } });
  if (changed !== 1) throw new AppError('conflict', 'This workspace changed meanwhile; reload and try again.');
  invalidateWorkspace(workspace.id);
  await workspace.reload();
  await recordAudit({ action: 'support.workspace_restored', actor: acting.user, workspaceId: workspace.id, targetType: 'workspace', targetId: workspace.id, detail: { name: workspace.name, reason: input.reason, previousReason }, request: acting.request });
  const notified = await notifyOwners(workspace.id, { kind: 'workspace-restored', workspaceName: workspace.name, reason: input.reason });
  return { workspace, notified };
}

/** Staff looked at a spike and found it fine: the calculator leaves the top of the console. */
export async function clearFlag(acting: StaffActing, embedId: number, input: { note?: string }): Promise<Embed> {
  const embed = await findEmbed(embedId);
  if (!embed.flaggedAt) throw new AppError('conflict', 'This calculator is not flagged.');
  const flaggedAt = embed.flaggedAt;
  await embed.update({ flaggedAt: null });
  await recordAudit({ action: 'support.flag_cleared', actor: acting.user, workspaceId: embed.workspaceId, targetType: 'embed', targetId: embed.id, detail: { title: embed.title, note: input.note ?? '', flaggedAt: flaggedAt.toISOString() }, request: acting.request });
  return embed;
}

/** Mark an abuse report as dealt with (or open it again). */
export async function setReportStatus(acting: StaffActing, reportId: number, status: 'open' | 'closed'): Promise<AbuseReport> {
  const report = await AbuseReport.findByPk(reportId);
  if (!report) throw new AppError('not_found', 'There is no report with that id.');
  if (report.status === status) return report;
  const embed = await Embed.findByPk(report.embedId, { attributes: ['id', 'workspaceId', 'title'] });
  await report.update({ status });
  await recordAudit({
    action: status === 'closed' ? 'support.report_closed' : 'support.report_reopened',
    actor: acting.user,
    workspaceId: embed?.workspaceId ?? null,
    targetType: 'embed',
    targetId: report.embedId,
    detail: { reportId: report.id, reason: report.reason },
    request: acting.request,
  });
  return report;
}
