import bcrypt from 'bcryptjs';
import { afterAll, describe, expect, it } from 'vitest';
import { closeTestDb, testDb, unique } from '../support/db';
import { PASSWORD_HASH_COST } from '@/lib/auth/password';
import { randomLoopback, Session, signedIn, USERS } from '../support/http';

afterAll(closeTestDb);

async function makeUser(role = 'technician', active = true, cost = 4) {
  const email = `${unique('user')}@quillfield.example`;
  const [id] = await testDb()('users').insert({ email, name: 'Test Person', role, active, password_hash: await bcrypt.hash('right-password-1', cost) });
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

  it('blocks an account after five failed attempts from one address, even with the right password', async () => {
    const u = await makeUser();
    const s = new Session({ from: randomLoopback() });
    for (let i = 0; i < 5; i++) expect(await s.signIn(u.email, 'wrong')).toBe('CredentialsSignin');
    const err = await s.signIn(u.email, 'right-password-1');
    expect(err).toMatch(/^rate_limited:\d+$/);
    // The counts live in MariaDB, so every app instance sees them.
    const row = await testDb()('sign_in_limits').where('key', `acct:${u.email}`).first();
    expect(row.points).toBeGreaterThanOrEqual(5);
  });
});

describe('sign-in limits', () => {
  type Entry = { action: string; after: { email: string; address: string; reason: string } };
  const passwordChecks = async (email: string): Promise<Entry[]> =>
    (await testDb()('audit_log').where({ entity: 'user' }).whereIn('action', ['sign_in_failed', 'sign_in_refused']).whereRaw("json_value(`after`, '$.email') = ?", [email]).select('action', 'after')).map(
      (r: { action: string; after: unknown }) => ({ action: r.action, after: typeof r.after === 'string' ? JSON.parse(r.after) : r.after }),
    );

  it('an attacker from one address cannot lock the owner out: they sign in from their own', async () => {
    const u = await makeUser();
    const attacker = new Session({ from: randomLoopback() });
    for (let i = 0; i < 6; i++) await attacker.signIn(u.email, `guess-${i}`);
    expect(await attacker.signIn(u.email, 'right-password-1')).toMatch(/^rate_limited:/);
    expect(await new Session({ from: randomLoopback() }).signIn(u.email, 'right-password-1')).toBeNull();
  });

  it('keys on the socket address: an X-Forwarded-For the client writes changes nothing', async () => {
    const u = await makeUser();
    const from = randomLoopback();
    const s = new Session({ from });
    for (let i = 0; i < 5; i++) expect(await s.signIn(u.email, 'wrong', `203.0.113.${i + 1}`)).toBe('CredentialsSignin');
    expect(await s.signIn(u.email, 'right-password-1', '203.0.113.99')).toMatch(/^rate_limited:/);
    const keys = await testDb()('sign_in_limits').where('key', 'like', 'addr:%').pluck('key');
    expect(keys).toContain(`addr:${from}`);
    expect(keys.filter((k: string) => k.includes('203.0.113.'))).toEqual([]);
    const [audit] = await passwordChecks(u.email);
    expect(audit!.after.address).toBe(from);
  });

  it('counts before checking: 20 parallel attempts get 5 password checks, and each is audited without the password', async () => {
    const u = await makeUser();
    const from = randomLoopback();
    const answers = await Promise.all(Array.from({ length: 20 }, (_, i) => new Session({ from }).signIn(u.email, `parallel-guess-${i}`)));
    // Separate sessions from one address: the limit is the address's, not the cookie jar's.
    expect(answers.filter((a) => a === 'CredentialsSignin')).toHaveLength(5);
    expect(answers.filter((a) => a?.startsWith('rate_limited:'))).toHaveLength(15);
    const audit = await passwordChecks(u.email);
    expect(audit.filter((a) => a.action === 'sign_in_failed')).toHaveLength(5);
    expect(audit.filter((a) => a.action === 'sign_in_refused')).toHaveLength(15);
    expect(JSON.stringify(audit)).not.toMatch(/parallel-guess/);
    expect(audit.find((a) => a.action === 'sign_in_failed')!.after).toEqual({ email: u.email, address: from, reason: 'wrong_password' });
    expect(audit.find((a) => a.action === 'sign_in_refused')!.after).toEqual({ email: u.email, address: from, reason: 'rate_limited' });
  });

  it('an unknown e-mail costs one password comparison, like a known one', async () => {
    // Check value: bcrypt at cost 10 takes tens of milliseconds here, an account lookup well under
    // ten (common practice: compare against a dummy hash so timing does not reveal accounts).
    const known = await makeUser('technician', true, PASSWORD_HASH_COST);
    const time = async (email: string) => {
      const s = new Session({ from: randomLoopback() });
      await s.json('/api/auth/csrf');
      const t0 = performance.now();
      await s.signIn(email, 'not-the-password');
      return performance.now() - t0;
    };
    const unknownTimes: number[] = [];
    const knownTimes: number[] = [];
    for (let i = 0; i < 5; i++) {
      unknownTimes.push(await time(`${unique('nobody')}@quillfield.example`));
      knownTimes.push(await time(known.email));
    }
    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
    expect(median(unknownTimes) / median(knownTimes)).toBeGreaterThan(0.6);
  });

  it('blocks an address after many attempts, whatever the accounts', async () => {
    const from = randomLoopback();
    // Two accounts, 50 tries each: each is refused for itself after 5, and every try counts for the address.
    for (const account of [unique('nobody-a'), unique('nobody-b')]) {
      for (let i = 0; i < 50; i += 10) await Promise.all(Array.from({ length: 10 }, () => new Session({ from }).signIn(`${account}@quillfield.example`, 'x')));
    }
    const u = await makeUser();
    expect(await new Session({ from }).signIn(u.email, 'right-password-1')).toMatch(/^rate_limited:/);
    expect(await new Session({ from: randomLoopback() }).signIn(u.email, 'right-password-1')).toBeNull();
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
