import type { Knex } from 'knex';

/*
 * Settling a collection's disagreements: one row per decision the second reader (or a
 * veterinarian) takes on a disagreement between the submitted first and second reads, named by
 * the disagreement's stable key (lib/agreement: `imageId:firstMarkId:secondMarkId`) and the two
 * reads it settles. Rows are never changed: deciding a disagreement again adds a row, and the
 * latest row per key (highest id) is the decision in force, so the table is the whole history.
 *
 * `op_id` is the client-made UUID of the save: a retried or doubled request carrying the same op
 * id meets the unique key and is answered, not applied again.
 *
 * Decisions are a collection's data: the signed-report lock's triggers refuse every INSERT,
 * UPDATE and DELETE while the collection carries a signed version, like those of
 * 20261224000200_signed_report_lock.ts (same message, same share-locked lookup).
 */

export const SETTLE_DECISIONS = ['first', 'second', 'other', 'not-cell'] as const;

const refuse = `SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'signed report: the settle decisions of a collection with a signed report cannot change; amend the report first'`;
const lockOf = (row: 'NEW' | 'OLD') => `(SELECT c.signed_report_id FROM collections c WHERE c.id = ${row}.collection_id LOCK IN SHARE MODE)`;
const TRIGGERS = ['bi', 'bu', 'bd'].map((s) => `settle_decisions_signed_report_${s}`);

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('settle_decisions', (t) => {
    t.increments('id').primary();
    t.specificType('op_id', 'char(36)').notNullable().unique();
    t.integer('collection_id').unsigned().notNullable().references('collections.id');
    t.integer('first_read_id').unsigned().notNullable().references('reads.id');
    t.integer('second_read_id').unsigned().notNullable().references('reads.id');
    t.string('disagreement_key', 120).notNullable();
    t.enu('decision', [...SETTLE_DECISIONS]).notNullable();
    /** The class given, for 'other' only. */
    t.string('class_key', 40).nullable();
    t.integer('decided_by').unsigned().notNullable().references('users.id');
    t.timestamp('decided_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(['first_read_id', 'second_read_id', 'disagreement_key'], 'settle_decisions_reads_key');
    t.index(['collection_id']);
  });
  const [bi, bu, bd] = TRIGGERS;
  await knex.raw(`CREATE TRIGGER ${bi} BEFORE INSERT ON settle_decisions FOR EACH ROW
BEGIN
  IF ${lockOf('NEW')} IS NOT NULL THEN
    ${refuse};
  END IF;
END`);
  await knex.raw(`CREATE TRIGGER ${bu} BEFORE UPDATE ON settle_decisions FOR EACH ROW
BEGIN
  IF ${lockOf('OLD')} IS NOT NULL THEN
    ${refuse};
  END IF;
  IF NOT (NEW.collection_id <=> OLD.collection_id) THEN
    IF ${lockOf('NEW')} IS NOT NULL THEN
      ${refuse};
    END IF;
  END IF;
END`);
  await knex.raw(`CREATE TRIGGER ${bd} BEFORE DELETE ON settle_decisions FOR EACH ROW
BEGIN
  IF ${lockOf('OLD')} IS NOT NULL THEN
    ${refuse};
  END IF;
END`);
}

export async function down(knex: Knex): Promise<void> {
  for (const n of TRIGGERS) await knex.raw(`DROP TRIGGER IF EXISTS ${n}`);
  await knex.schema.dropTableIfExists('settle_decisions');
}
