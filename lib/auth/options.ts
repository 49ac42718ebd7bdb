import type { NextAuthOptions } from 'next-auth';
import CredentialsProvider from 'next-auth/providers/credentials';
import { signInSchema } from '@/lib/validation/user';
import { loadActor, verifyCredentials } from '@/lib/db/users';
import { recordLedger } from '@/lib/db/ledger';
import { recordFailure, recordSuccess, retryAfterSeconds } from './rate-limit';

/** Sessions last 12 h (SYNC.md: JWTs cannot be revoked, so keep them short and re-check them). */
export const SESSION_MAX_AGE_S = 12 * 60 * 60;

function clientAddress(headers: Record<string, string | string[] | undefined> | undefined): string {
  const fwd = headers?.['x-forwarded-for'];
  const first = (Array.isArray(fwd) ? fwd[0] : fwd)?.split(',')[0]?.trim();
  return first || String(headers?.['x-real-ip'] ?? 'local');
}

export const authOptions: NextAuthOptions = {
  session: { strategy: 'jwt', maxAge: SESSION_MAX_AGE_S },
  jwt: { maxAge: SESSION_MAX_AGE_S },
  pages: { signIn: '/signin' },
  secret: process.env.NEXTAUTH_SECRET,
  providers: [
    CredentialsProvider({
      name: 'Ebbcast',
      credentials: { email: { label: 'E-mail', type: 'email' }, password: { label: 'Password', type: 'password' } },
      async authorize(credentials, req) {
        const parsed = signInSchema.safeParse(credentials ?? {});
        if (!parsed.success) throw new Error('Enter your e-mail address and password.');
        const { email, password } = parsed.data;
        const address = clientAddress(req?.headers as Record<string, string | undefined>);
        const wait = retryAfterSeconds(email, address);
        if (wait > 0) throw new Error(`Too many failed sign-ins. Try again in ${wait} seconds.`);
        const user = await verifyCredentials(email, password);
        if (!user) {
          recordFailure(email, address);
          return null;
        }
        recordSuccess(email);
        await recordLedger({ kind: 'sign_in', userId: user.id, detail: { role: user.role } });
        return { id: user.id, email: user.email, name: user.name, role: user.role, sessionVersion: user.sessionVersion };
      },
    }),
  ],
  callbacks: {
    /**
     * Runs on sign-in and on every request that reads the session: the user's role, teams and
     * activity are re-read, so a deactivation or role change takes effect on the next request.
     */
    async jwt({ token, user }) {
      if (user) {
        token.sub = user.id;
        token.sessionVersion = (user as { sessionVersion?: number }).sessionVersion ?? 1;
      }
      if (!token.sub || token.revoked) return token;
      const actor = await loadActor(token.sub, Number(token.sessionVersion ?? 0));
      if (!actor) return { ...token, revoked: true };
      return { ...token, role: actor.role, teamIds: actor.teamIds, outbreakIds: actor.outbreakIds, name: actor.name, email: actor.email };
    },
    async session({ session, token }) {
      if (token.revoked || !token.sub || !token.role) return { ...session, user: undefined, revoked: true };
      session.user = {
        id: token.sub,
        email: token.email ?? '',
        name: token.name ?? '',
        role: token.role,
        teamIds: token.teamIds ?? [],
        outbreakIds: token.outbreakIds ?? [],
      };
      return session;
    },
  },
};
