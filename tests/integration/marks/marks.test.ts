import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { jpegOf } from '../../unit/images/fixtures';
import { closeTestDb, testDb } from '../support/db';
import { goodCollection, makeStallion } from '../support/fixtures';
import { Session, signedIn, USERS } from '../support/http';

afterAll(closeTestDb);

const uuid = () => crypto.randomUUID();
let tech: Session;

async function setUp() {
  const st = await makeStallion();
  const collectionId = (await tech.json('/api/collections', 'POST', goodCollection(st.id))).body.collection.id;
  const res = await tech.fetch(`/api/collections/${collectionId}/images?name=f.jpg`, { method: 'POST', body: new Uint8Array(await jpegOf(1000, 800)) });
  const image = ((await res.json()) as any).image;
  const read = (await tech.json(`/api/collections/${collectionId}/reads`, 'POST', { kind: 'first' })).body.read;
  return { collectionId, imageId: String(image.id), readId: read.id as number };
}

const upsert = (markId: string, imageId: string, over: Record<string, unknown> = {}, baseVersion?: number) => ({
  opId: uuid(),
  markId,
  kind: 'upsert',
  baseVersion,
  payload: { id: markId, imageId, x: 100, y: 120, classKey: 'normal', tags: [], ...over },
});

const liveMarks = (readId: number) => testDb()('marks').where({ read_id: readId, deleted: false });

beforeAll(async () => {
  tech = await signedIn(USERS.tech);
});

describe('marks', () => {
  it('creates, moves, reclassifies and deletes marks, each change versioned', async () => {
    const { imageId, readId } = await setUp();
    const id = uuid();
    const c = await tech.json(`/api/reads/${readId}/sync`, 'POST', { changes: [upsert(id, imageId)] });
    expect(c.status).toBe(200);
    expect(c.body.acked[0]).toMatchObject({ markId: id, version: 1 });
    const moved = await tech.json(`/api/reads/${readId}/sync`, 'POST', { changes: [upsert(id, imageId, { x: 300, y: 310 }, 1)] });
    expect(moved.body.acked[0].version).toBe(2);
    const put = await tech.json(`/api/reads/${readId}/marks/${id}`, 'PUT', { opId: uuid(), imageId, x: 300, y: 310, classKey: 'detached_head', tags: [], baseVersion: 2 });
    expect(put.body.mark).toMatchObject({ classKey: 'detached_head', version: 3 });
    const row = await testDb()('marks').where({ id }).first();
    expect([Number(row.x), Number(row.y), row.class_key]).toEqual([300, 310, 'detached_head']);
    // A mark keeps the reader's decision only; whether it is normal comes from the read's class set.
    expect(row).not.toHaveProperty('is_normal');
    const del = await tech.json(`/api/reads/${readId}/marks/${id}?opId=${uuid()}`, 'DELETE');
    expect(del.status).toBe(200);
    expect(await liveMarks(readId)).toHaveLength(0);
    // Undo of the delete restores the same id.
    const restored = await tech.json(`/api/reads/${readId}/sync`, 'POST', { changes: [upsert(id, imageId, { classKey: 'detached_head' })] });
    expect(restored.body.acked[0].version).toBe(5);
    expect(await liveMarks(readId)).toHaveLength(1);
  });

  it('applies a retried change once', async () => {
    const { imageId, readId } = await setUp();
    const change = upsert(uuid(), imageId);
    const first = await tech.json(`/api/reads/${readId}/sync`, 'POST', { changes: [change] });
    const second = await tech.json(`/api/reads/${readId}/sync`, 'POST', { changes: [change] });
    expect(second.body.acked).toEqual(first.body.acked);
    const both = await Promise.all([0, 1, 2].map(() => tech.json(`/api/reads/${readId}/sync`, 'POST', { changes: [upsert(change.markId, imageId, { x: 5 }, 1)] })));
    expect(both.every((r) => r.status === 200)).toBe(true);
    expect(await liveMarks(readId)).toHaveLength(1);
    expect(await testDb()('mark_ops').where({ op_id: change.opId })).toHaveLength(1);
  });

  it('answers a resent change that a later change superseded, without applying it again', async () => {
    const { imageId, readId } = await setUp();
    const id = uuid();
    const create = upsert(id, imageId);
    await tech.json(`/api/reads/${readId}/sync`, 'POST', { changes: [create] });
    const move = upsert(id, imageId, { x: 400, y: 410 });
    expect((await tech.json(`/api/reads/${readId}/sync`, 'POST', { changes: [move] })).body.acked[0].version).toBe(2);
    // The first answer was lost on the way back: the browser sends the create again, then the move.
    const resent = await tech.json(`/api/reads/${readId}/sync`, 'POST', { changes: [create, move] });
    expect(resent.status).toBe(200);
    expect(resent.body.acked.map((a: { version: number }) => a.version)).toEqual([1, 2]);
    const row = await testDb()('marks').where({ id }).first();
    expect([Number(row.x), Number(row.y), row.version, row.last_op_id]).toEqual([400, 410, 2, move.opId]);
    expect(await testDb()('mark_ops').where({ mark_id: id })).toHaveLength(2);
  });

  it('applies a batch of new, changed and deleted marks together, each once', async () => {
    const { imageId, readId } = await setUp();
    const [a, b, c, never] = [uuid(), uuid(), uuid(), uuid()];
    await tech.json(`/api/reads/${readId}/sync`, 'POST', { changes: [upsert(c, imageId, { x: 50, y: 60 })] });
    const changes = [
      upsert(a, imageId, { x: 10, y: 20 }),
      upsert(b, imageId, { x: 30, y: 40, classKey: 'detached_head' }),
      upsert(a, imageId, { x: 11, y: 21, classKey: 'bent_coiled_tail' }),
      { opId: uuid(), markId: c, kind: 'delete', payload: null, baseVersion: 1 },
      { opId: uuid(), markId: never, kind: 'delete', payload: null },
    ];
    const r = await tech.json(`/api/reads/${readId}/sync`, 'POST', { changes });
    expect(r.status).toBe(200);
    expect(r.body.acked.map((x: { markId: string; version: number }) => [x.markId, x.version])).toEqual([
      [a, 1],
      [b, 1],
      [a, 2],
      [c, 2],
      [never, 0],
    ]);
    const rows = new Map<string, Record<string, any>>((await testDb()('marks').where({ read_id: readId })).map((m: Record<string, any>) => [m.id, m]));
    const row = (id: string) => rows.get(id)!;
    expect(rows.size).toBe(3);
    expect([Number(row(a).x), row(a).class_key, row(a).version]).toEqual([11, 'bent_coiled_tail', 2]);
    expect(row(b).class_key).toBe('detached_head');
    expect([!!row(c).deleted, row(c).version]).toEqual([true, 2]);
    // Deleting a mark the server never had changes nothing and is not recorded.
    expect(await testDb()('mark_ops').where({ read_id: readId })).toHaveLength(5);
    const again = await tech.json(`/api/reads/${readId}/sync`, 'POST', { changes });
    expect(again.body.acked).toEqual(r.body.acked);
    expect(await testDb()('mark_ops').where({ read_id: readId })).toHaveLength(5);
  });

  it('stores a new mark once when the same save arrives twice at the same moment', async () => {
    const { imageId, readId } = await setUp();
    const change = upsert(uuid(), imageId);
    const answers = await Promise.all([0, 1, 2, 3].map(() => tech.json(`/api/reads/${readId}/sync`, 'POST', { changes: [change] })));
    expect(answers.map((a) => [a.status, a.body.acked[0]?.version])).toEqual([
      [200, 1],
      [200, 1],
      [200, 1],
      [200, 1],
    ]);
    expect(await liveMarks(readId)).toHaveLength(1);
    expect(await testDb()('mark_ops').where({ op_id: change.opId })).toHaveLength(1);
  });

  it('answers a stale version with the server copy (two tabs)', async () => {
    const { imageId, readId } = await setUp();
    const id = uuid();
    await tech.json(`/api/reads/${readId}/sync`, 'POST', { changes: [upsert(id, imageId)] });
    await tech.json(`/api/reads/${readId}/sync`, 'POST', { changes: [upsert(id, imageId, { classKey: 'bent_coiled_tail' }, 1)] });
    const stale = await tech.json(`/api/reads/${readId}/sync`, 'POST', { changes: [upsert(id, imageId, { classKey: 'abnormal_head' }, 1)] });
    expect(stale.body.acked).toEqual([]);
    expect(stale.body.conflicts[0]).toMatchObject({ markId: id, server: { classKey: 'bent_coiled_tail', version: 2 } });
    const single = await tech.json(`/api/reads/${readId}/marks/${id}`, 'PUT', { opId: uuid(), imageId, x: 1, y: 1, classKey: 'normal', tags: [], baseVersion: 1 });
    expect(single.status).toBe(409);
    expect(single.body.server.classKey).toBe('bent_coiled_tail');
  });

  it('rejects bad marks and writes nothing for them', async () => {
    const { imageId, readId } = await setUp();
    const other = await setUp();
    const r = await tech.json(`/api/reads/${readId}/sync`, 'POST', {
      changes: [
        upsert(uuid(), imageId, { x: 1001 }),
        upsert(uuid(), imageId, { y: -3 }),
        upsert(uuid(), imageId, { classKey: 'sparkly' }),
        upsert(uuid(), other.imageId),
        upsert(uuid(), imageId, { tags: ['normal'] }),
        upsert(uuid(), imageId, { classKey: 'leukocyte', tags: ['bent_coiled_tail'] }),
      ],
    });
    expect(r.status).toBe(200);
    expect(r.body.acked).toEqual([]);
    expect(r.body.rejected.map((x: { message: string }) => x.message)).toEqual([
      expect.stringMatching(/outside the 1000 × 800 image/),
      expect.stringMatching(/outside/),
      expect.stringMatching(/not a class/),
      expect.stringMatching(/does not belong to this collection/),
      expect.stringMatching(/extra tag/),
      expect.stringMatching(/Non-sperm/),
    ]);
    const before = await testDb()('mark_ops').count({ n: '*' }).first();
    for (const body of [
      { changes: [{ ...upsert('not-a-uuid', imageId) }] },
      { changes: [{ ...upsert(uuid(), imageId), opId: 'x' }] },
      { changes: [] },
      { changes: [{ ...upsert(uuid(), imageId), kind: 'upsert', payload: null }] },
    ]) {
      expect((await tech.json(`/api/reads/${readId}/sync`, 'POST', body)).status).toBe(422);
    }
    expect((await tech.json(`/api/reads/999999/sync`, 'POST', { changes: [upsert(uuid(), imageId)] })).status).toBe(404);
    expect(await testDb()('mark_ops').count({ n: '*' }).first()).toEqual(before);
    expect(await liveMarks(readId)).toHaveLength(0);
  });

  it('lets only the reader write, and locks a submitted read', async () => {
    const { imageId, readId, collectionId } = await setUp();
    const reader2 = await signedIn(USERS.reader);
    expect((await reader2.json(`/api/reads/${readId}/sync`, 'POST', { changes: [upsert(uuid(), imageId)] })).status).toBe(403);
    const owner = await signedIn(USERS.owner);
    expect((await owner.json(`/api/reads/${readId}/sync`, 'POST', { changes: [upsert(uuid(), imageId)] })).status).toBe(403);
    expect((await owner.json(`/api/reads/${readId}`)).status).toBe(403);
    expect((await tech.json(`/api/reads/${readId}/submit`, 'POST')).status).toBe(422);
    await tech.json(`/api/reads/${readId}/sync`, 'POST', { changes: [upsert(uuid(), imageId), upsert(uuid(), imageId, { classKey: 'proximal_droplet', x: 500 }), upsert(uuid(), imageId, { classKey: 'round_cell', x: 700 })] });
    const sub = await tech.json(`/api/reads/${readId}/submit`, 'POST');
    expect(sub.body.read.status).toBe('submitted');
    expect((await tech.json(`/api/reads/${readId}/sync`, 'POST', { changes: [upsert(uuid(), imageId)] })).status).toBe(409);
    expect((await tech.json(`/api/reads/${readId}/submit`, 'POST')).status).toBe(409);
    const detail = await tech.json(`/api/reads/${readId}`);
    expect(detail.body.read.canEdit).toBe(false);
    expect(detail.body.marks).toHaveLength(3);
    // Totals from MariaDB: 2 sperm cells (1 normal), 1 round cell apart.
    const m = await tech.json(`/api/collections/${collectionId}/morphology`);
    expect(m.body.reads[0]).toMatchObject({ cellsCounted: 2, normal: 1, nonSperm: 1, pctNormal: 50, targetReached: false });
  });

  it('keeps old reads on the class set they started with', async () => {
    const { readId } = await setUp();
    const set = await testDb()('class_sets').where({ is_default: true }).first();
    const classes = typeof set.classes === 'string' ? JSON.parse(set.classes) : set.classes;
    await testDb()('class_sets').where({ id: set.id }).update({ classes: JSON.stringify(classes.map((c: { key: string; name: string }) => (c.key === 'normal' ? { ...c, name: 'Renamed normal' } : c))) });
    try {
      const detail = await tech.json(`/api/reads/${readId}`);
      expect(detail.body.read.classSet.classes.find((c: { key: string }) => c.key === 'normal').name).toBe('Normal');
    } finally {
      await testDb()('class_sets').where({ id: set.id }).update({ classes: JSON.stringify(classes) });
    }
  });
});
