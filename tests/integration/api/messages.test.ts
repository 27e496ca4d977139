import { describe, expect, it } from 'vitest';
import { signedIn, USERS } from '../support/http';

describe('validation messages', () => {
  it('end in one full stop, never two', async () => {
    const s = await signedIn(USERS.manager);
    // The schema's own message already ends in a full stop ("Enter a valid e-mail address.").
    const r = await s.json('/api/users', 'POST', { email: 'not-an-email', name: 'X', role: 'technician' });
    expect(r.status).toBe(422);
    expect(r.body.error.message).toBe('The input is not valid — email: Enter a valid e-mail address.');
    const q = await s.json('/api/stallions?page=-3');
    expect(q.status).toBe(422);
    expect(q.body.error.message).toMatch(/[^.]\.$/);
  });
});
