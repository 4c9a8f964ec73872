import type { NextAuthOptions } from 'next-auth';
import CredentialsProvider from 'next-auth/providers/credentials';
import { authorizeCredentials } from './credentials';
import { authSecret } from './secret';
import { useSecureCookies } from './cookies';
import { safeRedirectUrl } from '@/lib/accounts/return-path';

/**
 * next-auth with e-mail and password. Sessions are signed JWT cookies (httpOnly,
 * SameSite=Lax, Secure when the app is served over https) carrying only the user
 * id; the current workspace lives in WORKSPACE_COOKIE and the role in it is read
 * from the database on every request (see guard.ts), so a role change or removal
 * takes effect at once.
 */
export const authOptions: NextAuthOptions = {
  secret: authSecret(),
  session: { strategy: 'jwt', maxAge: 30 * 24 * 3600 },
  useSecureCookies: useSecureCookies(),
  pages: { signIn: '/signin', error: '/signin' },
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
      if (user) token.uid = Number(user.id);
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
