import type { NextAuthOptions } from 'next-auth';
import CredentialsProvider from 'next-auth/providers/credentials';
import { signInSchema } from '@/lib/schemas/auth';
import { models } from '@/models';
import { DUMMY_HASH, verifyPassword } from './password';
import { accountSubject, addressSubject, clearFailures, isBlocked, recordFailure } from './throttle';
import { sessionSecret } from './secret';

function clientAddress(headers: Record<string, string | string[] | undefined> | undefined): string {
  const forwarded = headers?.['x-forwarded-for'];
  const first = Array.isArray(forwarded) ? forwarded[0] : forwarded;
  return first?.split(',')[0]?.trim() || 'local';
}

export const authOptions: NextAuthOptions = {
  get secret() {
    return sessionSecret();
  },
  session: { strategy: 'jwt', maxAge: 12 * 60 * 60 },
  pages: { signIn: '/signin', error: '/signin' },
  providers: [
    CredentialsProvider({
      name: 'E-mail and password',
      credentials: { email: { label: 'E-mail', type: 'email' }, password: { label: 'Password', type: 'password' } },
      async authorize(credentials, req) {
        const parsed = signInSchema.safeParse(credentials ?? {});
        if (!parsed.success) return null;
        const { email, password } = parsed.data;
        const subjects = [accountSubject(email), addressSubject(clientAddress(req?.headers as never))];
        if (await isBlocked(subjects)) throw new Error('throttled');

        const user = await models().User.findOne({ where: { email } });
        const ok = await verifyPassword(password, user?.passwordHash ?? DUMMY_HASH);
        if (!user || !user.passwordHash || !ok) {
          await recordFailure(subjects);
          return null;
        }
        await clearFailures(subjects[0]);
        return { id: String(user.id), email: user.email, name: user.name, sessionVersion: user.sessionVersion };
      },
    }),
  ],
  callbacks: {
    async jwt({ token, user }) {
      // Set once at sign-in and kept as the token is renewed; lib/auth/session.ts compares it with the account's.
      if (user) {
        token.sub = user.id;
        token.sv = (user as { sessionVersion?: number }).sessionVersion ?? 0;
      }
      return token;
    },
    async session({ session, token }) {
      if (session.user) (session.user as { id?: string }).id = token.sub;
      return session;
    },
  },
};
