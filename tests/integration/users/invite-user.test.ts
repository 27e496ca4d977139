import { afterAll, describe, expect, it } from 'vitest';
import { closeTestDb, testDb, unique } from '../support/db';
import { signedIn, USERS } from '../support/http';
import { waitForMail } from '../support/mail';

afterAll(closeTestDb);

describe('users (lab manager)', () => {
  it('invites a technician: account made, invitation mailed with a one-time link, audit written', async () => {
    const s = await signedIn(USERS.manager);
    const email = `${unique('new')}@quillfield.example`;
    const r = await s.json('/api/users', 'POST', { email, name: 'Wren Applegarth', role: 'technician' });
    expect(r.status).toBe(201);
    expect(r.body.user).toMatchObject({ email, role: 'technician', invited: true, active: true });
    const mail = await waitForMail(email);
    expect(mail.text).toMatch(/\/invite\/[A-Za-z0-9_-]{40,}/);
    const audit = await testDb()('audit_log').where({ entity: 'user', entity_id: String(r.body.user.id), action: 'invite' }).first();
    // Who did it, what, and the before (none: a new account) and after.
    const manager = await testDb()('users').where({ email: USERS.manager }).first('id');
    expect(audit).toMatchObject({ user_id: manager.id, action: 'invite', entity: 'user', entity_id: String(r.body.user.id), before: null });
    expect(typeof audit.after === 'string' ? JSON.parse(audit.after) : audit.after).toEqual({ email, name: 'Wren Applegarth', role: 'technician' });
  });

  it('refuses a duplicate e-mail with 409 and bad input with 422, writing nothing', async () => {
    const s = await signedIn(USERS.manager);
    const before = await testDb()('users').count({ n: '*' }).first();
    const dup = await s.json('/api/users', 'POST', { email: USERS.tech, name: 'X', role: 'technician' });
    expect(dup.status).toBe(409);
    const bad = await s.json('/api/users', 'POST', { email: 'not-an-email', name: '', role: 'wizard' });
    expect(bad.status).toBe(422);
    expect(bad.body.error.issues.map((i: { path: string }) => i.path).sort()).toEqual(['email', 'name', 'role']);
    const client = await s.json('/api/users', 'POST', { email: `${unique('c')}@quillfield.example`, name: 'Y', role: 'client' });
    expect(client.status).toBe(422);
    const malformed = await s.json('/api/users', 'POST', '{not json');
    expect(malformed.status).toBe(400);
    const after = await testDb()('users').count({ n: '*' }).first();
    expect(after).toEqual(before);
  });

  it('changes a role and deactivates, and refuses to lock the manager out', async () => {
    const s = await signedIn(USERS.manager);
    const email = `${unique('role')}@quillfield.example`;
    const { body } = await s.json('/api/users', 'POST', { email, name: 'Role Change', role: 'technician' });
    const id = body.user.id;
    const r1 = await s.json(`/api/users/${id}`, 'PATCH', { role: 'veterinarian' });
    expect(r1.body.user.role).toBe('veterinarian');
    const r2 = await s.json(`/api/users/${id}`, 'PATCH', { active: false });
    expect(r2.body.user.active).toBe(false);
    const me = await testDb()('users').where({ email: USERS.manager }).first();
    const self = await s.json(`/api/users/${me.id}`, 'PATCH', { active: false });
    expect(self.status).toBe(409);
    expect((await s.json('/api/users/abc', 'PATCH', { active: false })).status).toBe(422);
    expect((await s.json('/api/users/999999', 'PATCH', { active: false })).status).toBe(404);
    const rows = await testDb()('audit_log').where({ entity: 'user', entity_id: String(id) }).pluck('action');
    expect(rows).toEqual(expect.arrayContaining(['invite', 'role_change', 'deactivate']));
  });
});
