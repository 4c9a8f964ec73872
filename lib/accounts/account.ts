import { assertStrongPassword } from './password-strength';
import { endSessions } from '@/lib/auth/sessions';
import bcrypt from 'bcryptjs';
import { Op } from 'sequelize';
import { recordAudit } from '@/lib/audit';
import { AppError } from '@/lib/errors';
import { getPlan } from '@/lib/plans';
import { invalidateWorkspace } from '@/lib/scoring/served';
import { AuthToken, Membership, Subscription, User, Workspace, sequelize } from '@/models';
import type { ChangePasswordInput, DeleteAccountInput, UpdateProfileInput } from './account-schemas';
import { limitOrThrow } from './limits';
import { BCRYPT_ROUNDS } from './signup';

/**
 * The signed-in person's own account: their name, their password, and deleting the
 * account. Callers have checked the session (lib/auth requireUser); everything here
 * acts on that one user.
 */

/** Wrong current passwords are limited per account, like sign-in, so the page is no guessing oracle. */
const PASSWORD_CHECKS = { limit: 5, windowMs: 15 * 60_000 };

async function checkPassword(user: User, typed: string, field: string): Promise<void> {
  await limitOrThrow(`account:password-check:${user.id}`, PASSWORD_CHECKS, 'password attempts');
  if (!(await bcrypt.compare(typed, user.passwordHash))) {
    throw new AppError('invalid_input', 'That is not your current password.', { issues: [{ field, message: 'That is not your current password.' }] });
  }
}

export async function updateProfile(user: User, input: UpdateProfileInput, request?: Request): Promise<User> {
  const before = user.name;
  if (before === input.name) return user;
  await user.update({ name: input.name });
  await recordAudit({ action: 'account.name_changed', actor: { id: user.id, email: user.email }, targetType: 'user', targetId: user.id, detail: { from: before, to: input.name }, request });
  return user;
}

/**
 * A new password, given the current one. Open reset links are withdrawn (they were
 * asked for under the old password).
 */
export async function changePassword(user: User, input: ChangePasswordInput, request?: Request): Promise<void> {
  await checkPassword(user, input.currentPassword, 'currentPassword');
  assertStrongPassword(input.newPassword, { email: user.email, name: user.name }, 'newPassword');
  const passwordHash = await bcrypt.hash(input.newPassword, BCRYPT_ROUNDS);
  await sequelize.transaction(async (transaction) => {
    await user.update({ passwordHash }, { transaction });
    await AuthToken.destroy({ where: { userId: user.id, purpose: 'reset-password', usedAt: null }, transaction });
    // Whoever knew the old password may hold a session: every session ends, this one too.
    await endSessions([user.id], transaction);
  });
  await recordAudit({ action: 'account.password_changed', actor: { id: user.id, email: user.email }, targetType: 'user', targetId: user.id, request });
}

/** What deleting the account would do to each workspace the person belongs to. */
export interface DeletionPlan {
  /** Workspaces that stop the deletion, each with the reason in words. */
  blockers: { workspaceId: number; workspaceName: string; kind: 'only-owner' | 'paid-plan'; reason: string }[];
  /** Workspaces where the person is the only one: deleted with the account, data and all. */
  deletedWorkspaces: { id: number; name: string }[];
  /** Workspaces the person simply leaves. */
  leftWorkspaces: { id: number; name: string }[];
}

export async function deletionPlan(userId: number): Promise<DeletionPlan> {
  const mine = await Membership.findAll({ where: { userId } });
  const plan: DeletionPlan = { blockers: [], deletedWorkspaces: [], leftWorkspaces: [] };
  for (const m of mine) {
    const workspace = await Workspace.findByPk(m.workspaceId, { attributes: ['id', 'name'] });
    if (!workspace) continue;
    const others = await Membership.findAll({ where: { workspaceId: m.workspaceId, userId: { [Op.ne]: userId } }, attributes: ['role'] });
    if (others.length === 0) {
      const subscription = await Subscription.findOne({ where: { workspaceId: workspace.id } });
      // A paid plan still in force would go on charging after its workspace is gone.
      const paid = subscription && getPlan(subscription.plan).monthlyPrice > 0 && ['active', 'trialing', 'past_due'].includes(subscription.status) && !subscription.cancelAtPeriodEnd;
      if (paid) {
        plan.blockers.push({ workspaceId: workspace.id, workspaceName: workspace.name, kind: 'paid-plan', reason: `${workspace.name} has a paid plan. Cancel it on the Billing page first, so nothing is charged after the workspace is gone.` });
      } else {
        plan.deletedWorkspaces.push({ id: workspace.id, name: workspace.name });
      }
    } else if (m.role === 'owner' && !others.some((o) => o.role === 'owner')) {
      const people = `${others.length} other ${others.length === 1 ? 'person' : 'people'}`;
      plan.blockers.push({
        workspaceId: workspace.id,
        workspaceName: workspace.name,
        kind: 'only-owner',
        reason: `You are the only owner of ${workspace.name}, which has ${people}. On its Team page, make someone else an owner (or remove everyone else) first; then you can delete your account.`,
      });
    } else {
      plan.leftWorkspaces.push({ id: workspace.id, name: workspace.name });
    }
  }
  return plan;
}

/**
 * Delete the account: confirmed by typing its e-mail address and the password. The
 * person's sessions end with it (every session is checked against the user row);
 * workspaces where they were alone go too; the audit trail keeps its entries.
 */
export async function deleteAccount(user: User, input: DeleteAccountInput, request?: Request): Promise<DeletionPlan> {
  if (input.confirmEmail !== user.email.toLowerCase()) {
    throw new AppError('invalid_input', 'Type the e-mail address of this account to confirm.', { issues: [{ field: 'confirmEmail', message: `Type ${user.email} exactly, to confirm.` }] });
  }
  await checkPassword(user, input.password, 'password');
  const plan = await deletionPlan(user.id);
  if (plan.blockers.length) {
    throw new AppError('conflict', plan.blockers.map((b) => b.reason).join(' '), { issues: plan.blockers.map((b) => ({ field: `workspace ${b.workspaceName}`, message: b.reason })) });
  }
  await sequelize.transaction(async (transaction) => {
    // Rows that point at the user cascade (memberships, tokens, invitations sent) or keep a blank author.
    if (plan.deletedWorkspaces.length) await Workspace.destroy({ where: { id: plan.deletedWorkspaces.map((w) => w.id) }, transaction });
    await User.destroy({ where: { id: user.id }, transaction });
  });
  for (const w of plan.deletedWorkspaces) {
    // Its calculators stop at once, not when the scoring cache happens to expire.
    invalidateWorkspace(w.id);
    await recordAudit({ action: 'workspace.deleted', actor: { id: user.id, email: user.email }, workspaceId: w.id, targetType: 'workspace', targetId: w.id, detail: { name: w.name, reason: 'owner deleted their account' }, request });
  }
  await recordAudit({
    action: 'account.deleted',
    actor: { id: user.id, email: user.email },
    targetType: 'user',
    targetId: user.id,
    detail: { email: user.email, left: plan.leftWorkspaces.map((w) => w.name), deletedWorkspaces: plan.deletedWorkspaces.map((w) => w.name) },
    request,
  });
  return plan;
}
