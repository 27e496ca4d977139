import bcrypt from 'bcryptjs';
import type { Knex } from 'knex';
import { PASSWORD_HASH_COST } from '../../lib/auth/password';
import { DEMO_PASSWORD, DEMO_USERS } from '../../lib/demo/users';

// Re-runnable: demo users are matched by e-mail and updated in place.
export async function seed(knex: Knex): Promise<void> {
  const hash = await bcrypt.hash(DEMO_PASSWORD, PASSWORD_HASH_COST);
  for (const u of DEMO_USERS) {
    const existing = await knex('users').where({ email: u.email }).first();
    const row = { email: u.email, name: u.name, role: u.role, password_hash: hash, active: true };
    if (existing) await knex('users').where({ id: existing.id }).update(row);
    else await knex('users').insert(row);
  }
}
