import 'server-only';
import bcrypt from 'bcryptjs';
import { randomBytes } from 'node:crypto';
import type { NextAuthOptions } from 'next-auth';
import CredentialsProvider from 'next-auth/providers/credentials';
import { db } from '@/db/knex';
import { writeAudit } from '@/db/queries/audit';
import { safeCallbackUrl } from '@/lib/auth/callback-url';
import { PASSWORD_HASH_COST } from '@/lib/auth/password';
import { signInSucceeded, takeSignInAttempt } from '@/lib/auth/rate-limit';
import { requestAddress } from '@/lib/auth/request-address';
import type { Role } from '@/lib/auth/roles';
import { env, sessionSecret } from '@/lib/env';
import { signInSchema } from '@/lib/validations/auth';

/** Message prefix the sign-in page recognises to show the wait time. */
export const RATE_LIMITED = 'rate_limited';

/**
 * Compared against when the e-mail has no usable account, so an unknown address costs the same
 * bcrypt work as a known one and the answer's timing does not tell which e-mails have accounts.
 */
let dummyHash: Promise<string> | undefined;
const getDummyHash = () => (dummyHash ??= bcrypt.hash(randomBytes(18).toString('base64'), PASSWORD_HASH_COST));

type Outcome = 'unknown_account' | 'inactive' | 'no_password' | 'wrong_password' | 'rate_limited';

/** Failed and refused attempts go to the audit log: who was tried, from where, why it failed — never the password. */
async function auditFailure(email: string, address: string, outcome: Outcome, userId: number | null) {
  await writeAudit(db, {
    userId: null,
    action: outcome === 'rate_limited' ? 'sign_in_refused' : 'sign_in_failed',
    entity: 'user',
    entityId: userId,
    after: { email, address, reason: outcome },
  });
}

export const authOptions: NextAuthOptions = {
  // Read when a request needs it (there is no built-in fallback): a build runs without one.
  get secret() {
    return sessionSecret();
  },
  session: { strategy: 'jwt', maxAge: 12 * 60 * 60 },
  pages: { signIn: '/sign-in' },
  providers: [
    CredentialsProvider({
      name: 'Fieldmark account',
      credentials: { email: { label: 'E-mail', type: 'email' }, password: { label: 'Password', type: 'password' } },
      async authorize(credentials, req) {
        const parsed = signInSchema.safeParse(credentials);
        if (!parsed.success) return null;
        const email = parsed.data.email.toLowerCase();
        const headers = (req?.headers ?? {}) as Record<string, string | undefined>;
        const address = requestAddress((name) => headers[name]);
        const gate = await takeSignInAttempt(email, address);
        if (!gate.ok) {
          await auditFailure(email, address, 'rate_limited', null);
          throw new Error(`${RATE_LIMITED}:${gate.retryAfter}`);
        }
        const user = await db('users').where({ email }).first();
        const matches = await bcrypt.compare(parsed.data.password, user?.password_hash ?? (await getDummyHash()));
        if (!user || !user.active || !user.password_hash || !matches) {
          const outcome: Outcome = !user ? 'unknown_account' : !user.active ? 'inactive' : !user.password_hash ? 'no_password' : 'wrong_password';
          await auditFailure(email, address, outcome, user?.id ?? null);
          return null;
        }
        await signInSucceeded(email, address);
        await writeAudit(db, { userId: user.id, action: 'sign_in', entity: 'user', entityId: user.id, after: { address } });
        return { id: String(user.id), name: user.name, email: user.email, role: user.role as Role };
      },
    }),
  ],
  callbacks: {
    // Only addresses on the app's own origin are followed after sign-in or sign-out (absolute:
    // next-auth's client parses the answer with new URL()).
    async redirect({ url }) {
      return new URL(safeCallbackUrl(url, env().APP_URL) ?? '/', env().APP_URL).toString();
    },
    async jwt({ token, user }) {
      if (user) {
        token.id = Number(user.id);
        token.role = (user as unknown as { role: Role }).role;
      }
      return token;
    },
    async session({ session, token }) {
      if (session.user) {
        session.user.id = token.id as number;
        session.user.role = token.role as Role;
      }
      return session;
    },
  },
};
