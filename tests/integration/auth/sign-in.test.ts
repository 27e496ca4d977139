import bcrypt from 'bcryptjs';
import { afterAll, describe, expect, it } from 'vitest';
import { closeTestDb, testDb, unique } from '../support/db';
import { Session, signedIn, USERS } from '../support/http';

afterAll(closeTestDb);

async function makeUser(role = 'technician', active = true) {
  const email = `${unique('user')}@quillfield.example`;
  const [id] = await testDb()('users').insert({ email, name: 'Test Person', role, active, password_hash: await bcrypt.hash('right-password-1', 4) });
  return { id, email };
}

describe('sign-in', () => {
  it('signs in a demo user and exposes the role in the session', async () => {
    const s = await signedIn(USERS.vet);
    const r = await s.json('/api/auth/session');
    expect(r.body.user.email).toBe(USERS.vet);
    expect(r.body.user.role).toBe('veterinarian');
  });

  it('refuses a wrong password', async () => {
    const s = new Session();
    expect(await s.signIn(USERS.tech, 'not-the-password')).toBe('CredentialsSignin');
    const r = await s.json('/api/auth/session');
    expect(r.body?.user).toBeUndefined();
  });

  it('refuses a deactivated account, and its live session stops working', async () => {
    const u = await makeUser('technician');
    const s = new Session();
    expect(await s.signIn(u.email, 'right-password-1')).toBeNull();
    expect((await s.json('/api/health')).status).toBe(200);
    await testDb()('users').where({ id: u.id }).update({ active: false });
    expect((await s.json('/api/users')).status).toBe(401);
    expect(await new Session().signIn(u.email, 'right-password-1')).toBe('CredentialsSignin');
  });

  it('blocks an account after five failed attempts, even with the right password', async () => {
    const u = await makeUser();
    const s = new Session();
    for (let i = 0; i < 5; i++) expect(await s.signIn(u.email, 'wrong', '10.9.0.1')).toBe('CredentialsSignin');
    const err = await s.signIn(u.email, 'right-password-1', '10.9.0.2');
    expect(err).toMatch(/^rate_limited:\d+$/);
    // The count lives in MariaDB, so every app instance sees it.
    const row = await testDb()('sign_in_limits').where('key', `acct:${u.email}`).first();
    expect(row.points).toBeGreaterThanOrEqual(5);
  });

  it('blocks an address after many failures across accounts', async () => {
    const s = new Session();
    const address = `10.8.${Math.floor(Math.random() * 250)}.7`;
    for (let i = 0; i < 30; i++) await s.signIn(`nobody-${i}@quillfield.example`, 'x', address);
    const u = await makeUser();
    expect(await s.signIn(u.email, 'right-password-1', address)).toMatch(/^rate_limited:/);
  });
});

describe('API access', () => {
  it('answers 401 as JSON without a session', async () => {
    const r = await new Session().json('/api/users');
    expect(r.status).toBe(401);
    expect(r.body.error.code).toBe('unauthenticated');
  });

  it('answers 403 for a role that may not use the route', async () => {
    for (const email of [USERS.tech, USERS.vet, USERS.owner]) {
      const s = await signedIn(email);
      const r = await s.json('/api/users');
      expect(r.status, email).toBe(403);
      expect(r.body.error.message).toMatch(/role/);
    }
  });
});
