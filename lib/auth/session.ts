import 'server-only';
import { getServerSession } from 'next-auth';
import { getToken } from 'next-auth/jwt';
import type { NextRequest } from 'next/server';
import { redirect } from 'next/navigation';
import { cache } from 'react';
import { db } from '@/db/knex';
import { authOptions } from '@/lib/auth/options';
import type { Role } from '@/lib/auth/roles';
import { env } from '@/lib/env';

export type CurrentUser = { id: number; name: string; email: string; role: Role; clientId: number | null };

/**
 * The signed-in user as the database knows them now: a deactivated account or a
 * changed role takes effect on the next request, not when the session cookie expires.
 */
export const getCurrentUser = cache(async (): Promise<CurrentUser | null> => {
  const session = await getServerSession(authOptions);
  return session?.user?.id ? activeUser(session.user.id) : null;
});

/** For route handlers: reads the session token straight from the request (no session round trip). */
export async function getRequestUser(req: NextRequest): Promise<CurrentUser | null> {
  const token = await getToken({ req, secret: env().NEXTAUTH_SECRET });
  return typeof token?.id === 'number' ? activeUser(token.id) : null;
}

async function activeUser(id: number): Promise<CurrentUser | null> {
  const row = await db('users').where({ id }).first('id', 'name', 'email', 'role', 'active', 'client_id');
  if (!row || !row.active) return null;
  return { id: row.id, name: row.name, email: row.email, role: row.role, clientId: row.client_id ?? null };
}

/** For pages and server actions: sends a visitor to sign in, and a wrong role to the no-access page. */
export async function requirePageUser(roles?: readonly Role[]): Promise<CurrentUser> {
  const user = await getCurrentUser();
  if (!user) redirect('/sign-in');
  if (roles && !roles.includes(user.role)) redirect('/no-access');
  return user;
}
