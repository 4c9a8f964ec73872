import { Op } from 'sequelize';
import bcrypt from 'bcryptjs';
import { AppError } from '@/lib/errors';
import { recordAudit } from '@/lib/audit';
import { enqueueMail } from '@/lib/mail';
import { appLink, invitationMail } from '@/lib/mail/templates';
import type { WorkspaceActor } from '@/lib/auth/guard';
import { Invitation, Membership, User, Workspace, sequelize, type WorkspaceRole } from '@/models';
import { DAY, hashToken, newLinkToken } from './tokens';
import { ACCOUNT_LIMITS, limitOrThrow } from './limits';
import { workspacePlan } from '@/lib/billing/limits';
import { seatLimitError, seatsTaken } from './seats';
import { BCRYPT_ROUNDS } from './signup';
import { assertStrongPassword } from './password-strength';

export const INVITATION_TTL_MS = 7 * DAY;

/**
 * Owners invite people by e-mail. The link carries a random token; only its SHA-256
 * is stored. Inviting the same address again replaces the open invitation (a fresh
 * link and expiry). Open invitations hold a seat of the plan.
 */
export async function createInvitation(actor: WorkspaceActor, input: { email: string; role: WorkspaceRole }, request?: Request): Promise<Invitation> {
  await limitOrThrow(`invite:workspace:${actor.workspace.id}`, ACCOUNT_LIMITS.invitesPerWorkspace, 'invitations');
  const workspaceId = actor.workspace.id;
  const existingUser = await User.findOne({ where: { email: input.email } });
  if (existingUser?.isStaff) throw new AppError('conflict', 'That address belongs to Partwise support staff, who do not join workspaces.', { issues: [{ field: 'email', message: 'Staff accounts cannot join workspaces.' }] });
  if (existingUser && (await Membership.findOne({ where: { userId: existingUser.id, workspaceId } }))) {
    throw new AppError('conflict', `${input.email} is already in this workspace.`, { issues: [{ field: 'email', message: 'Already a member of this workspace.' }] });
  }
  const { token, hash } = newLinkToken();
  const expiresAt = new Date(Date.now() + INVITATION_TTL_MS);
  // Seats are counted and the invitation written in one write transaction, so a burst of
  // invitations cannot all see the same free seat.
  const { invitation, previous } = await sequelize.transaction(async (transaction) => {
    const previous = await Invitation.findOne({ where: { workspaceId, email: input.email, acceptedAt: null }, transaction });
    const plan = await workspacePlan(workspaceId, transaction);
    if ((await seatsTaken(workspaceId, { exceptInvitationId: previous?.id, transaction })) >= plan.limits.seats) throw seatLimitError(plan);
    if (previous) await previous.destroy({ transaction });
    const invitation = await Invitation.create({ workspaceId, email: input.email, role: input.role, tokenHash: hash, invitedById: actor.user.id, expiresAt }, { transaction });
    return { invitation, previous };
  });
  await enqueueMail(invitationMail({ email: input.email, workspaceName: actor.workspace.name, inviterName: actor.user.name, role: input.role, link: appLink('/invite', { token }), expiresAt }));
  await recordAudit({ action: 'team.invited', actor: { id: actor.user.id, email: actor.user.email }, workspaceId, targetType: 'invitation', targetId: invitation.id, detail: { email: input.email, role: input.role, replaced: Boolean(previous) }, request });
  return invitation;
}

export async function revokeInvitation(actor: WorkspaceActor, id: number, request?: Request): Promise<void> {
  const invitation = await Invitation.findOne({ where: { id, workspaceId: actor.workspace.id, acceptedAt: null } });
  if (!invitation) throw new AppError('not_found', 'No open invitation with that id in this workspace.');
  await invitation.destroy();
  await recordAudit({ action: 'team.invitation_revoked', actor: { id: actor.user.id, email: actor.user.email }, workspaceId: actor.workspace.id, targetType: 'invitation', targetId: id, detail: { email: invitation.email }, request });
}

async function openInvitation(token: string): Promise<{ invitation: Invitation; workspace: Workspace }> {
  const invitation = await Invitation.findOne({ where: { tokenHash: hashToken(token) } });
  if (!invitation) throw new AppError('not_found', 'This invitation link is not valid. It may have been withdrawn or replaced by a newer invitation.');
  if (invitation.acceptedAt) throw new AppError('gone', 'This invitation was already used. Sign in to reach the workspace.');
  if (invitation.expiresAt.getTime() <= Date.now()) {
    throw new AppError('gone', `This invitation expired on ${invitation.expiresAt.toISOString().slice(0, 10)}. Ask the workspace owner to send a new one.`);
  }
  const workspace = await Workspace.findByPk(invitation.workspaceId);
  if (!workspace) throw new AppError('not_found', 'The workspace of this invitation no longer exists.');
  return { invitation, workspace };
}

export interface InvitationSummary {
  email: string;
  role: WorkspaceRole;
  workspaceName: string;
  inviterName: string;
  expiresAt: string;
  /** Whether the invited address already has an account (then: sign in to accept). */
  accountExists: boolean;
}

/** What the accept page shows before anyone decides. */
export async function describeInvitation(token: string): Promise<InvitationSummary> {
  const { invitation, workspace } = await openInvitation(token);
  const [inviter, account] = await Promise.all([User.findByPk(invitation.invitedById), User.findOne({ where: { email: invitation.email } })]);
  return { email: invitation.email, role: invitation.role, workspaceName: workspace.name, inviterName: inviter?.name ?? '', expiresAt: invitation.expiresAt.toISOString(), accountExists: Boolean(account) };
}

/**
 * Accept: an existing account must be signed in as the invited address; a new
 * person chooses a name and password here (the mailed link proves the address, so
 * the account starts verified). The seat is checked again, the plan may have changed.
 */
export async function acceptInvitation(
  token: string,
  input: { name?: string; password?: string },
  signedIn: { id: number; email: string } | null,
  request?: Request,
): Promise<{ workspaceId: number; email: string; newAccount: boolean }> {
  const { invitation, workspace } = await openInvitation(token);
  const account = await User.findOne({ where: { email: invitation.email } });
  if (signedIn && signedIn.email !== invitation.email) {
    throw new AppError('forbidden', `This invitation is for ${invitation.email}, but you are signed in as ${signedIn.email}. Sign out, then open the link again.`);
  }
  if (account && !signedIn) throw new AppError('unauthenticated', `Sign in as ${invitation.email} to accept this invitation.`);
  if (!account) {
    const issues = [];
    if (!input.name) issues.push({ field: 'name', message: 'Tell us what to call you.' });
    if (!input.password) issues.push({ field: 'password', message: 'Choose a password for your new account.' });
    if (issues.length) throw new AppError('invalid_input', 'Choose a name and a password to create your account.', { issues });
    assertStrongPassword(input.password!, { email: invitation.email, name: input.name });
  }

  // Hashing takes a while; it is done before the write transaction, which holds the lock.
  const passwordHash = account ? null : await bcrypt.hash(input.password!, BCRYPT_ROUNDS);
  const result = await sequelize.transaction(async (transaction) => {
    // Claim the invitation first, so two clicks never add two memberships.
    const [claimed] = await Invitation.update({ acceptedAt: new Date() }, { where: { id: invitation.id, acceptedAt: null }, transaction });
    if (claimed !== 1) throw new AppError('gone', 'This invitation was already used.');
    const user = account ?? (await User.create({ email: invitation.email, name: input.name!, passwordHash: passwordHash!, emailVerifiedAt: new Date(), isStaff: false }, { transaction }));
    const already = await Membership.findOne({ where: { userId: user.id, workspaceId: workspace.id }, transaction });
    if (!already) {
      const plan = await workspacePlan(workspace.id, transaction);
      if ((await seatsTaken(workspace.id, { includeInvitations: false, transaction })) >= plan.limits.seats) throw seatLimitError(plan);
      await Membership.create({ userId: user.id, workspaceId: workspace.id, role: invitation.role }, { transaction });
    }
    return { user, newAccount: !account };
  });
  await recordAudit({ action: 'team.invitation_accepted', actor: { id: result.user.id, email: result.user.email }, workspaceId: workspace.id, targetType: 'invitation', targetId: invitation.id, detail: { role: invitation.role, newAccount: result.newAccount }, request });
  return { workspaceId: workspace.id, email: result.user.email, newAccount: result.newAccount };
}

/** Open (not accepted) invitations of a workspace, newest first, expired ones flagged. */
export async function listInvitations(workspaceId: number) {
  const rows = await Invitation.findAll({ where: { workspaceId, acceptedAt: null }, order: [['createdAt', 'DESC']] });
  const now = Date.now();
  return rows.map((i) => ({ id: i.id, email: i.email, role: i.role, expiresAt: i.expiresAt.toISOString(), expired: i.expiresAt.getTime() <= now, createdAt: i.createdAt.toISOString() }));
}

/** Expired invitations older than a month carry no information; drop them. */
export async function pruneOldInvitations(): Promise<number> {
  return Invitation.destroy({ where: { acceptedAt: null, expiresAt: { [Op.lt]: new Date(Date.now() - 30 * DAY) } } });
}
