import { Op, type Transaction } from 'sequelize';
import { recordAudit } from '@/lib/audit';
import { Membership, User } from '@/models';
import { SESSION_ABSOLUTE_MAX_S } from './session-times';

/**
 * Session lifetime and the per-user session generation. A session cookie is a signed
 * JWT carrying the user id (`uid`), the generation the person signed in under (`gen`)
 * and when they signed in (`authTime`, seconds). It lasts SESSION_MAX_AGE_S and is
 * renewed while the person is active (the studio shell asks next-auth's session
 * endpoint, which re-signs the cookie; see components/studio-shell/SessionRenewal.tsx),
 * but never past SESSION_ABSOLUTE_MAX_S after the sign-in. Adding one to
 * `users.session_generation` ends every session of that person at once: the guard
 * refuses cookies of an older generation on every request.
 */
export { SESSION_ABSOLUTE_MAX_S, SESSION_MAX_AGE_S, SESSION_RENEW_EVERY_MS } from './session-times';

/** Thrown by the renewal of an ended session; next-auth then clears the cookie (not worth an error log). */
export class SessionEndedError extends Error {
  constructor() {
    super('This session has ended; sign in again.');
  }
}

/** A decoded session JWT (next-auth's JWT type is an open record). */
export type SessionClaims = Record<string, unknown>;

/** The claims a fresh sign-in writes into the session JWT. */
export function signInClaims(user: { id: number; sessionGeneration: number }, now = Date.now()): { uid: number; gen: number; authTime: number } {
  return { uid: user.id, gen: user.sessionGeneration, authTime: Math.floor(now / 1000) };
}

/**
 * Whether a decoded session token still stands for `user`: same generation, and the
 * sign-in not older than the absolute limit. Cookies from before generations existed
 * carry no `gen` and are refused.
 */
export function sessionIsCurrent(token: SessionClaims, user: Pick<User, 'id' | 'sessionGeneration'>, now = Date.now()): boolean {
  if (Number(token.uid) !== user.id) return false;
  if (typeof token.gen !== 'number' || token.gen !== user.sessionGeneration) return false;
  if (typeof token.authTime !== 'number' || !Number.isFinite(token.authTime)) return false;
  const age = now / 1000 - token.authTime;
  // A little tolerance for clocks; a sign-in "from the future" is not a real one.
  return age >= -60 && age <= SESSION_ABSOLUTE_MAX_S;
}

/** The user a session token stands for, or null when it names nobody or has ended. */
export async function userOfSession(token: SessionClaims | null | undefined): Promise<User | null> {
  const uid = Number(token?.uid);
  if (!token || !Number.isInteger(uid) || uid <= 0) return null;
  const user = await User.findByPk(uid);
  if (!user || !sessionIsCurrent(token, user)) return null;
  return user;
}

/** End every session of these people (sign out everywhere, password reset). */
export async function endSessions(userIds: number[], transaction?: Transaction): Promise<void> {
  if (!userIds.length) return;
  await User.increment('sessionGeneration', { by: 1, where: { id: { [Op.in]: userIds } }, transaction });
}

/** End every session of a workspace's members (its suspension); returns whose. */
export async function endWorkspaceSessions(workspaceId: number, transaction?: Transaction): Promise<number[]> {
  const members = await Membership.findAll({ where: { workspaceId }, attributes: ['userId'], transaction });
  const ids = [...new Set(members.map((m) => m.userId))];
  await endSessions(ids, transaction);
  return ids;
}

/** "Sign out everywhere": every session of the signed-in person ends, this one included. */
export async function signOutEverywhere(user: User, request?: Request): Promise<void> {
  await endSessions([user.id]);
  await recordAudit({ action: 'auth.signed_out_everywhere', actor: { id: user.id, email: user.email }, targetType: 'user', targetId: user.id, request });
}
