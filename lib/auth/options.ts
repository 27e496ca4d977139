import 'server-only';
import bcrypt from 'bcryptjs';
import type { NextAuthOptions } from 'next-auth';
import CredentialsProvider from 'next-auth/providers/credentials';
import { db } from '@/db/knex';
import { writeAudit } from '@/db/queries/audit';
import { clearSignInFailures, recordFailedSignIn, signInBlockedFor } from '@/lib/auth/rate-limit';
import type { Role } from '@/lib/auth/roles';
import { env } from '@/lib/env';
import { signInSchema } from '@/lib/validations/auth';

/** Message prefix the sign-in page recognises to show the wait time. */
export const RATE_LIMITED = 'rate_limited';

function clientAddress(headers: Record<string, unknown> | undefined): string {
  const fwd = headers?.['x-forwarded-for'];
  const first = typeof fwd === 'string' ? fwd.split(',')[0]?.trim() : undefined;
  return first || 'local';
}

export const authOptions: NextAuthOptions = {
  secret: env().NEXTAUTH_SECRET,
  session: { strategy: 'jwt', maxAge: 12 * 60 * 60 },
  pages: { signIn: '/sign-in' },
  providers: [
    CredentialsProvider({
      name: 'Fieldmark account',
      credentials: { email: { label: 'E-mail', type: 'email' }, password: { label: 'Password', type: 'password' } },
      async authorize(credentials, req) {
        const parsed = signInSchema.safeParse(credentials);
        if (!parsed.success) return null;
        const { email, password } = parsed.data;
        const address = clientAddress(req?.headers as Record<string, unknown> | undefined);
        const wait = await signInBlockedFor(email, address);
        if (wait > 0) throw new Error(`${RATE_LIMITED}:${wait}`);
        const user = await db('users').where({ email: email.toLowerCase() }).first();
        const ok = user?.active && user.password_hash && (await bcrypt.compare(password, user.password_hash));
        if (!ok) {
          await recordFailedSignIn(email, address);
          return null;
        }
        await clearSignInFailures(email);
        await writeAudit(db, { userId: user.id, action: 'sign_in', entity: 'user', entityId: user.id });
        return { id: String(user.id), name: user.name, email: user.email, role: user.role as Role };
      },
    }),
  ],
  callbacks: {
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
