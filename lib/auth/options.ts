import type { NextAuthOptions } from 'next-auth';
import CredentialsProvider from 'next-auth/providers/credentials';
import { authorizeCredentials } from './credentials';
import { authSecret } from './secret';
import { useSecureCookies } from './cookies';
import { SESSION_MAX_AGE_S, SessionEndedError, signInClaims, userOfSession } from './sessions';
import { safeRedirectUrl } from '@/lib/accounts/return-path';

/**
 * next-auth with e-mail and password. Sessions are signed JWT cookies (httpOnly,
 * SameSite=Lax, Secure when the app is served over https) carrying the user id and
 * session generation (lib/auth/sessions.ts); the current workspace lives in
 * WORKSPACE_COOKIE and the role in it is read from the database on every request
 * (see guard.ts), so a role change, removal or ended session takes effect at once.
 *
 * Lifetime: SESSION_MAX_AGE_S for the cookie and the JWT inside it (next-auth's JWT
 * default is 30 days, set apart from the session's). With JWT sessions next-auth
 * ignores `updateAge`; it re-signs the cookie, with a fresh expiry, each time its
 * session endpoint is asked, which the studio shell does while someone is active.
 */
export const authOptions: NextAuthOptions = {
  // Read when a request needs it, never at build time: there is no placeholder secret.
  get secret() {
    return authSecret();
  },
  session: { strategy: 'jwt', maxAge: SESSION_MAX_AGE_S },
  jwt: { maxAge: SESSION_MAX_AGE_S },
  useSecureCookies: useSecureCookies(),
  pages: { signIn: '/signin', error: '/signin' },
  logger: {
    // An ended session asking for renewal is routine (signed out everywhere); other errors are logged as next-auth would.
    error(code, metadata) {
      if (metadata instanceof SessionEndedError) return;
      console.error(`[next-auth][error][${code}]`, metadata);
    },
  },
  providers: [
    CredentialsProvider({
      name: 'E-mail and password',
      credentials: { email: { label: 'E-mail', type: 'email' }, password: { label: 'Password', type: 'password' } },
      // Throws 'unverified' / 'rate_limited', which the sign-in form explains.
      authorize: (raw, req) => authorizeCredentials(raw, req?.headers),
    }),
  ],
  callbacks: {
    async jwt({ token, user }) {
      if (user) return { ...token, ...signInClaims({ id: Number(user.id), sessionGeneration: Number((user as { sessionGeneration?: number }).sessionGeneration ?? 0) }) };
      // A renewal (the session endpoint): only a session that has not ended is signed again;
      // throwing makes next-auth clear the cookie.
      if (!(await userOfSession(token))) throw new SessionEndedError();
      return token;
    },
    async session({ session, token }) {
      if (session.user) (session.user as { id?: number }).id = token.uid as number;
      return session;
    },
    // Only paths of this app, whatever the body, query or callback-url cookie says (no open redirect, no 500).
    async redirect({ url, baseUrl }) {
      return safeRedirectUrl(url, baseUrl);
    },
  },
};
