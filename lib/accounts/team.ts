import { AppError } from '@/lib/errors';
import { recordAudit } from '@/lib/audit';
import type { WorkspaceActor } from '@/lib/auth/guard';
import { Membership, User, sequelize, type WorkspaceRole } from '@/models';
import { listInvitations } from './invitations';
import { workspacePlan } from '@/lib/billing/limits';
import { seatsTaken } from './seats';

export interface TeamMember {
  membershipId: number;
  userId: number;
  name: string;
  email: string;
  role: WorkspaceRole;
  joinedAt: string;
}

export async function listMembers(workspaceId: number): Promise<TeamMember[]> {
  const rows = await Membership.findAll({ where: { workspaceId }, include: [{ model: User, attributes: ['id', 'name', 'email'] }], order: [['role', 'DESC'], ['createdAt', 'ASC']] });
  return rows.map((m) => {
    const u = (m as Membership & { User: User }).User;
    return { membershipId: m.id, userId: u.id, name: u.name, email: u.email, role: m.role, joinedAt: m.createdAt.toISOString() };
  });
}

/** The team page's data: members, open invitations and seats of the plan. */
export async function teamOverview(workspaceId: number) {
  const [members, invitations, plan, taken] = await Promise.all([listMembers(workspaceId), listInvitations(workspaceId), workspacePlan(workspaceId), seatsTaken(workspaceId)]);
  return { members, invitations, seats: { plan: plan.name, limit: plan.limits.seats, taken } };
}

function lastOwnerError(name: string, workspace: string, doing: string): AppError {
  return new AppError('conflict', `${name || 'This person'} is the last owner of ${workspace}, so they cannot be ${doing}. Make someone else an owner first.`);
}

export async function changeRole(actor: WorkspaceActor, membershipId: number, role: WorkspaceRole, request?: Request): Promise<TeamMember> {
  const result = await sequelize.transaction(async (transaction) => {
    const m = await Membership.findOne({ where: { id: membershipId, workspaceId: actor.workspace.id }, include: [{ model: User }], transaction });
    if (!m) throw new AppError('not_found', 'No member with that id in this workspace.');
    const user = (m as Membership & { User: User }).User;
    const from = m.role;
    if (from === 'owner' && role !== 'owner') {
      const owners = await Membership.count({ where: { workspaceId: actor.workspace.id, role: 'owner' }, transaction });
      if (owners <= 1) throw lastOwnerError(user.name, actor.workspace.name, 'made a member');
    }
    if (from !== role) await m.update({ role }, { transaction });
    return { m, user, from };
  });
  if (result.from !== role) {
    await recordAudit({ action: 'team.role_changed', actor: { id: actor.user.id, email: actor.user.email }, workspaceId: actor.workspace.id, targetType: 'user', targetId: result.user.id, detail: { from: result.from, to: role }, request });
  }
  return { membershipId: result.m.id, userId: result.user.id, name: result.user.name, email: result.user.email, role, joinedAt: result.m.createdAt.toISOString() };
}

export async function removeMember(actor: WorkspaceActor, membershipId: number, request?: Request): Promise<void> {
  const removed = await sequelize.transaction(async (transaction) => {
    const m = await Membership.findOne({ where: { id: membershipId, workspaceId: actor.workspace.id }, include: [{ model: User }], transaction });
    if (!m) throw new AppError('not_found', 'No member with that id in this workspace.');
    const user = (m as Membership & { User: User }).User;
    if (m.role === 'owner') {
      const owners = await Membership.count({ where: { workspaceId: actor.workspace.id, role: 'owner' }, transaction });
      if (owners <= 1) throw lastOwnerError(user.name, actor.workspace.name, 'removed');
    }
    await m.destroy({ transaction });
    return { user, role: m.role };
  });
  await recordAudit({ action: 'team.member_removed', actor: { id: actor.user.id, email: actor.user.email }, workspaceId: actor.workspace.id, targetType: 'user', targetId: removed.user.id, detail: { email: removed.user.email, role: removed.role }, request });
}
