import bcrypt from 'bcryptjs';
import { AppError } from '@/lib/errors';
import { recordAudit } from '@/lib/audit';
import { enqueueMail } from '@/lib/mail';
import { appLink, passwordResetMail } from '@/lib/mail/templates';
import { consumeLimit, resetLimit } from '@/lib/rate-limit';
import { endSessions } from '@/lib/auth/sessions';
import { SIGNIN_LIMITS } from '@/lib/auth/credentials';
import { AuthToken, User, sequelize } from '@/models';
import { HOUR, hashToken, newLinkToken } from './tokens';
import { ACCOUNT_LIMITS, addressKey, limitOrThrow } from './limits';
import { BCRYPT_ROUNDS } from './signup';
import { afterResponse } from './after-response';
import { assertStrongPassword } from './password-strength';

export const RESET_TTL_MS = HOUR;

/**
 * Ask for a reset link. Answers the same for known and unknown addresses (the
 * route always says "if an account exists, a mail is on its way"), and takes the
 * same time: one lookup and one new token either way; writing the token, the mail
 * and the audit entry happen after the answer.
 */
export async function requestPasswordReset(email: string, request?: Request): Promise<void> {
  await limitOrThrow(`mail:address:${addressKey(request)}`, ACCOUNT_LIMITS.mailPerAddress, 'mail requests');
  if (!(await consumeLimit(`mail:recipient:${email}`, ACCOUNT_LIMITS.mailPerRecipient)).ok) return;
  const user = await User.findOne({ where: { email } });
  const link = newLinkToken();
  afterResponse('password reset mail', async () => {
    if (user) await issueResetLink(user, link, request);
  });
}

async function issueResetLink(user: User, { token, hash }: { token: string; hash: string }, request?: Request): Promise<void> {
  await AuthToken.destroy({ where: { userId: user.id, purpose: 'reset-password', usedAt: null } });
  await AuthToken.create({ userId: user.id, purpose: 'reset-password', tokenHash: hash, expiresAt: new Date(Date.now() + RESET_TTL_MS) });
  await enqueueMail(passwordResetMail(user, appLink('/reset-password', { token })));
  await recordAudit({ action: 'account.password_reset_requested', actor: { id: user.id, email: user.email }, targetType: 'user', targetId: user.id, request });
}

/** Use a reset link once: new password, address counts as verified (the mail proved it). */
export async function resetPassword(token: string, password: string, request?: Request): Promise<{ email: string }> {
  const row = await AuthToken.findOne({ where: { tokenHash: hashToken(token), purpose: 'reset-password' } });
  if (!row || row.usedAt) throw new AppError('not_found', 'This reset link is not valid or was already used. Ask for a new one.');
  if (row.expiresAt.getTime() < Date.now()) throw new AppError('gone', 'This reset link has expired (links work for one hour). Ask for a new one.');
  const user = await User.findByPk(row.userId);
  if (!user) throw new AppError('not_found', 'This reset link is not valid.');
  assertStrongPassword(password, user);
  const passwordHash = await bcrypt.hash(password, BCRYPT_ROUNDS);
  await sequelize.transaction(async (transaction) => {
    const [claimed] = await AuthToken.update({ usedAt: new Date() }, { where: { id: row.id, usedAt: null }, transaction });
    if (claimed !== 1) throw new AppError('not_found', 'This reset link was already used. Ask for a new one.');
    await user.update({ passwordHash, emailVerifiedAt: user.emailVerifiedAt ?? new Date() }, { transaction });
    // Whoever knew the old password may hold a session: a reset ends them all.
    await endSessions([user.id], transaction);
  });
  // A successful reset lifts the failed sign-in lock on the account.
  await resetLimit(`signin:account:${user.email}`, SIGNIN_LIMITS.perAccount);
  await recordAudit({ action: 'account.password_reset', actor: { id: user.id, email: user.email }, targetType: 'user', targetId: user.id, request });
  return { email: user.email };
}
