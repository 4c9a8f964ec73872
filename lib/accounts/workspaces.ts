import { AppError } from '@/lib/errors';
import { recordAudit } from '@/lib/audit';
import type { Actor } from '@/lib/auth/guard';
import { Membership, Workspace, sequelize, type WorkspaceRole } from '@/models';
import { createOwnedWorkspace } from './signup';

export interface WorkspaceChoice {
  id: number;
  name: string;
  slug: string;
  role: WorkspaceRole;
}

/** Every workspace the user belongs to, with their role, owners' first. */
export async function listMyWorkspaces(userId: number): Promise<WorkspaceChoice[]> {
  const rows = await Membership.findAll({ where: { userId }, include: [{ model: Workspace }], order: [['role', 'DESC'], ['id', 'ASC']] });
  return rows.flatMap((m) => {
    const w = (m as Membership & { Workspace: Workspace | null }).Workspace;
    return w ? [{ id: w.id, name: w.name, slug: w.slug, role: m.role }] : [];
  });
}

/** Check that the user may switch to a workspace (the route then sets the cookie). */
export async function switchWorkspace(actor: Actor, workspaceId: number): Promise<WorkspaceChoice> {
  const choice = (await listMyWorkspaces(actor.user.id)).find((w) => w.id === workspaceId);
  if (!choice) throw new AppError('forbidden', 'You are not a member of that workspace.', { issues: [{ field: 'workspaceId', message: 'You are not a member of that workspace.' }] });
  return choice;
}

/** Another workspace owned by the user, on the free plan. Staff do not own workspaces. */
export async function createWorkspace(actor: Actor, name: string, request?: Request): Promise<WorkspaceChoice> {
  if (actor.isStaff) throw new AppError('forbidden', 'Staff accounts do not belong to workspaces.');
  const workspace = await sequelize.transaction((transaction) => createOwnedWorkspace(actor.user.id, name, transaction));
  await recordAudit({ action: 'workspace.created', actor: { id: actor.user.id, email: actor.user.email }, workspaceId: workspace.id, targetType: 'workspace', targetId: workspace.id, request });
  return { id: workspace.id, name: workspace.name, slug: workspace.slug, role: 'owner' };
}
