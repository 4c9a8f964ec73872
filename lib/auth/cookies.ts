/** Parse a Cookie header into name → value (last one wins, values URI-decoded). */
export function parseCookies(header: string | null | undefined): Record<string, string> {
  const out: Record<string, string> = {};
  if (!header) return out;
  for (const part of header.split(';')) {
    const eq = part.indexOf('=');
    if (eq < 0) continue;
    const name = part.slice(0, eq).trim();
    const raw = part.slice(eq + 1).trim();
    try {
      out[name] = decodeURIComponent(raw);
    } catch {
      out[name] = raw;
    }
  }
  return out;
}

/** The cookie that remembers which of a user's workspaces is current. */
export const WORKSPACE_COOKIE = 'partwise.workspace';

export function useSecureCookies(): boolean {
  return (process.env.NEXTAUTH_URL ?? '').startsWith('https://');
}

export function sessionCookieName(): string {
  return useSecureCookies() ? '__Secure-next-auth.session-token' : 'next-auth.session-token';
}

/** Set-Cookie value that makes `workspaceId` the current workspace (httpOnly, a year). */
export function workspaceCookieHeader(workspaceId: number): string {
  return `${WORKSPACE_COOKIE}=${workspaceId}; Path=/; HttpOnly; SameSite=Lax; Max-Age=${365 * 24 * 3600}${useSecureCookies() ? '; Secure' : ''}`;
}

/** Set-Cookie value that removes the session cookie from this browser. */
export function clearSessionCookieHeader(): string {
  return `${sessionCookieName()}=; Path=/; HttpOnly; SameSite=Lax; Max-Age=0; Expires=Thu, 01 Jan 1970 00:00:00 GMT${useSecureCookies() ? '; Secure' : ''}`;
}
