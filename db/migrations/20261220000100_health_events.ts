import type { Knex } from 'knex';

/*
 * Health events of a stallion (fever, injury, treatment, a change of housing or light …): each
 * opens a spermatogenic window over the collections that follow. Dates are the lab's calendar
 * days (DATE, no time zone). The kinds are those of lib/health/kinds.ts as they were here; a new kind
 * needs a migration that widens the enum (tests/integration/db/health-event-kinds.test.ts checks they agree).
 */
const KINDS = ['fever', 'injury', 'illness', 'medication', 'housing', 'season_light', 'nutrition', 'other'];

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('health_events', (t) => {
    t.increments('id').primary();
    t.integer('stallion_id').unsigned().notNullable().references('stallions.id');
    t.enu('kind', KINDS).notNullable();
    t.date('started_on').notNullable();
    t.date('ended_on').nullable().comment('last day, inclusive; null for a one-day event');
    t.decimal('peak_temperature_c', 4, 1).nullable().comment('fevers: highest rectal temperature, °C');
    t.text('notes').nullable();
    t.integer('recorded_by').unsigned().notNullable().references('users.id');
    t.integer('updated_by').unsigned().nullable().references('users.id');
    t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.timestamp('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(['stallion_id', 'started_on']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('health_events');
}
