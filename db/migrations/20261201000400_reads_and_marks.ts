import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('class_sets', (t) => {
    t.increments('id').primary();
    t.string('name', 80).notNullable().unique();
    t.boolean('is_default').notNullable().defaultTo(false);
    t.json('classes').notNullable();
    t.integer('revision').unsigned().notNullable().defaultTo(1);
    t.integer('updated_by').unsigned().nullable().references('users.id');
    t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.timestamp('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
  await knex.schema.createTable('reads', (t) => {
    t.increments('id').primary();
    t.integer('collection_id').unsigned().notNullable().references('collections.id');
    t.enu('kind', ['first', 'second', 'settled']).notNullable();
    t.integer('reader_id').unsigned().notNullable().references('users.id');
    t.integer('class_set_id').unsigned().notNullable().references('class_sets.id');
    // The class set as it was when the read started: later edits never change old results.
    t.json('class_set_snapshot').notNullable();
    t.smallint('target_cells').unsigned().notNullable();
    t.enu('status', ['open', 'submitted']).notNullable().defaultTo('open');
    t.timestamp('started_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.timestamp('submitted_at', { precision: 3 }).nullable();
    t.unique(['collection_id', 'kind']);
  });
  await knex.schema.createTable('marks', (t) => {
    // Made in the browser (UUID v4), so a retried save never makes a second row.
    t.specificType('id', 'char(36)').primary();
    t.integer('read_id').unsigned().notNullable().references('reads.id');
    t.integer('image_id').unsigned().notNullable().references('field_images.id');
    t.decimal('x', 9, 2).notNullable();
    t.decimal('y', 9, 2).notNullable();
    t.string('class_key', 40).notNullable();
    t.json('tags').notNullable();
    // From the read's class set when written, so totals are one SUM in SQL.
    t.boolean('counts_as_sperm').notNullable();
    t.boolean('is_normal').notNullable();
    t.integer('version').unsigned().notNullable().defaultTo(1);
    // Deleted marks are kept so an undo can restore the same id.
    t.boolean('deleted').notNullable().defaultTo(false);
    t.specificType('last_op_id', 'char(36)').notNullable();
    t.integer('updated_by').unsigned().notNullable().references('users.id');
    t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.timestamp('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(['read_id', 'deleted', 'class_key']);
    t.index(['image_id', 'read_id']);
  });
  // Every applied change, by its client-made id: a resent change is answered, not applied twice.
  await knex.schema.createTable('mark_ops', (t) => {
    t.specificType('op_id', 'char(36)').primary();
    t.specificType('mark_id', 'char(36)').notNullable();
    t.integer('read_id').unsigned().notNullable();
    t.integer('version').unsigned().notNullable();
    t.timestamp('applied_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('mark_ops');
  await knex.schema.dropTableIfExists('marks');
  await knex.schema.dropTableIfExists('reads');
  await knex.schema.dropTableIfExists('class_sets');
}
