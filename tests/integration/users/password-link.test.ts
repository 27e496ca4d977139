import bcrypt from 'bcryptjs';
import { afterAll, describe, expect, it } from 'vitest';
import { closeTestDb, testDb, unique } from '../support/db';
import { APP_URL, Session, signedIn, USERS } from '../support/http';
import { mailsTo, waitForMail } from '../support/mail';

afterAll(closeTestDb);

async function makeUser(password: string | null = 'old-password-123') {
  const email = `${unique('forgot')}@quillfield.example`;
  const [id] = await testDb()('users').insert({ email, name: 'Fern Oakhollow', role: 'technician', active: true, password_hash: password && (await bcrypt.hash(password, 4)) });
  return { id: Number(id), email };
}

const linkIn = (text: string) => /https?:\/\/\S+\/invite\/([A-Za-z0-9_-]+)/.exec(text)?.[1] ?? '';

describe('password reset by a lab manager', () => {
  it('mails a one-time link that expires; earlier links stop working; the old password works until the new one is set', async () => {
    const manager = await signedIn(USERS.manager);
    const u = await makeUser();
    const first = await manager.json(`/api/users/${u.id}/password-link`, 'POST');
    expect(first.status).toBe(200);
    expect(first.body.purpose).toBe('password_reset');
    const token1 = linkIn((await waitForMail(u.email)).text);
    expect(token1).toMatch(/^[A-Za-z0-9_-]{40,}$/);
    // Stored hashed, as invitations are, with a short expiry.
    const row = await testDb()('invitations').where({ user_id: u.id }).orderBy('id', 'desc').first();
    expect(row.token_hash).toMatch(/^[0-9a-f]{64}$/);
    expect(row.token_hash).not.toContain(token1);
    expect(row.purpose).toBe('password_reset');
    expect(new Date(row.expires_at).getTime() - Date.now()).toBeLessThanOrEqual(24 * 3600e3 + 60e3);

    const page = await (await fetch(`${APP_URL}/invite/${token1}`)).text();
    expect(page).toContain('Set a new password');

    await manager.json(`/api/users/${u.id}/password-link`, 'POST');
    await expect.poll(async () => (await mailsTo(u.email)).length).toBe(2);
    const mails = await mailsTo(u.email);
    const token2 = linkIn(mails[mails.length - 1]!.text);
    expect(token2).not.toBe(token1);
    expect(await (await fetch(`${APP_URL}/invite/${token1}`)).text()).toContain('This link cannot be used');
    expect(await (await fetch(`${APP_URL}/invite/${token2}`)).text()).toContain('Set a new password');
    // Until then the current password still signs in.
    expect(await new Session().signIn(u.email, 'old-password-123')).toBeNull();
    const audit = await testDb()('audit_log').where({ entity: 'user', entity_id: String(u.id) }).pluck('action');
    expect(audit.filter((a: string) => a === 'password_reset_sent')).toHaveLength(2);
  });

  it('sends a fresh invitation to someone who never set a password', async () => {
    const manager = await signedIn(USERS.manager);
    const u = await makeUser(null);
    const r = await manager.json(`/api/users/${u.id}/password-link`, 'POST');
    expect(r.body.purpose).toBe('invitation');
    expect((await waitForMail(u.email)).subject).toBe('Your Fieldmark account');
  });

  it('is for lab managers only, never for a deactivated account, and says so', async () => {
    const u = await makeUser();
    for (const email of [USERS.tech, USERS.vet, USERS.owner]) {
      expect((await (await signedIn(email)).json(`/api/users/${u.id}/password-link`, 'POST')).status, email).toBe(403);
    }
    await testDb()('users').where({ id: u.id }).update({ active: false });
    const manager = await signedIn(USERS.manager);
    const r = await manager.json(`/api/users/${u.id}/password-link`, 'POST');
    expect(r.status).toBe(409);
    expect(r.body.error.message).toMatch(/reactivate/i);
    expect((await manager.json('/api/users/999999/password-link', 'POST')).status).toBe(404);
    expect(await mailsTo(u.email)).toEqual([]);
  });
});
