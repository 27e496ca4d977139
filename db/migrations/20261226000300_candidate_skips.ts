import type { Knex } from 'knex';

/*
 * Candidates a reader skipped ("not a cell") while walking a read's candidates. Per read, like
 * marks: a read's skips are its reader's judgement and are never shown to another read, and a
 * skip is never counted. Kept by position (image pixels), not by candidate id, so a skip outlives
 * a re-run of the search that finds the same spot again. Saved by the mark-sync route: the id is
 * made in the browser, every applied change is kept by its op id (a resend is answered, not
 * applied twice), and an undone skip stays as a deleted row so a redo restores the same id.
 *
 * A collection's data: the signed-report lock's triggers (20261224000200_signed_report_lock.ts)
 * refuse every change while the collection carries a signed report.
 */

const refuse = "SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'signed report: the skipped candidates of a collection with a signed report cannot change; amend the report first'";
const lockOfRead = (readId: string) =>
  `(SELECT c.signed_report_id FROM \`reads\` r JOIN collections c ON c.id = r.collection_id WHERE r.id = ${readId} LOCK IN SHARE MODE)`;

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('candidate_skips', (t) => {
    t.specificType('id', 'char(36)').primary();
    t.integer('read_id').unsigned().notNullable().references('reads.id');
    t.integer('image_id').unsigned().notNullable().references('field_images.id');
    t.decimal('x', 9, 2).notNullable();
    t.decimal('y', 9, 2).notNullable();
    t.integer('version').unsigned().notNullable().defaultTo(1);
    t.boolean('deleted').notNullable().defaultTo(false);
    t.specificType('last_op_id', 'char(36)').notNullable();
    t.integer('updated_by').unsigned().notNullable().references('users.id');
    t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.timestamp('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(['read_id', 'deleted']);
  });
  await knex.schema.createTable('candidate_skip_ops', (t) => {
    t.specificType('op_id', 'char(36)').primary();
    t.specificType('skip_id', 'char(36)').notNullable();
    t.integer('read_id').unsigned().notNullable();
    t.integer('version').unsigned().notNullable();
    t.timestamp('applied_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
  await knex.raw(`CREATE TRIGGER candidate_skips_signed_report_bi BEFORE INSERT ON candidate_skips FOR EACH ROW
BEGIN
  IF ${lockOfRead('NEW.read_id')} IS NOT NULL THEN
    ${refuse};
  END IF;
END`);
  await knex.raw(`CREATE TRIGGER candidate_skips_signed_report_bu BEFORE UPDATE ON candidate_skips FOR EACH ROW
BEGIN
  IF ${lockOfRead('OLD.read_id')} IS NOT NULL THEN
    ${refuse};
  END IF;
  IF NOT (NEW.read_id <=> OLD.read_id) THEN
    IF ${lockOfRead('NEW.read_id')} IS NOT NULL THEN
      ${refuse};
    END IF;
  END IF;
END`);
  await knex.raw(`CREATE TRIGGER candidate_skips_signed_report_bd BEFORE DELETE ON candidate_skips FOR EACH ROW
BEGIN
  IF ${lockOfRead('OLD.read_id')} IS NOT NULL THEN
    ${refuse};
  END IF;
END`);
}

export async function down(knex: Knex): Promise<void> {
  for (const s of ['bi', 'bu', 'bd']) await knex.raw(`DROP TRIGGER IF EXISTS candidate_skips_signed_report_${s}`);
  await knex.schema.dropTableIfExists('candidate_skip_ops');
  await knex.schema.dropTableIfExists('candidate_skips');
}
