import type { Knex } from 'knex';

// Candidate cells found on each field image by a background job (lib/candidates/jobs.ts).
export async function up(knex: Knex): Promise<void> {
  // One job per image: a re-run resets it. Any app instance takes a due job with
  // SELECT … FOR UPDATE SKIP LOCKED and holds it under a lease; a lease that runs out
  // (the instance died) lets another instance take the job again.
  await knex.schema.createTable('candidate_jobs', (t) => {
    t.integer('image_id').unsigned().primary().references('field_images.id').onDelete('CASCADE');
    t.enu('status', ['waiting', 'running', 'done', 'failed']).notNullable().defaultTo('waiting');
    t.smallint('attempts').unsigned().notNullable().defaultTo(0);
    t.timestamp('run_after', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.specificType('lease_token', 'char(36)').nullable();
    t.timestamp('lease_until', { precision: 3 }).nullable();
    t.string('worker', 120).nullable();
    /** The last failure's reason, for people: kept while a retry waits, and when it fails for good. */
    t.string('error', 500).nullable();
    t.string('method', 100).nullable();
    t.json('params').nullable();
    t.integer('ms').unsigned().nullable();
    t.integer('requested_by').unsigned().nullable().references('users.id');
    t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.timestamp('started_at', { precision: 3 }).nullable();
    t.timestamp('finished_at', { precision: 3 }).nullable();
    t.index(['status', 'run_after']);
    t.index(['status', 'lease_until']);
  });
  await knex.schema.createTable('candidates', (t) => {
    t.increments('id').primary();
    t.integer('image_id').unsigned().notNullable().references('field_images.id').onDelete('CASCADE');
    // Image pixels, the marks' frame.
    t.decimal('x', 9, 2).notNullable();
    t.decimal('y', 9, 2).notNullable();
    t.decimal('score', 4, 3).notNullable();
    t.index(['image_id']);
  });
  // Images stored before this migration get their candidates too.
  await knex.raw(`insert into candidate_jobs (image_id, status) select id, 'waiting' from field_images`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('candidates');
  await knex.schema.dropTableIfExists('candidate_jobs');
}
