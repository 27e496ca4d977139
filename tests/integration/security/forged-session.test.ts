import { encode } from 'next-auth/jwt';
import { afterAll, describe, expect, it } from 'vitest';
import { BUILT_IN } from '@/lib/config/production';
import { closeTestDb, testDb } from '../support/db';
import { Session, USERS } from '../support/http';

afterAll(closeTestDb);

/** A session cookie made with next-auth's own encode(), as anyone who knows a secret can. */
async function forged(secret: string): Promise<Session> {
  const manager = await testDb()('users').where({ email: USERS.manager }).first('id', 'name', 'email');
  const token = await encode({ token: { sub: String(manager.id), id: manager.id, role: 'lab_manager', name: manager.name, email: manager.email }, secret });
  const s = new Session();
  s.setCookie('next-auth.session-token', token);
  return s;
}

describe('session tokens', () => {
  it('one signed with the secret the source used to carry is refused', async () => {
    const s = await forged(BUILT_IN.NEXTAUTH_SECRET);
    expect((await s.json('/api/users')).status).toBe(401);
    expect((await s.json('/api/auth/session')).body?.user).toBeUndefined();
    const page = await s.fetch('/admin/users');
    expect(page.status).toBe(307);
    expect(page.headers.get('location')).toMatch(/\/sign-in/);
  });

  it('one signed with this run\'s own secret is accepted (so the refusal above is the secret\'s doing)', async () => {
    const secret = process.env.NEXTAUTH_SECRET!;
    expect(secret.length).toBeGreaterThanOrEqual(43); // 32+ random bytes, base64
    expect(secret).not.toBe(BUILT_IN.NEXTAUTH_SECRET);
    const s = await forged(secret);
    expect((await s.json('/api/users')).status).toBe(200);
  });
});
