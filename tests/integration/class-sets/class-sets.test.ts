import { describe, expect, it } from 'vitest';
import { signedIn, USERS } from '../support/http';

describe('class sets', () => {
  it('list with the number of reads that used each set, for every staff role', async () => {
    for (const email of [USERS.manager, USERS.tech, USERS.vet]) {
      const s = await signedIn(email);
      const r = await s.json('/api/class-sets');
      expect(r.status, email).toBe(200);
      const def = r.body.classSets.find((c: { isDefault: boolean }) => c.isDefault);
      // The demo seed's first reads all used the default set.
      expect(def.reads).toBeGreaterThanOrEqual(3);
    }
  });

  it('the lab manager\'s page opens', async () => {
    const s = await signedIn(USERS.manager);
    const res = await s.fetch('/admin/class-sets');
    expect(res.status).toBe(200);
    expect(await res.text()).toContain('Class sets');
  });
});
