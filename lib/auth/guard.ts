import { getToken } from 'next-auth/jwt';
import { AppError } from '@/lib/errors';
import { parseDecimalId } from '@/lib/http/ids';
import { ensureMailRetryTimer } from '@/lib/mail';
import { Membership, Workspace, type User, type WorkspaceRole } from '@/models';
import { parseCookies, sessionCookieName, WORKSPACE_COOKIE } from './cookies';
import { authSecret } from './secret';
import { userOfSession } from './sessions';

/**
 * The one place that checks roles. Every route handler, server action and signed-in
 * page calls one of the `require…` functions; they read the signed session cookie,
 * check its session generation against the user's (lib/auth/sessions.ts), then the
 * user and membership from the database (never trusting a role in the cookie), and
 * throw AppError 401/403 otherwise.
 */
export interface Actor {
  user: User;
  isStaff: boolean;
}

export interface WorkspaceActor extends Actor {
  workspace: Workspace;
  role: WorkspaceRole;
}

export type { WorkspaceRole };

const RANK: Record<WorkspaceRole, number> = { member: 1, owner: 2 };

/** The signed-in user behind a request, or null for a visitor. */
export async function readActor(request: Request): Promise<Actor | null> {
  // The server's mail retry timer starts with the first signed-in request.
  ensureMailRetryTimer();
  const cookies = parseCookies(request.headers.get('cookie'));
  const token = await getToken({
    req: { headers: Object.fromEntries(request.headers), cookies } as never,
    secret: authSecret(),
    cookieName: sessionCookieName(),
  });
  // A cookie of an ended session (older generation: signed out everywhere, password
  // reset, workspace suspended) counts as no cookie.
  const user = await userOfSession(token);
  if (!user) return null;
  return { user, isStaff: user.isStaff };
}

export async function requireUser(request: Request): Promise<Actor> {
  const actor = await readActor(request);
  if (!actor) throw new AppError('unauthenticated', 'Sign in to continue.');
  return actor;
}

export async function requireStaff(request: Request): Promise<Actor> {
  const actor = await requireUser(request);
  if (!actor.isStaff) throw new AppError('forbidden', 'Only Partwise support staff may do this.');
  return actor;
}

/**
 * A member (or owner, when `minRole` says so) of a workspace: the one named by
 * `workspaceId`, else the current-workspace cookie, else the user's first workspace.
 */
export async function requireWorkspace(request: Request, minRole: WorkspaceRole = 'member', workspaceId?: number): Promise<WorkspaceActor> {
  const actor = await requireUser(request);
  const wanted = workspaceId ?? parseDecimalId(parseCookies(request.headers.get('cookie'))[WORKSPACE_COOKIE]) ?? undefined;
  let membership = wanted ? await Membership.findOne({ where: { userId: actor.user.id, workspaceId: wanted } }) : null;
  if (!membership && workspaceId !== undefined) throw new AppError('forbidden', 'You are not a member of that workspace.');
  // No (valid) choice: the workspace joined first, so creating another one does not move people.
  membership ??= await Membership.findOne({ where: { userId: actor.user.id }, order: [['id', 'ASC']] });
  if (!membership) throw new AppError('forbidden', actor.isStaff ? 'Staff accounts do not belong to workspaces.' : 'You are not a member of any workspace.');
  if (RANK[membership.role] < RANK[minRole]) throw new AppError('forbidden', `Only a workspace ${minRole} may do this.`);
  const workspace = await Workspace.findByPk(membership.workspaceId);
  if (!workspace) throw new AppError('forbidden', 'That workspace no longer exists.');
  return { ...actor, workspace, role: membership.role };
}
