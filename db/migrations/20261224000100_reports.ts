import type { Knex } from 'knex';

/*
 * Signed reports. One row per signed version of a collection's report: the frozen snapshot
 * (lib/reports/snapshot.ts) and its verification code, who signed and when, the amendment that
 * withdrew it (reason, who, when) and the version that replaced it, and the PDF once stored
 * (object key and SHA-256). A collection carries the version that locks it (`signed_report_id`):
 * set by sign-off, cleared by an amendment; while set, the triggers of the next migration refuse
 * every change to the collection's data.
 *
 * Beside it: the veterinarian's draft text (remarks and interpretation, before signing), the PDF
 * render queue (one job per version, taken with SELECT … FOR UPDATE SKIP LOCKED under a lease),
 * and every sending of a report by e-mail with the relay's answer.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('report_versions', (t) => {
    t.increments('id').primary();
    t.integer('collection_id').unsigned().notNullable().references('collections.id');
    t.smallint('version').unsigned().notNullable();
    t.json('snapshot').notNullable();
    // Canonical form: five groups of four symbols with dashes (lib/reports/verification.ts).
    t.specificType('verification_code', 'char(24)').notNullable().unique();
    t.integer('signed_by').unsigned().notNullable().references('users.id');
    t.timestamp('signed_at', { precision: 3 }).notNullable();
    t.timestamp('amended_at', { precision: 3 }).nullable();
    t.integer('amended_by').unsigned().nullable().references('users.id');
    t.string('amend_reason', 2000).nullable();
    t.integer('superseded_by').unsigned().nullable();
    t.string('pdf_key', 300).nullable();
    t.specificType('pdf_sha256', 'char(64)').nullable();
    t.integer('pdf_bytes').unsigned().nullable();
    t.timestamp('pdf_stored_at', { precision: 3 }).nullable();
    t.unique(['collection_id', 'version']);
    t.index(['signed_at']);
  });
  await knex.schema.alterTable('report_versions', (t) => {
    t.foreign('superseded_by').references('report_versions.id');
  });
  await knex.schema.alterTable('collections', (t) => {
    t.integer('signed_report_id').unsigned().nullable().references('report_versions.id').comment('the signed version that locks this collection');
  });
  await knex.schema.createTable('report_drafts', (t) => {
    t.integer('collection_id').unsigned().primary().references('collections.id');
    t.text('remarks').nullable();
    t.text('interpretation').nullable();
    t.integer('updated_by').unsigned().notNullable().references('users.id');
    t.timestamp('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
  await knex.schema.createTable('report_pdf_jobs', (t) => {
    t.integer('report_id').unsigned().primary().references('report_versions.id');
    t.enu('status', ['waiting', 'running', 'done', 'failed']).notNullable().defaultTo('waiting');
    t.smallint('attempts').unsigned().notNullable().defaultTo(0);
    t.timestamp('run_after', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.specificType('lease_token', 'char(36)').nullable();
    t.timestamp('lease_until', { precision: 3 }).nullable();
    t.string('worker', 120).nullable();
    /** The last failure's reason, for people: kept while a retry waits and when it failed for good. */
    t.string('error', 500).nullable();
    t.integer('ms').unsigned().nullable();
    t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.timestamp('started_at', { precision: 3 }).nullable();
    t.timestamp('finished_at', { precision: 3 }).nullable();
    t.index(['status', 'run_after']);
    t.index(['status', 'lease_until']);
  });
  await knex.schema.createTable('report_sendings', (t) => {
    t.increments('id').primary();
    t.integer('report_id').unsigned().notNullable().references('report_versions.id');
    t.string('recipient', 254).notNullable();
    t.enu('status', ['sent', 'failed']).notNullable();
    /** What the relay answered (its SMTP reply), or why nothing reached it. */
    t.string('relay_response', 1000).nullable();
    t.string('message_id', 255).nullable();
    t.text('note').nullable();
    t.integer('sent_by').unsigned().notNullable().references('users.id');
    t.timestamp('sent_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(['report_id', 'sent_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('report_sendings');
  await knex.schema.dropTableIfExists('report_pdf_jobs');
  await knex.schema.dropTableIfExists('report_drafts');
  await knex.schema.alterTable('collections', (t) => {
    t.dropForeign(['signed_report_id']);
    t.dropColumn('signed_report_id');
  });
  await knex.schema.dropTableIfExists('report_versions');
}
