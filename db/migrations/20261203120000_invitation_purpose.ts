import type { Knex } from 'knex';

// Password resets use the same one-time, hashed, expiring links as invitations; the purpose says
// which page copy and audit entry a link gets.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('invitations', (t) => {
    t.enu('purpose', ['invitation', 'password_reset']).notNullable().defaultTo('invitation');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('invitations', (t) => {
    t.dropColumn('purpose');
  });
}
