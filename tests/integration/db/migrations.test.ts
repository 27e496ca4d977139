import { readdirSync } from 'node:fs';
import knexFactory, { type Knex } from 'knex';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { knexConfig } from '@/knexfile';

/*
 * Migrates a scratch database one step at a time, up and then down. Each migration has a step
 * here that writes rows into what it made and checks them (and every earlier step's rows) after
 * each later move, up or down. A new migration needs its own step: the first test fails until it
 * has one.
 * Runs as the schema's owner, like scripts/db.ts: the app account may not create or alter tables.
 */
const NAME = `${process.env.DB_NAME ?? 'fieldmark'}_migrations`;
let admin: Knex;
let db: Knex;

beforeAll(async () => {
  admin = knexFactory(knexConfig(undefined, 'owner'));
  await admin.raw('DROP DATABASE IF EXISTS ??', [NAME]);
  await admin.raw('CREATE DATABASE ?? CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci', [NAME]);
  db = knexFactory(knexConfig(NAME, 'owner'));
});

afterAll(async () => {
  await db?.destroy();
  await admin.raw('DROP DATABASE IF EXISTS ??', [NAME]);
  await admin.destroy();
});

const json = (v: unknown) => (typeof v === 'string' ? JSON.parse(v) : v);
const tables = async () => ((await db.raw('SHOW TABLES'))[0] as Record<string, string>[]).map((r) => Object.values(r)[0]!).filter((n) => !n.startsWith('knex_')).sort();
const columns = async (table: string) => Object.keys(await db(table).columnInfo()).sort();

const snapshot = {
  name: 'Migration set',
  classes: [
    { key: 'normal', name: 'Normal', group: 'normal', hotkey: '1', colour: '#009E73', shape: 'circle', countsAsSperm: true },
    { key: 'bent_tail', name: 'Bent tail', group: 'tail', hotkey: '2', colour: '#FFFFFF', shape: 'star', countsAsSperm: true },
    { key: 'round_cell', name: 'Round cell', group: 'non_sperm', hotkey: 'r', colour: '#BBBBBB', shape: 'ring', countsAsSperm: false },
  ],
};
const MARKS = [
  { id: '00000000-0000-4000-8000-000000000001', class_key: 'normal', sperm: true, normal: true },
  { id: '00000000-0000-4000-8000-000000000002', class_key: 'bent_tail', sperm: true, normal: false },
  { id: '00000000-0000-4000-8000-000000000003', class_key: 'round_cell', sperm: false, normal: false },
];
const ids: Record<string, number> = {};

/** What each migration made: rows written just after it ran, checked after every later move. */
const STEPS: Record<string, { tables: string[]; write(): Promise<void>; check(): Promise<void> }> = {
  '20261201000100_users_and_audit.ts': {
    tables: ['audit_log', 'invitations', 'lab_settings', 'sign_in_limits', 'users'],
    async write() {
      [ids.user] = await db('users').insert({ email: 'keep@quillfield.example', name: 'Keep', role: 'technician' });
      await db('audit_log').insert({ user_id: ids.user, action: 'create', entity: 'user', entity_id: String(ids.user), after: JSON.stringify({ name: 'Keep' }) });
      await db('lab_settings').insert({ key: 'lab', value: JSON.stringify({ targetCells: 150 }) });
    },
    async check() {
      expect(await db('users').where({ id: ids.user }).first('email', 'role')).toEqual({ email: 'keep@quillfield.example', role: 'technician' });
      expect(json((await db('audit_log').where({ entity_id: String(ids.user) }).first()).after)).toEqual({ name: 'Keep' });
      expect(json((await db('lab_settings').where({ key: 'lab' }).first()).value)).toEqual({ targetCells: 150 });
    },
  },
  '20261201000200_clients_stallions_collections.ts': {
    tables: ['clients', 'collections', 'stallions', 'testis_measurements'],
    async write() {
      [ids.client] = await db('clients').insert({ name: 'Keep Owner' });
      [ids.stallion] = await db('stallions').insert({ name: 'Keep Stallion', client_id: ids.client });
      [ids.collection] = await db('collections').insert({ stallion_id: ids.stallion, collected_at: new Date('2026-05-01T09:00:00Z'), volume_ml: 55.5, recorded_by: ids.user });
      await db('testis_measurements').insert({ stallion_id: ids.stallion, measured_on: '2026-05-01', left_length_cm: 10, recorded_by: ids.user });
    },
    async check() {
      expect(await db('users').where({ id: ids.user }).first('client_id')).toEqual({ client_id: null });
      expect(await db('stallions').where({ id: ids.stallion }).first('name', 'client_id')).toEqual({ name: 'Keep Stallion', client_id: ids.client });
      const c = await db('collections').where({ id: ids.collection }).first();
      expect([c.stallion_id, Number(c.volume_ml), new Date(c.collected_at).toISOString()]).toEqual([ids.stallion, 55.5, '2026-05-01T09:00:00.000Z']);
      expect(await db('testis_measurements').where({ stallion_id: ids.stallion }).first('measured_on')).toEqual({ measured_on: '2026-05-01' });
    },
  },
  '20261201000300_field_images.ts': {
    tables: ['field_images'],
    async write() {
      [ids.image] = await db('field_images').insert({
        collection_id: ids.collection, file_name: 'keep.jpg', format: 'jpeg', bytes: 1234, width: 800, height: 600, sha256: 'a'.repeat(64),
        original_key: 'o', display_key: 'd', thumb_key: 't', display_width: 800, display_height: 600, uploaded_by: ids.user,
      });
    },
    async check() {
      expect(await db('field_images').where({ id: ids.image }).first('file_name', 'width', 'collection_id')).toEqual({ file_name: 'keep.jpg', width: 800, collection_id: ids.collection });
    },
  },
  '20261201000400_reads_and_marks.ts': {
    tables: ['class_sets', 'mark_ops', 'marks', 'reads'],
    async write() {
      [ids.set] = await db('class_sets').insert({ name: snapshot.name, is_default: true, classes: JSON.stringify(snapshot.classes) });
      [ids.read] = await db('reads').insert({ collection_id: ids.collection, kind: 'first', reader_id: ids.user, class_set_id: ids.set, class_set_snapshot: JSON.stringify(snapshot), target_cells: 200 });
      // This migration's marks carry the flags; the next one drops them.
      await db('marks').insert(
        MARKS.map((m, i) => ({
          id: m.id, read_id: ids.read, image_id: ids.image, x: 10 + i, y: 20, class_key: m.class_key, tags: '[]',
          counts_as_sperm: m.sperm, is_normal: m.normal, last_op_id: m.id, updated_by: ids.user,
        })),
      );
      await db('mark_ops').insert({ op_id: MARKS[0]!.id, mark_id: MARKS[0]!.id, read_id: ids.read, version: 1 });
    },
    async check() {
      expect(json((await db('reads').where({ id: ids.read }).first()).class_set_snapshot)).toEqual(snapshot);
      const rows = await db('marks').where({ read_id: ids.read }).orderBy('id');
      expect(rows.map((r) => [r.id, r.class_key, Number(r.x)])).toEqual(MARKS.map((m, i) => [m.id, m.class_key, 10 + i]));
      expect(await db('mark_ops').where({ read_id: ids.read }).count({ n: '*' }).first()).toEqual({ n: 1 });
      // While the flag columns exist (before the next step, or after it is rolled back), they agree with the snapshot.
      if ((await columns('marks')).includes('is_normal')) {
        expect(rows.map((r) => [r.class_key, Boolean(r.counts_as_sperm), Boolean(r.is_normal)])).toEqual(MARKS.map((m) => [m.class_key, m.sperm, m.normal]));
      }
    },
  },
  '20261203000100_candidates.ts': {
    tables: ['candidate_jobs', 'candidates'],
    async write() {
      // The migration queued a search for the image stored before it.
      await db('candidates').insert({ image_id: ids.image, x: 12.5, y: 40, score: 0.875 });
    },
    async check() {
      expect(await db('candidate_jobs').where({ image_id: ids.image }).first('status', 'attempts')).toEqual({ status: 'waiting', attempts: 0 });
      expect((await db('candidates').where({ image_id: ids.image }).select('x', 'y', 'score')).map((c) => [Number(c.x), Number(c.y), Number(c.score)])).toEqual([[12.5, 40, 0.875]]);
    },
  },
  '20261203120000_invitation_purpose.ts': {
    tables: [],
    async write() {
      [ids.invitation] = await db('invitations').insert({ user_id: ids.user, token_hash: 'b'.repeat(64), expires_at: new Date('2027-01-01T00:00:00Z'), purpose: 'password_reset' });
      [ids.oldInvitation] = await db('invitations').insert({ user_id: ids.user, token_hash: 'c'.repeat(64), expires_at: new Date('2027-01-01T00:00:00Z') });
    },
    async check() {
      // The rows outlive a step down (they lose only their purpose); while the column exists, it holds.
      expect(await db('invitations').whereIn('id', [ids.invitation!, ids.oldInvitation!]).orderBy('id').pluck('token_hash')).toEqual(['b'.repeat(64), 'c'.repeat(64)]);
      if ((await columns('invitations')).includes('purpose')) {
        expect(await db('invitations').whereIn('id', [ids.invitation!, ids.oldInvitation!]).orderBy('id').pluck('purpose')).toEqual(['password_reset', 'invitation']);
      }
    },
  },
  '20261210000100_marks_without_stored_flags.ts': {
    tables: [],
    async write() {
      // Nothing new to write: this step drops two derived columns.
    },
    async check() {
      expect(await columns('marks')).not.toEqual(expect.arrayContaining(['counts_as_sperm']));
      expect(await columns('marks')).not.toEqual(expect.arrayContaining(['is_normal']));
    },
  },
  '20261220000100_health_events.ts': {
    tables: ['health_events'],
    async write() {
      [ids.healthEvent] = await db('health_events').insert({ stallion_id: ids.stallion, kind: 'fever', started_on: '2026-05-04', ended_on: '2026-05-06', peak_temperature_c: 39.8, notes: 'Keep', recorded_by: ids.user });
    },
    async check() {
      expect(await db('health_events').where({ id: ids.healthEvent }).first('stallion_id', 'kind', 'started_on', 'ended_on', 'peak_temperature_c', 'notes')).toEqual({
        stallion_id: ids.stallion, kind: 'fever', started_on: '2026-05-04', ended_on: '2026-05-06', peak_temperature_c: 39.8, notes: 'Keep',
      });
    },
  },
  '20261224000100_reports.ts': {
    tables: ['report_drafts', 'report_pdf_jobs', 'report_sendings', 'report_versions'],
    async write() {
      [ids.report] = await db('report_versions').insert({
        collection_id: ids.collection, version: 1, snapshot: JSON.stringify({ schemaVersion: 1, kept: true }), verification_code: '0000-0000-0000-0000-0000',
        signed_by: ids.user, signed_at: new Date('2026-05-02T10:00:00Z'),
      });
      await db('report_pdf_jobs').insert({ report_id: ids.report, status: 'failed', attempts: 4, error: 'kept' });
      await db('report_drafts').insert({ collection_id: ids.collection, remarks: 'Kept remark', updated_by: ids.user });
      await db('report_sendings').insert({ report_id: ids.report, recipient: 'keep@quillfield.example', status: 'failed', relay_response: '550 kept', sent_by: ids.user });
      await db('collections').where({ id: ids.collection }).update({ signed_report_id: ids.report });
    },
    async check() {
      expect(json((await db('report_versions').where({ id: ids.report }).first()).snapshot)).toEqual({ schemaVersion: 1, kept: true });
      expect(await db('report_pdf_jobs').where({ report_id: ids.report }).first('status', 'error')).toEqual({ status: 'failed', error: 'kept' });
      expect(await db('report_drafts').where({ collection_id: ids.collection }).first('remarks')).toEqual({ remarks: 'Kept remark' });
      expect(await db('report_sendings').where({ report_id: ids.report }).first('relay_response')).toEqual({ relay_response: '550 kept' });
      expect(await db('collections').where({ id: ids.collection }).first('signed_report_id')).toEqual({ signed_report_id: ids.report });
    },
  },
  '20261224000200_signed_report_lock.ts': {
    tables: [],
    async write() {
      // Nothing new to write: the lock is on the collection the last step signed.
    },
    async check() {
      // While the triggers exist the signed collection refuses a change; without them (stepped down) it takes it.
      const [rows] = await db.raw("SELECT COUNT(*) AS n FROM information_schema.triggers WHERE trigger_schema = DATABASE() AND trigger_name = 'collections_signed_report_bu'");
      const locked = Number((rows as { n: number }[])[0]!.n) === 1;
      const trx = await db.transaction();
      try {
        const outcome = await trx('collections').where({ id: ids.collection }).update({ remarks: 'changed' }).then(() => 'allowed', (e: { sqlMessage?: string }) => e.sqlMessage?.split(':')[0]);
        expect(outcome).toBe(locked ? 'signed report' : 'allowed');
      } finally {
        await trx.rollback();
      }
    },
  },
  '20261226000100_reads_numbered.ts': {
    tables: [],
    async write() {
      // An unsigned collection (the earlier one is locked by its signed report) with one second read.
      [ids.collection2] = await db('collections').insert({ stallion_id: ids.stallion, collected_at: new Date('2026-05-03T09:00:00Z'), volume_ml: 40, recorded_by: ids.user });
      [ids.secondRead] = await db('reads').insert({ collection_id: ids.collection2, kind: 'second', reader_id: ids.user, class_set_id: ids.set, class_set_snapshot: JSON.stringify(snapshot), target_cells: 200 });
    },
    async check() {
      expect(await db('reads').where({ id: ids.secondRead }).first('collection_id', 'kind')).toEqual({ collection_id: ids.collection2, kind: 'second' });
      // A further read of the same kind (a recount) is accepted now; rolled back so the step down can restore the old index.
      const trx = await db.transaction();
      try {
        await trx('reads').insert({ collection_id: ids.collection2, kind: 'second', reader_id: ids.user, class_set_id: ids.set, class_set_snapshot: JSON.stringify(snapshot), target_cells: 200 });
        expect(await trx('reads').where({ collection_id: ids.collection2, kind: 'second' }).count({ n: '*' }).first()).toEqual({ n: 2 });
      } finally {
        await trx.rollback();
      }
      const [indexes] = await db.raw('SHOW INDEX FROM `reads`');
      expect((indexes as { Key_name: string }[]).map((i) => i.Key_name)).toContain('reads_collection_id_index');
    },
  },
};

describe('migrations', () => {
  it('are the files in db/migrations, each with a step in this test', async () => {
    const files = readdirSync('db/migrations').filter((f) => f.endsWith('.ts')).sort();
    const [done, pending] = await db.migrate.list();
    expect(done).toEqual([]);
    expect(pending.map((m: { file: string }) => m.file)).toEqual(files);
    expect(Object.keys(STEPS).sort()).toEqual(files);
  });

  it('go up one at a time and down one at a time, keeping every earlier step’s data, then up again', async () => {
    const order = Object.keys(STEPS).sort();
    const made: string[] = [];
    for (const file of order) {
      await db.migrate.up();
      const [done] = await db.migrate.list();
      expect(done.at(-1)?.name ?? done.at(-1)).toBe(file);
      made.push(...STEPS[file]!.tables);
      expect(await tables()).toEqual([...made].sort());
      await STEPS[file]!.write();
      for (const f of order.slice(0, order.indexOf(file) + 1)) await STEPS[f]!.check();
    }

    for (let i = order.length - 1; i >= 0; i--) {
      await db.migrate.down();
      for (const t of STEPS[order[i]!]!.tables) made.splice(made.indexOf(t), 1);
      expect(await tables()).toEqual([...made].sort());
      // What the earlier migrations made is still there, with its rows.
      for (const f of order.slice(0, i)) await STEPS[f]!.check();
    }
    expect(await tables()).toEqual([]);

    await db.migrate.latest();
    expect((await db.migrate.list())[1]).toEqual([]);
    expect(await tables()).toEqual(Object.values(STEPS).flatMap((s) => s.tables).sort());
  });
});
