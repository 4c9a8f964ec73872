import bcrypt from 'bcryptjs';
import type { NextAuthOptions } from 'next-auth';
import CredentialsProvider from 'next-auth/providers/credentials';
import { z } from 'zod';
import { User } from '@/models';
import { authSecret } from './secret';
import { useSecureCookies } from './cookies';

const credentials = z.object({ email: z.string().trim().toLowerCase().email(), password: z.string().min(1).max(200) });

/**
 * next-auth with e-mail and password. Sessions are signed JWT cookies carrying only
 * the user id; roles are read from the database on every request (see guard.ts) so
 * a role change or removal takes effect at once.
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
      async authorize(raw) {
        const parsed = credentials.safeParse(raw);
        if (!parsed.success) return null;
        const user = await User.findOne({ where: { email: parsed.data.email } });
        // Compare even when the user is unknown, so timing does not reveal accounts.
        const ok = await bcrypt.compare(parsed.data.password, user?.passwordHash ?? '$2b$10$invalidinvalidinvalidinvalidinvalidinvalidinvalidinva');
        if (!user || !ok) return null;
        if (!user.emailVerifiedAt) throw new Error('unverified');
        return { id: String(user.id), email: user.email, name: user.name };
      },
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
  },
};
