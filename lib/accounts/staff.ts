import bcrypt from 'bcryptjs';
import { randomBytes } from 'node:crypto';
import { email as emailSchema, password as passwordSchema } from './schemas';
import { Membership, User } from '@/models';
import { BCRYPT_ROUNDS } from './signup';
import { endSessions } from '@/lib/auth/sessions';
import { judgePassword } from './password-strength';

/**
 * Staff accounts come only from the command line (`npm run staff:add -- email`).
 * They are verified at once and belong to no workspace. An address already used by
 * a customer account is refused rather than silently promoted.
 */
export async function addStaff(rawEmail: string, opts: { password?: string; name?: string } = {}): Promise<{ user: User; password: string; created: boolean }> {
  const email = emailSchema.parse(rawEmail);
  const password = opts.password ?? randomBytes(12).toString('base64url');
  passwordSchema.parse(password);
  // A chosen password gets the same strength check as everyone's; a generated one is random.
  const verdict = opts.password ? judgePassword(password, { email, name: opts.name }) : null;
  if (verdict && !verdict.ok) throw new Error(verdict.message);
  const passwordHash = await bcrypt.hash(password, BCRYPT_ROUNDS);
  const existing = await User.findOne({ where: { email } });
  if (existing && !existing.isStaff) {
    throw new Error(`${email} already has a customer account; staff must use a separate address.`);
  }
  if (existing) {
    await existing.update({ passwordHash, emailVerifiedAt: existing.emailVerifiedAt ?? new Date() });
    // A new password for a staff account ends its sessions, as a reset does.
    await endSessions([existing.id]);
    return { user: existing, password, created: false };
  }
  const user = await User.create({ email, name: opts.name ?? 'Partwise support', passwordHash, isStaff: true, emailVerifiedAt: new Date() });
  if (await Membership.count({ where: { userId: user.id } })) throw new Error('staff account unexpectedly has memberships');
  return { user, password, created: true };
}
