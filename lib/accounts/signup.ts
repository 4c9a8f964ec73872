import bcrypt from 'bcryptjs';
import { Op } from 'sequelize';
import { customAlphabet } from 'nanoid';
import { AppError } from '@/lib/errors';
import { recordAudit } from '@/lib/audit';
import { enqueueMail } from '@/lib/mail';
import { appLink, verificationMail } from '@/lib/mail/templates';
import { takeToken } from '@/lib/rate-limit';
import { DEFAULT_PLAN } from '@/lib/plans';
import { AuthToken, Membership, Subscription, User, Workspace, sequelize } from '@/models';
import type { SignUpInput } from './schemas';
import { DAY, hashToken, newLinkToken } from './tokens';
import { ACCOUNT_LIMITS, addressKey, limitOrThrow } from './limits';

export const BCRYPT_ROUNDS = 10;
export const VERIFY_TTL_MS = 2 * DAY;

const slugSuffix = customAlphabet('abcdefghijkmnpqrstuvwxyz23456789', 6);

export function slugFor(name: string): string {
  const base = name.toLowerCase().normalize('NFKD').replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 60) || 'workspace';
  return `${base}-${slugSuffix()}`;
}

/** A workspace with its creator as owner and the free plan (inside a transaction). */
export async function createOwnedWorkspace(userId: number, name: string, transaction: import('sequelize').Transaction): Promise<Workspace> {
  const workspace = await Workspace.create({ name, slug: slugFor(name) }, { transaction });
  await Membership.create({ userId, workspaceId: workspace.id, role: 'owner' }, { transaction });
  await Subscription.create({ workspaceId: workspace.id, plan: DEFAULT_PLAN, status: 'active' }, { transaction });
  return workspace;
}

/**
 * Sign-up: a user, a workspace they own on the free plan, and a verification mail.
 * Never creates staff (that is `npm run staff:add`); an address already taken —
 * staff included — is refused with a field issue.
 */
export async function signUp(input: SignUpInput, request?: Request): Promise<{ user: User; workspace: Workspace }> {
  limitOrThrow(`signup:address:${addressKey(request)}`, ACCOUNT_LIMITS.signUpPerAddress, 'sign-ups');
  const existing = await User.findOne({ where: { email: input.email } });
  if (existing) {
    throw new AppError('conflict', 'An account with this e-mail already exists. Sign in, or choose a new password if you forgot it.', {
      issues: [{ field: 'email', message: 'An account with this e-mail already exists. Sign in, or reset your password.' }],
    });
  }
  const passwordHash = await bcrypt.hash(input.password, BCRYPT_ROUNDS);
  const { user, workspace } = await sequelize.transaction(async (transaction) => {
    const user = await User.create({ email: input.email, name: input.name, passwordHash, isStaff: false }, { transaction });
    const workspace = await createOwnedWorkspace(user.id, input.workspaceName, transaction);
    return { user, workspace };
  }).catch((e: Error) => {
    // Two sign-ups racing for the same address: the unique index decides.
    if (e.name === 'SequelizeUniqueConstraintError') throw new AppError('conflict', 'An account with this e-mail already exists.', { issues: [{ field: 'email', message: 'An account with this e-mail already exists.' }] });
    throw e;
  });
  await recordAudit({ action: 'account.signed_up', actor: { id: user.id, email: user.email }, workspaceId: workspace.id, targetType: 'user', targetId: user.id, request });
  await sendVerification(user);
  return { user, workspace };
}

/** Issue a fresh verification link (older unused ones stop working) and mail it. */
export async function sendVerification(user: User): Promise<void> {
  const { token, hash } = newLinkToken();
  await AuthToken.destroy({ where: { userId: user.id, purpose: 'verify-email', usedAt: null } });
  await AuthToken.create({ userId: user.id, purpose: 'verify-email', tokenHash: hash, expiresAt: new Date(Date.now() + VERIFY_TTL_MS) });
  await enqueueMail(verificationMail(user, appLink('/verify', { token })));
}

/** Resend, answering the same whether or not the address has an unverified account. */
export async function resendVerification(email: string, request?: Request): Promise<void> {
  limitOrThrow(`mail:address:${addressKey(request)}`, ACCOUNT_LIMITS.mailPerAddress, 'mail requests');
  if (!takeToken(`mail:recipient:${email}`, ACCOUNT_LIMITS.mailPerRecipient).ok) return;
  const user = await User.findOne({ where: { email } });
  if (!user || user.emailVerifiedAt) return;
  await sendVerification(user);
}

/** Follow a verification link: marks the address verified, once. */
export async function verifyEmail(token: string, request?: Request): Promise<{ email: string }> {
  const row = await AuthToken.findOne({ where: { tokenHash: hashToken(token), purpose: 'verify-email' } });
  if (!row) throw new AppError('not_found', 'This confirmation link is not valid. It may have been replaced by a newer one; use the latest mail, or ask for a new link.');
  const user = await User.findByPk(row.userId);
  if (!user) throw new AppError('not_found', 'This confirmation link is not valid.');
  if (row.usedAt || user.emailVerifiedAt) return { email: user.email };
  if (row.expiresAt.getTime() < Date.now()) throw new AppError('gone', 'This confirmation link has expired. Ask for a new one below.');
  await sequelize.transaction(async (transaction) => {
    await row.update({ usedAt: new Date() }, { transaction });
    await user.update({ emailVerifiedAt: new Date() }, { transaction });
    await AuthToken.destroy({ where: { userId: user.id, purpose: 'verify-email', usedAt: null, id: { [Op.ne]: row.id } }, transaction });
  });
  await recordAudit({ action: 'account.email_verified', actor: { id: user.id, email: user.email }, targetType: 'user', targetId: user.id, request });
  return { email: user.email };
}
