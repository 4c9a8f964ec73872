import { encode } from 'next-auth/jwt';
import { sessionCookieName, WORKSPACE_COOKIE } from '@/lib/auth/cookies';
import { authSecret } from '@/lib/auth/secret';
import { SESSION_MAX_AGE_S } from '@/lib/auth/session-times';

/** signInClaims without loading the models (lib/auth/sessions.ts imports them). */
function signInClaims(user: { id: number; sessionGeneration: number }) {
  return { uid: user.id, gen: user.sessionGeneration, authTime: Math.floor(Date.now() / 1000) };
}

async function currentGeneration(userId: number): Promise<number> {
  const { User } = await import('@/models');
  return (await User.findByPk(userId))?.sessionGeneration ?? 0;
}

/**
 * A real signed session cookie for a user, as next-auth would set after sign-in: with
 * the user's current session generation (read from the database unless given).
 */
export async function sessionCookie(userId: number, workspaceId?: number, opts: { generation?: number; authTime?: number; secret?: string } = {}): Promise<string> {
  const generation = opts.generation ?? (await currentGeneration(userId));
  const claims = { ...signInClaims({ id: userId, sessionGeneration: generation }), ...(opts.authTime !== undefined && { authTime: opts.authTime }) };
  const token = await encode({ token: { ...claims, sub: String(userId) }, secret: opts.secret ?? authSecret(), maxAge: SESSION_MAX_AGE_S });
  const parts = [`${sessionCookieName()}=${token}`];
  if (workspaceId) parts.push(`${WORKSPACE_COOKIE}=${workspaceId}`);
  return parts.join('; ');
}

/** Build a Request to a route handler, signed in as `userId` when given. */
export async function makeRequest(
  url: string,
  opts: { method?: string; userId?: number; workspaceId?: number; json?: unknown; body?: BodyInit; headers?: Record<string, string> } = {},
): Promise<Request> {
  const headers: Record<string, string> = { ...(opts.headers ?? {}) };
  if (opts.userId) headers.cookie = await sessionCookie(opts.userId, opts.workspaceId);
  let body = opts.body;
  if (opts.json !== undefined) {
    body = JSON.stringify(opts.json);
    headers['content-type'] ??= 'application/json';
  }
  return new Request(new URL(url, 'http://localhost:3000'), { method: opts.method ?? (body ? 'POST' : 'GET'), headers, body });
}
