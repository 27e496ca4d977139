import knexFactory from 'knex';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { knexConfig } from '@/knexfile';
import { COLLECTION_RECORD_COLUMNS } from '@/db/migrations/20261224000200_signed_report_lock';
import { goodCollection } from '../support/fixtures';
import { closeTestDb, testDb } from '../support/db';
import { Session, signedIn, USERS } from '../support/http';
import { objectKeys } from '../support/s3';
import { built, signed } from './support';

// Once a report is signed, the collection's record, reads, marks, images and image scales refuse
// every change with 409 "signed report" — by one check in the database that every write path goes
// through — until a veterinarian amends the report.
afterAll(closeTestDb);

let vet: Session;
let tech: Session;
let reader: Session;
beforeAll(async () => {
  [vet, tech, reader] = await Promise.all([signedIn(USERS.vet), signedIn(USERS.tech), signedIn(USERS.reader)]);
});

const jpeg = () => sharp({ create: { width: 64, height: 48, channels: 3, background: { r: 120, g: 90, b: 130 } } }).jpeg().toBuffer();

async function lockedCollection() {
  const c = await built('settled');
  const report = await signed(vet, c.collectionId);
  const mark = await testDb()('marks').where({ read_id: c.reads.first }).first('id', 'image_id', 'x', 'y', 'class_key', 'version');
  return { c, report, mark };
}

describe('a signed collection', () => {
  it('answers 409 on every write path, and nothing changes', async () => {
    const { c, mark } = await lockedCollection();
    const db = testDb();
    const before = {
      collection: await db('collections').where({ id: c.collectionId }).first(),
      images: await db('field_images').where({ collection_id: c.collectionId }).orderBy('id'),
      marks: await db('marks').whereIn('read_id', Object.values(c.reads)).orderBy('id'),
      reads: await db('reads').where({ collection_id: c.collectionId }).orderBy('id'),
      draft: await db('report_drafts').where({ collection_id: c.collectionId }).first(),
    };
    const [markedImage, unmarkedImage] = c.imageIds as [number, number];
    const body = await jpeg();
    const change = (opId = crypto.randomUUID()) => ({ opId, markId: mark.id, kind: 'upsert', baseVersion: mark.version, payload: { id: mark.id, imageId: String(mark.image_id), x: 40, y: 40, classKey: 'normal', tags: [] } });
    const writes: [string, () => Promise<{ status: number; body: any }>, string][] = [
      ['edit the collection record', () => tech.json(`/api/collections/${c.collectionId}`, 'PATCH', goodCollection(c.stallionId, { collectedAt: '2026-05-26T07:40:00.000Z', volumeMl: 40 })), 'signed_report'],
      ['upload a field image', async () => {
        const res = await tech.fetch(`/api/collections/${c.collectionId}/images?name=late.jpg`, { method: 'POST', headers: { 'content-type': 'application/octet-stream' }, body: new Uint8Array(body) });
        return { status: res.status, body: await res.json() };
      }, 'signed_report'],
      ['change an image’s scale', () => tech.json(`/api/images/${unmarkedImage}`, 'PATCH', { micronsPerPixel: 0.3 }), 'signed_report'],
      // An image with marks keeps its scale whatever the lock (the pairing measures with it): refused first.
      ['change a marked image’s scale', () => tech.json(`/api/images/${markedImage}`, 'PATCH', { micronsPerPixel: 0.3 }), 'scale_locked'],
      ['move an image', () => tech.json(`/api/images/${unmarkedImage}`, 'PATCH', { move: 'up' }), 'signed_report'],
      ['set the collection’s scale', () => tech.json(`/api/collections/${c.collectionId}/images`, 'PATCH', { micronsPerPixel: 0.3 }), 'scale_locked'],
      ['delete an image without marks', () => tech.json(`/api/images/${unmarkedImage}`, 'DELETE'), 'signed_report'],
      ['delete an image with marks', () => tech.json(`/api/images/${markedImage}`, 'DELETE'), 'conflict'],
      ['save marks (sync)', () => tech.json(`/api/reads/${c.reads.first}/sync`, 'POST', { changes: [change()] }), 'conflict'],
      ['change one mark', () => tech.json(`/api/reads/${c.reads.first}/marks/${mark.id}`, 'PUT', { ...change().payload, id: undefined, opId: crypto.randomUUID(), baseVersion: mark.version }), 'conflict'],
      ['delete one mark', () => tech.json(`/api/reads/${c.reads.first}/marks/${mark.id}?opId=${crypto.randomUUID()}`, 'DELETE'), 'conflict'],
      ['submit a read', () => tech.json(`/api/reads/${c.reads.first}/submit`, 'POST'), 'conflict'],
      ['save marks in the second read', () => reader.json(`/api/reads/${c.reads.second}/sync`, 'POST', { changes: [{ ...change(), markId: crypto.randomUUID(), baseVersion: undefined, payload: { ...change().payload, id: undefined } }] }), 'conflict'],
      ['write the report’s remarks', () => vet.json(`/api/collections/${c.collectionId}/report`, 'PUT', { remarks: 'later', interpretation: null }), 'signed_report'],
      ['sign again', () => vet.json(`/api/collections/${c.collectionId}/report/sign`, 'POST', { password: 'quillfield-demo' }), 'not_ready'],
    ];
    const answers: string[] = [];
    for (const [what, call, code] of writes) {
      const r = await call();
      answers.push(`${what}: ${r.status} ${r.body?.error?.code}`);
      expect(`${what}: ${r.status} ${r.body?.error?.code}`).toBe(`${what}: 409 ${code}`);
      if (code === 'signed_report') expect(r.body.error.message).toMatch(/signed report/);
    }
    // Mark writes stop earlier (a submitted read is locked by itself); the database would refuse them too (below).
    expect(answers).toHaveLength(writes.length);
    // Starting a read of a signed collection hands back the existing first read: nothing is written.
    expect((await tech.json(`/api/collections/${c.collectionId}/reads`, 'POST', { kind: 'first' })).body.read.id).toBe(c.reads.first);
    // A further second read of a signed (and settled) collection is refused.
    expect((await vet.json(`/api/collections/${c.collectionId}/reads`, 'POST', { kind: 'second' })).status).toBe(409);

    expect(await db('collections').where({ id: c.collectionId }).first()).toEqual(before.collection);
    expect(await db('field_images').where({ collection_id: c.collectionId }).orderBy('id')).toEqual(before.images);
    expect(await db('marks').whereIn('read_id', Object.values(c.reads)).orderBy('id')).toEqual(before.marks);
    expect(await db('reads').where({ collection_id: c.collectionId }).orderBy('id')).toEqual(before.reads);
    expect(await db('report_drafts').where({ collection_id: c.collectionId }).first()).toEqual(before.draft);
    // The refused upload left no objects behind.
    expect((await objectKeys(`collections/${c.collectionId}/`)).length).toBe(0);
  });

  it('is refused by the database itself, for any write by the app account that skips the app’s checks', async () => {
    const { c, mark } = await lockedCollection();
    const db = testDb();
    const refusal = (p: Promise<unknown>) => p.then(() => 'allowed', (e: { sqlState?: string; sqlMessage?: string }) => `${e.sqlState} ${e.sqlMessage?.split(':')[0]}`);
    const LOCKED = '45000 signed report';
    const tech = (await db('users').where({ email: USERS.tech }).first('id')).id;
    const set = await db('class_sets').where({ is_default: true }).first('id');
    const statements: [string, Promise<unknown>][] = [
      ['update the record', db('collections').where({ id: c.collectionId }).update({ remarks: 'changed' })],
      ['touch updated_at alone', db('collections').where({ id: c.collectionId }).update({ updated_at: new Date() })],
      ['delete the record', db('collections').where({ id: c.collectionId }).delete()],
      ['insert a read', db('reads').insert({ collection_id: c.collectionId, kind: 'settled', reader_id: tech, class_set_id: set.id, class_set_snapshot: '{}', target_cells: 200, status: 'open' })],
      ['reopen a read', db('reads').where({ id: c.reads.first }).update({ status: 'open' })],
      ['delete a read', db('reads').where({ id: c.reads.settled }).delete()],
      ['insert a mark', db('marks').insert({ id: crypto.randomUUID(), read_id: c.reads.first, image_id: mark.image_id, x: 1, y: 1, class_key: 'normal', tags: '[]', last_op_id: crypto.randomUUID(), updated_by: tech })],
      ['change a mark', db('marks').where({ id: mark.id }).update({ class_key: 'detached_head' })],
      ['delete a mark', db('marks').where({ id: mark.id }).delete()],
      ['insert an image', db('field_images').insert({ collection_id: c.collectionId, file_name: 'x.jpg', format: 'jpeg', bytes: 1, width: 1, height: 1, sha256: 'f'.repeat(64), original_key: 'o', display_key: 'd', thumb_key: 't', display_width: 1, display_height: 1, uploaded_by: tech })],
      ['change an image’s scale', db('field_images').where({ id: c.imageIds[0] }).update({ microns_per_pixel: 0.5 })],
      ['delete an image', db('field_images').where({ id: c.imageIds[1] }).delete()],
      ['write the report text', db('report_drafts').insert({ collection_id: c.collectionId, remarks: 'x', updated_by: tech })],
    ];
    for (const [what, p] of statements) expect(`${what}: ${await refusal(p)}`).toBe(`${what}: ${LOCKED}`);
    // A mark cannot be moved into a signed collection's read from another collection either.
    const open = await built('first-open');
    const other = await db('marks').where({ read_id: open.reads.first }).first('id');
    expect(await refusal(db('marks').where({ id: other.id }).update({ read_id: c.reads.first }))).toBe(LOCKED);
    // The day's numbering (a figure of the lab's calendar) may still move.
    expect(await refusal(db('collections').where({ id: c.collectionId }).update({ number_that_day: 2 }))).toBe('allowed');
    await db('collections').where({ id: c.collectionId }).update({ number_that_day: 1 });
  });

  it('freezes signed versions: no change to the snapshot, the code or the stored PDF, no deletion', async () => {
    const { report } = await lockedCollection();
    const db = testDb();
    const refusal = (p: Promise<unknown>) => p.then(() => 'allowed', (e: { sqlState?: string; sqlMessage?: string }) => `${e.sqlState} ${e.sqlMessage?.split(':')[0]}`);
    const FROZEN = '45000 frozen report';
    expect(await refusal(db('report_versions').where({ id: report.id }).update({ snapshot: JSON.stringify({ schemaVersion: 1 }) }))).toBe(FROZEN);
    expect(await refusal(db('report_versions').where({ id: report.id }).update({ verification_code: 'X' }))).toBe(FROZEN);
    expect(await refusal(db('report_versions').where({ id: report.id }).update({ signed_at: new Date() }))).toBe(FROZEN);
    expect(await refusal(db('report_versions').where({ id: report.id }).delete())).toBe(FROZEN);
    const { pdfStored } = await import('./support');
    await pdfStored(vet, report.id);
    expect(await refusal(db('report_versions').where({ id: report.id }).update({ pdf_sha256: '0'.repeat(64) }))).toBe(FROZEN);
  });

  it('opens again after an amendment', async () => {
    const { c, report } = await lockedCollection();
    expect((await vet.json(`/api/reports/${report.id}/amend`, 'POST', { reason: 'Volume was entered wrongly.' })).status).toBe(200);
    const edit = await tech.json(`/api/collections/${c.collectionId}`, 'PATCH', goodCollection(c.stallionId, { collectedAt: '2026-05-26T07:40:00.000Z', volumeMl: 40 }));
    expect(edit.status).toBe(200);
    expect(edit.body.collection.volumeMl).toBe(40);
    expect((await tech.json(`/api/images/${c.imageIds[1]}`, 'DELETE')).status).toBe(200);
    expect((await vet.json(`/api/collections/${c.collectionId}/report`, 'PUT', { remarks: 'Volume corrected.', interpretation: null })).status).toBe(200);
  });
});

describe('the lock', () => {
  it('covers every column of a collection’s record but the lock and the day’s number (a new column needs the trigger re-made)', async () => {
    const columns = Object.keys(await testDb()('collections').columnInfo()).sort();
    expect([...COLLECTION_RECORD_COLUMNS, 'number_that_day', 'signed_report_id'].sort()).toEqual(columns);
  });

  it('cannot be dropped by the app account (it has no TRIGGER or SUPER privilege)', async () => {
    const [rows] = await testDb().raw('SHOW GRANTS');
    const grants = (rows as Record<string, string>[]).map((r) => Object.values(r)[0]!).join('\n');
    expect(grants).not.toMatch(/\b(TRIGGER|SUPER|ALL PRIVILEGES)\b/);
    const owner = knexFactory(knexConfig(undefined, 'owner'));
    try {
      const [triggers] = await owner.raw('SELECT trigger_name AS name FROM information_schema.triggers WHERE trigger_schema = DATABASE() ORDER BY 1');
      expect((triggers as { name: string }[]).map((t) => t.name)).toEqual(expect.arrayContaining(['collections_signed_report_bu', 'marks_signed_report_bi', 'field_images_signed_report_bu', 'reads_signed_report_bi', 'report_versions_frozen_bu']));
    } finally {
      await owner.destroy();
    }
  });
});
