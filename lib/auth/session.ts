import 'server-only';
import { getServerSession } from 'next-auth';
import { decode, getToken, type JWT, type JWTDecodeParams } from 'next-auth/jwt';
import { LRUCache } from 'lru-cache';
import type { NextRequest } from 'next/server';
import { redirect } from 'next/navigation';
import { cache } from 'react';
import { db } from '@/db/knex';
import { authOptions } from '@/lib/auth/options';
import type { Role } from '@/lib/auth/roles';
import { sessionSecret } from '@/lib/env';

export type CurrentUser = { id: number; name: string; email: string; role: Role; clientId: number | null };

/**
 * The signed-in user as the database knows them now: a deactivated account or a
 * changed role takes effect on the next request, not when the session cookie expires.
 */
export const getCurrentUser = cache(async (): Promise<CurrentUser | null> => {
  const session = await getServerSession(authOptions);
  return session?.user?.id ? activeUser(session.user.id) : null;
});

/**
 * Decrypted session tokens, by the encrypted token itself, for at most a minute and never
 * past the token's own expiry. Decrypting (key derivation + AES-GCM) on every request was
 * a measurable share of a mark save; the account is still read from the database each time.
 */
const decodedTokens = new LRUCache<string, { token: JWT }>({ max: 2000, ttl: 60_000 });

async function cachedDecode(params: JWTDecodeParams): Promise<JWT | null> {
  const key = params.token;
  if (!key) return null;
  const hit = decodedTokens.get(key);
  if (hit) return hit.token;
  const token = await decode(params);
  if (!token) return null;
  const msLeft = typeof token.exp === 'number' ? token.exp * 1000 - Date.now() : 0;
  if (msLeft > 0) decodedTokens.set(key, { token }, { ttl: Math.min(60_000, msLeft) });
  return token;
}

/** For route handlers: reads the session token straight from the request (no session round trip). */
export async function getRequestUser(req: NextRequest): Promise<CurrentUser | null> {
  const token = await getToken({ req, secret: sessionSecret(), decode: cachedDecode });
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
