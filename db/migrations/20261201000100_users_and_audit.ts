import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('users', (t) => {
    t.increments('id').primary();
    t.string('email', 254).notNullable().unique();
    t.string('name', 120).notNullable();
    t.enu('role', ['technician', 'veterinarian', 'lab_manager', 'client']).notNullable();
    t.string('password_hash', 100).nullable();
    t.boolean('active').notNullable().defaultTo(true);
    t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.timestamp('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
  await knex.schema.createTable('invitations', (t) => {
    t.increments('id').primary();
    t.integer('user_id').unsigned().notNullable().references('users.id').onDelete('CASCADE');
    t.string('token_hash', 64).notNullable().unique();
    t.timestamp('expires_at', { precision: 3 }).notNullable();
    t.timestamp('used_at', { precision: 3 }).nullable();
    t.integer('created_by').unsigned().nullable().references('users.id');
    t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
  await knex.schema.createTable('audit_log', (t) => {
    t.bigIncrements('id').primary();
    t.integer('user_id').unsigned().nullable().references('users.id');
    t.string('action', 40).notNullable();
    t.string('entity', 40).notNullable();
    t.string('entity_id', 64).nullable();
    t.json('before').nullable();
    t.json('after').nullable();
    t.string('reason', 500).nullable();
    t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(['entity', 'entity_id']);
    t.index(['created_at']);
  });
  await knex.schema.createTable('lab_settings', (t) => {
    t.string('key', 64).primary();
    t.json('value').notNullable();
    t.integer('updated_by').unsigned().nullable().references('users.id');
    t.timestamp('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
  // Shape required by rate-limiter-flexible's MySQL store (kept in the database so
  // the limit holds across several app instances).
  await knex.schema.createTable('sign_in_limits', (t) => {
    t.string('key', 255).primary();
    t.integer('points').notNullable().defaultTo(0);
    t.bigInteger('expire').unsigned().nullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('sign_in_limits');
  await knex.schema.dropTableIfExists('lab_settings');
  await knex.schema.dropTableIfExists('audit_log');
  await knex.schema.dropTableIfExists('invitations');
  await knex.schema.dropTableIfExists('users');
}
