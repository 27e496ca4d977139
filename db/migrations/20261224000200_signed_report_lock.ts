import type { Knex } from 'knex';

/*
 * The signed-report lock, in the database itself: while a collection carries a signed version
 * (`collections.signed_report_id`), every INSERT, UPDATE and DELETE of its record, reads, marks,
 * field images (their scale included) and the report's draft text is refused with SQLSTATE 45000
 * and a message starting "signed report:". The route wrapper maps that to 409 "signed report"
 * (lib/reports/lock.ts), so every write path goes through the one check, including paths added
 * later and writes that skip the app's own checks. Signing sets the lock, an amendment clears it;
 * the trigger lets through the update that changes the lock itself, and the renumbering of
 * "ejaculate of the day" (a figure derived from the lab's calendar, which a new collection on the
 * same day or a change of the lab's time zone moves).
 *
 * The child tables look their collection up with a locking read (LOCK IN SHARE MODE): it sees
 * the latest committed lock and waits for a sign-off in progress, so nothing slips in between
 * the check and the signing.
 *
 * Signed versions are frozen too: the snapshot, the code, the signer and the time never change,
 * the stored PDF, an amendment and the link to the next version are written once, and no version
 * is ever deleted ("frozen report:").
 *
 * A new column on `collections` must be added to COLLECTION_RECORD_COLUMNS by a migration that
 * re-creates the trigger (tests/integration/reports/lock.test.ts fails until it is); a new table
 * holding a collection's data gets triggers like the ones below.
 *
 * Creating triggers needs the TRIGGER privilege (the schema's owner has it); with binary logging
 * on, MariaDB also wants SUPER or log_bin_trust_function_creators=1 (README, Configuration).
 */

/** Every column of `collections` a signed report freezes: all but the lock and the day's number. */
export const COLLECTION_RECORD_COLUMNS = [
  'id', 'stallion_id', 'collected_at', 'volume_ml', 'concentration_m_per_ml', 'concentration_method', 'chamber_dilution',
  'chamber_squares', 'chamber_count_1', 'chamber_count_2', 'total_motility_pct', 'progressive_motility_pct', 'preparation',
  'optics', 'magnification', 'collected_by', 'recorded_by', 'remarks', 'created_at', 'updated_at',
];

const refuse = (what: string) => `SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'signed report: ${what} of a collection with a signed report cannot change; amend the report first'`;
const frozen = (what: string) => `SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'frozen report: ${what}'`;

/** The lock of a collection by id, read with a share lock (null when unlocked or missing). */
const lockOf = (collectionId: string) => `(SELECT c.signed_report_id FROM collections c WHERE c.id = ${collectionId} LOCK IN SHARE MODE)`;
/** The lock of the collection a read belongs to. */
const lockOfRead = (readId: string) =>
  `(SELECT c.signed_report_id FROM \`reads\` r JOIN collections c ON c.id = r.collection_id WHERE r.id = ${readId} LOCK IN SHARE MODE)`;

/** A table of a collection's data, the column that leads to the collection, and how its lock is found. */
type ChildTable = { table: string; what: string; parent: string; lock: (row: 'NEW' | 'OLD') => string };

const CHILDREN: ChildTable[] = [
  { table: 'reads', what: 'the reads', parent: 'collection_id', lock: (row) => lockOf(`${row}.collection_id`) },
  { table: 'marks', what: 'the marks', parent: 'read_id', lock: (row) => lockOfRead(`${row}.read_id`) },
  { table: 'field_images', what: 'the field images and their scale', parent: 'collection_id', lock: (row) => lockOf(`${row}.collection_id`) },
  { table: 'report_drafts', what: 'the report text', parent: 'collection_id', lock: (row) => lockOf(`${row}.collection_id`) },
];

const triggerNames = (table: string) => ['bi', 'bu', 'bd'].map((s) => `${table}_signed_report_${s}`);

export async function up(knex: Knex): Promise<void> {
  const unchanged = COLLECTION_RECORD_COLUMNS.map((c) => `NEW.\`${c}\` <=> OLD.\`${c}\``).join(' AND ');
  await knex.raw(`CREATE TRIGGER collections_signed_report_bu BEFORE UPDATE ON collections FOR EACH ROW
BEGIN
  IF OLD.signed_report_id IS NOT NULL AND NEW.signed_report_id <=> OLD.signed_report_id AND NOT (${unchanged}) THEN
    ${refuse('the record')};
  END IF;
END`);
  await knex.raw(`CREATE TRIGGER collections_signed_report_bd BEFORE DELETE ON collections FOR EACH ROW
BEGIN
  IF OLD.signed_report_id IS NOT NULL THEN
    ${refuse('the record')};
  END IF;
END`);

  for (const { table, what, parent, lock } of CHILDREN) {
    const [bi, bu, bd] = triggerNames(table);
    await knex.raw(`CREATE TRIGGER ${bi} BEFORE INSERT ON \`${table}\` FOR EACH ROW
BEGIN
  IF ${lock('NEW')} IS NOT NULL THEN
    ${refuse(what)};
  END IF;
END`);
    await knex.raw(`CREATE TRIGGER ${bu} BEFORE UPDATE ON \`${table}\` FOR EACH ROW
BEGIN
  IF ${lock('OLD')} IS NOT NULL THEN
    ${refuse(what)};
  END IF;
  -- Moved to another collection (or read): that one must be unlocked too. Nested, so the common
  -- update (same parent) costs one lookup.
  IF NOT (NEW.\`${parent}\` <=> OLD.\`${parent}\`) THEN
    IF ${lock('NEW')} IS NOT NULL THEN
      ${refuse(what)};
    END IF;
  END IF;
END`);
    await knex.raw(`CREATE TRIGGER ${bd} BEFORE DELETE ON \`${table}\` FOR EACH ROW
BEGIN
  IF ${lock('OLD')} IS NOT NULL THEN
    ${refuse(what)};
  END IF;
END`);
  }

  const same = (cols: string[]) => cols.map((c) => `NEW.\`${c}\` <=> OLD.\`${c}\``).join(' AND ');
  await knex.raw(`CREATE TRIGGER report_versions_frozen_bu BEFORE UPDATE ON report_versions FOR EACH ROW
BEGIN
  IF NOT (${same(['id', 'collection_id', 'version', 'snapshot', 'verification_code', 'signed_by', 'signed_at'])}) THEN
    ${frozen('a signed version never changes')};
  END IF;
  IF OLD.pdf_sha256 IS NOT NULL AND NOT (${same(['pdf_key', 'pdf_sha256', 'pdf_bytes', 'pdf_stored_at'])}) THEN
    ${frozen('the stored PDF of a signed version never changes')};
  END IF;
  IF OLD.amended_at IS NOT NULL AND NOT (${same(['amended_at', 'amended_by', 'amend_reason'])}) THEN
    ${frozen('an amendment is recorded once')};
  END IF;
  IF OLD.superseded_by IS NOT NULL AND NOT (${same(['superseded_by'])}) THEN
    ${frozen('a version is superseded once')};
  END IF;
END`);
  await knex.raw(`CREATE TRIGGER report_versions_frozen_bd BEFORE DELETE ON report_versions FOR EACH ROW
BEGIN
  ${frozen('a signed version is never deleted')};
END`);
}

export async function down(knex: Knex): Promise<void> {
  const names = ['collections_signed_report_bu', 'collections_signed_report_bd', ...CHILDREN.flatMap((c) => triggerNames(c.table)), 'report_versions_frozen_bu', 'report_versions_frozen_bd'];
  for (const n of names) await knex.raw(`DROP TRIGGER IF EXISTS ${n}`);
}
