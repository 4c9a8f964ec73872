import { encode } from 'next-auth/jwt';
import { sessionCookieName, WORKSPACE_COOKIE } from '@/lib/auth/cookies';
import { authSecret } from '@/lib/auth/secret';

/** A real signed session cookie for a user, as next-auth would set after sign-in. */
export async function sessionCookie(userId: number, workspaceId?: number): Promise<string> {
  const token = await encode({ token: { uid: userId, sub: String(userId) }, secret: authSecret() });
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
