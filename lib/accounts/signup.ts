import bcrypt from 'bcryptjs';
import { Op } from 'sequelize';
import { customAlphabet } from 'nanoid';
import { AppError } from '@/lib/errors';
import { recordAudit } from '@/lib/audit';
import { enqueueMail } from '@/lib/mail';
import { appLink, signUpAttemptMail, verificationMail } from '@/lib/mail/templates';
import { consumeLimit } from '@/lib/rate-limit';
import { DEFAULT_PLAN } from '@/lib/plans';
import { AuthToken, Membership, Subscription, User, Workspace, sequelize } from '@/models';
import type { SignUpInput } from './schemas';
import { DAY, hashToken, newLinkToken } from './tokens';
import { ACCOUNT_LIMITS, addressKey, limitOrThrow } from './limits';
import { afterResponse } from './after-response';
import { assertStrongPassword } from './password-strength';

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

/** What the sign-up route answers, new address or taken alike. */
export const SIGN_UP_ANSWER = { message: 'Check your inbox: we sent a mail to that address with the next step.' };

/**
 * Sign-up: a user, a workspace they own on the free plan, and a verification mail.
 * Never creates staff (that is `npm run staff:add`). An address already taken —
 * staff included — gets the same answer as a new one (the route says "check your
 * inbox" either way); its holder is mailed that someone tried, with ways to sign in
 * or reset. The password is hashed before the lookup in both cases and the mail goes
 * out after the answer, so the time taken does not tell the two apart either.
 * Refuses weak passwords (422 on `password`) before looking at the address.
 */
export async function signUp(input: SignUpInput, request?: Request): Promise<void> {
  await limitOrThrow(`signup:address:${addressKey(request)}`, ACCOUNT_LIMITS.signUpPerAddress, 'sign-ups');
  assertStrongPassword(input.password, { email: input.email, name: input.name });
  const passwordHash = await bcrypt.hash(input.password, BCRYPT_ROUNDS);
  const existing = await User.findOne({ where: { email: input.email } });
  if (existing) return tellHolderOfSignUpAttempt(existing, request);
  let created: { user: User; workspace: Workspace };
  try {
    created = await sequelize.transaction(async (transaction) => {
      const user = await User.create({ email: input.email, name: input.name, passwordHash, isStaff: false }, { transaction });
      const workspace = await createOwnedWorkspace(user.id, input.workspaceName, transaction);
      return { user, workspace };
    });
  } catch (e) {
    // Two sign-ups racing for the same address: the unique index decides, and the loser is the "taken" case.
    const winner = (e as Error).name === 'SequelizeUniqueConstraintError' ? await User.findOne({ where: { email: input.email } }) : null;
    if (winner) return tellHolderOfSignUpAttempt(winner, request);
    throw e;
  }
  const { user, workspace } = created;
  await recordAudit({ action: 'account.signed_up', actor: { id: user.id, email: user.email }, workspaceId: workspace.id, targetType: 'user', targetId: user.id, request });
  afterResponse('verification mail', () => sendVerification(user, input.plan));
}

/** The address has an account: mail its holder (a few times per window at most), never the visitor. */
async function tellHolderOfSignUpAttempt(holder: User, request?: Request): Promise<void> {
  await recordAudit({ action: 'account.signup_address_taken', targetType: 'user', targetId: holder.id, request });
  if (!(await consumeLimit(`mail:recipient:${holder.email}`, ACCOUNT_LIMITS.mailPerRecipient)).ok) return;
  afterResponse('sign-up attempt mail', async () => {
    await enqueueMail(signUpAttemptMail(holder, { signIn: appLink('/signin', { email: holder.email }), reset: appLink('/forgot-password') }));
  });
}

/** Issue a fresh verification link (older unused ones stop working) and mail it. */
export async function sendVerification(user: User, plan?: string): Promise<void> {
  const { token, hash } = newLinkToken();
  await AuthToken.destroy({ where: { userId: user.id, purpose: 'verify-email', usedAt: null } });
  await AuthToken.create({ userId: user.id, purpose: 'verify-email', tokenHash: hash, expiresAt: new Date(Date.now() + VERIFY_TTL_MS) });
  // A plan picked before signing up rides along in the link, so sign-in can lead to it.
  await enqueueMail(verificationMail(user, appLink('/verify', plan ? { token, plan } : { token })));
}

/** Resend, answering the same whether or not the address has an unverified account. */
export async function resendVerification(email: string, request?: Request): Promise<void> {
  await limitOrThrow(`mail:address:${addressKey(request)}`, ACCOUNT_LIMITS.mailPerAddress, 'mail requests');
  if (!(await consumeLimit(`mail:recipient:${email}`, ACCOUNT_LIMITS.mailPerRecipient)).ok) return;
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
