// Skipped candidates ("not a cell") of the cell walk: saved through the marks' sync route, per
// read, idempotent by op id, only by the read's reader while it is open, and shown only in the
// read's own payload.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { jpegOf } from '../../unit/images/fixtures';
import { closeTestDb, testDb } from '../support/db';
import { goodCollection, makeStallion } from '../support/fixtures';
import { Session, signedIn, USERS } from '../support/http';

afterAll(closeTestDb);

const uuid = () => crypto.randomUUID();
let tech: Session;
let reader: Session;
let vet: Session;

beforeAll(async () => {
  [tech, reader, vet] = await Promise.all([signedIn(USERS.tech), signedIn(USERS.reader), signedIn(USERS.vet)]);
});

async function setUp() {
  const st = await makeStallion();
  const collectionId = (await tech.json('/api/collections', 'POST', goodCollection(st.id))).body.collection.id as number;
  const res = await tech.fetch(`/api/collections/${collectionId}/images?name=f.jpg`, { method: 'POST', body: new Uint8Array(await jpegOf(1000, 800)) });
  const image = ((await res.json()) as { image: { id: number } }).image;
  const read = (await tech.json(`/api/collections/${collectionId}/reads`, 'POST', { kind: 'first' })).body.read;
  return { collectionId, imageId: String(image.id), readId: read.id as number };
}

async function detectionEnded(imageId: string, timeoutMs = 40_000) {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const r = await tech.json<{ status: string }>(`/api/images/${imageId}/candidates`);
    if (r.body.status === 'done' || r.body.status === 'failed') return;
    if (Date.now() > until) throw new Error(`image ${imageId} still ${r.body.status} after ${timeoutMs} ms`);
    await new Promise((res) => setTimeout(res, 150));
  }
}

const skip = (id: string, imageId: string, over: Record<string, unknown> = {}, baseVersion?: number) => ({
  entity: 'skip',
  opId: uuid(),
  markId: id,
  kind: 'upsert',
  baseVersion,
  payload: { id, imageId, x: 200, y: 150, ...over },
});
const unskip = (id: string, baseVersion?: number) => ({ entity: 'skip', opId: uuid(), markId: id, kind: 'delete', baseVersion, payload: null });
const liveSkips = (readId: number) => testDb()('candidate_skips').where({ read_id: readId, deleted: false });
const sync = (s: Session, readId: number, changes: unknown[]) => s.json(`/api/reads/${readId}/sync`, 'POST', { changes });

describe('skipped candidates', () => {
  it('are saved, undone and redone by their own id, each change versioned, and never become marks', async () => {
    const { imageId, readId } = await setUp();
    const id = uuid();
    const made = await sync(tech, readId, [skip(id, imageId)]);
    expect(made.status).toBe(200);
    expect(made.body.acked).toEqual([expect.objectContaining({ markId: id, version: 1 })]);
    const row = await testDb()('candidate_skips').where({ id }).first();
    expect([Number(row.x), Number(row.y), row.deleted, row.read_id]).toEqual([200, 150, 0, readId]);
    // Undo: kept as a deleted row; redo restores the same id.
    expect((await sync(tech, readId, [unskip(id, 1)])).body.acked[0].version).toBe(2);
    expect(await liveSkips(readId)).toHaveLength(0);
    expect((await sync(tech, readId, [skip(id, imageId)])).body.acked[0].version).toBe(3);
    expect(await liveSkips(readId)).toHaveLength(1);
    // A skip is not a mark: nothing counted.
    expect(await testDb()('marks').where({ read_id: readId })).toHaveLength(0);
    const payload = await tech.json(`/api/reads/${readId}`);
    expect(payload.body.marks).toEqual([]);
    expect(payload.body.skips).toEqual([{ id, imageId, x: 200, y: 150, skip: true, version: 3 }]);
    // An image with skips but no marks can still be deleted: its skips go with it.
    expect((await tech.json(`/api/images/${imageId}`, 'DELETE')).status).toBe(200);
    expect(await testDb()('candidate_skips').where({ id })).toHaveLength(0);
  });

  it('applies a resent change once, also beside marks in one batch', async () => {
    const { imageId, readId } = await setUp();
    const change = skip(uuid(), imageId);
    const mark = { opId: uuid(), markId: uuid(), kind: 'upsert', payload: { imageId, x: 10, y: 20, classKey: 'normal', tags: [] } };
    const first = await sync(tech, readId, [change, mark]);
    expect(first.status).toBe(200);
    expect(first.body.acked).toHaveLength(2);
    // The answer was lost: the same batch again, and the skip's change a third time at once beside it.
    const again = await Promise.all([sync(tech, readId, [change, mark]), sync(tech, readId, [change])]);
    expect(again.map((r) => r.status)).toEqual([200, 200]);
    expect(again[0].body.acked).toEqual(first.body.acked);
    expect(await testDb()('candidate_skip_ops').where({ op_id: change.opId })).toHaveLength(1);
    expect(await liveSkips(readId)).toHaveLength(1);
    expect(await testDb()('marks').where({ read_id: readId, deleted: false })).toHaveLength(1);
    // A resend of the create after a later undo does not bring the skip back.
    await sync(tech, readId, [unskip(change.markId, 1)]);
    expect((await sync(tech, readId, [change])).body.acked[0].version).toBe(1);
    expect(await liveSkips(readId)).toHaveLength(0);
  });

  it('answers a stale change with the saved copy, and refuses what cannot be right', async () => {
    const { imageId, readId } = await setUp();
    const id = uuid();
    await sync(tech, readId, [skip(id, imageId)]);
    const stale = await sync(tech, readId, [unskip(id, 7)]);
    expect(stale.body.conflicts).toEqual([expect.objectContaining({ markId: id, server: expect.objectContaining({ id, skip: true, version: 1 }) })]);
    const outside = await sync(tech, readId, [skip(uuid(), imageId, { x: 5000 })]);
    expect(outside.body.rejected[0].message).toMatch(/outside the 1000 × 800 image/);
    const other = await setUp();
    const foreign = await sync(tech, readId, [skip(uuid(), other.imageId)]);
    expect(foreign.body.rejected[0].message).toMatch(/does not belong to this collection/);
    // The same skip id in another read of the same reader is that read's business, not this one's.
    const taken = await sync(tech, other.readId, [skip(id, other.imageId)]);
    expect(taken.body.rejected[0].message).toMatch(/belongs to another read/);
    const bad = await sync(tech, readId, [{ ...skip(uuid(), imageId), payload: { imageId, x: 'left', y: 1 } }]);
    expect(bad.status).toBe(422);
    expect(await liveSkips(readId)).toHaveLength(1);
  });

  it('are written only by the read’s own reader, and not once the read is submitted', async () => {
    const { imageId, readId } = await setUp();
    const refused = await sync(reader, readId, [skip(uuid(), imageId)]);
    expect(refused.status).toBe(403);
    await sync(tech, readId, [{ opId: uuid(), markId: uuid(), kind: 'upsert', payload: { imageId, x: 10, y: 20, classKey: 'normal', tags: [] } }]);
    expect((await tech.json(`/api/reads/${readId}/submit`, 'POST', {})).status).toBe(200);
    const late = await sync(tech, readId, [skip(uuid(), imageId)]);
    expect(late.status).toBe(409);
    expect(await liveSkips(readId)).toHaveLength(0);
  });

  it('are shown only in the read’s own payload, to its own reader; candidates are the image’s, for every read', async () => {
    const { collectionId, imageId, readId } = await setUp();
    await sync(tech, readId, [skip(uuid(), imageId)]);
    // A second read by another reader (made in the database: starting one is another part's work).
    const readerId = (await testDb()('users').where({ email: USERS.reader }).first('id')).id;
    const first = await testDb()('reads').where({ id: readId }).first();
    const [secondId] = await testDb()('reads').insert({ ...first, id: undefined, kind: 'second', reader_id: readerId, status: 'open', started_at: new Date(), submitted_at: null });
    // Detection runs beside this test; compare the two payloads once the image's job has ended,
    // so both see the same state of it.
    await detectionEnded(imageId);
    const own = await tech.json(`/api/reads/${readId}`);
    const theirs = await reader.json(`/api/reads/${secondId}`);
    const looking = await vet.json(`/api/reads/${readId}`);
    expect(own.body.skips).toHaveLength(1);
    expect(theirs.body.skips).toEqual([]);
    expect(looking.status).toBe(200);
    expect(looking.body.skips).toEqual([]);
    // Both reads get the image's candidates, the same list.
    expect(Object.keys(own.body.candidates)).toEqual([imageId]);
    expect(theirs.body.candidates).toEqual(own.body.candidates);
    expect(collectionId).toBeGreaterThan(0);
  });

  it('follow the lab setting for whether reads start with found cells shown, which only the lab manager changes', async () => {
    const { readId } = await setUp();
    const manager = await signedIn(USERS.manager);
    const current = (await manager.json('/api/settings')).body.settings;
    expect((await tech.json(`/api/reads/${readId}`)).body.candidatesShown).toBe(true);
    expect((await tech.json('/api/settings', 'PUT', { ...current, showCandidates: false })).status).toBe(403);
    const bad = await manager.json('/api/settings', 'PUT', { ...current, showCandidates: 'sometimes' });
    expect(bad.status).toBe(422);
    try {
      expect((await manager.json('/api/settings', 'PUT', { ...current, showCandidates: false })).status).toBe(200);
      expect((await tech.json(`/api/reads/${readId}`)).body.candidatesShown).toBe(false);
    } finally {
      await manager.json('/api/settings', 'PUT', { ...current, showCandidates: true });
    }
  });
});
