import type { NextAuthOptions } from 'next-auth';
import CredentialsProvider from 'next-auth/providers/credentials';
import { signInSchema } from '@/lib/schemas/auth';
import { models } from '@/models';
import { DUMMY_HASH, verifyPassword } from './password';
import { clearFailures, isBlocked, recordFailure, signInSubjects } from './throttle';
import { sessionSecret } from './secret';
import { endSession, SESSION_MAX_AGE_S } from './session';
import crypto from 'node:crypto';
import { clientAddress } from '@/lib/client-address';

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

export const authOptions: NextAuthOptions = {
  get secret() {
    return sessionSecret();
  },
  session: { strategy: 'jwt', maxAge: SESSION_MAX_AGE_S },
  pages: { signIn: '/signin', error: '/signin' },
  providers: [
    CredentialsProvider({
      name: 'E-mail and password',
      credentials: { email: { label: 'E-mail', type: 'email' }, password: { label: 'Password', type: 'password' } },
      async authorize(credentials, req) {
        const parsed = signInSchema.safeParse(credentials ?? {});
        if (!parsed.success) return null;
        const { email, password } = parsed.data;
        const subjects = signInSubjects(email, clientAddress(req?.headers as never));
        if (await isBlocked(subjects)) throw new Error('throttled');

        const user = await models().User.findOne({ where: { email } });
        const ok = await verifyPassword(password, user?.passwordHash ?? DUMMY_HASH);
        if (!user || !user.passwordHash || !ok) {
          const delay = await recordFailure(subjects);
          if (delay) await sleep(delay);
          return null;
        }
        await clearFailures(subjects.pair);
        return { id: String(user.id), email: user.email, name: user.name, sessionVersion: user.sessionVersion };
      },
    }),
  ],
  events: {
    // Signing out ends this session on the server too, so a copy of the cookie stops working.
    async signOut({ token }) {
      await endSession(token?.sid, token?.sub);
    },
  },
  callbacks: {
    async jwt({ token, user }) {
      // Set once at sign-in and kept as the token is renewed; lib/auth/session.ts compares it with the account's.
      if (user) {
        token.sub = user.id;
        token.sv = (user as { sessionVersion?: number }).sessionVersion ?? 0;
        token.sid = crypto.randomBytes(16).toString('hex');
      }
      return token;
    },
    async session({ session, token }) {
      if (session.user) (session.user as { id?: string }).id = token.sub;
      return session;
    },
  },
};
