import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { cellCountsQuery } from '@/db/queries/morphology';
import { DEFAULT_CLASS_SET } from '@/lib/class-sets/default-set';
import { morphologyClasses, summariseMorphology } from '@/lib/morphology/engine';
import { countMarks } from '@/lib/morphology/tally';
import { jpegOf } from '../../unit/images/fixtures';
import { closeTestDb, testDb } from '../support/db';
import { goodCollection, makeStallion } from '../support/fixtures';
import { signedIn, USERS, type Session } from '../support/http';

afterAll(async () => {
  const { db } = await import('@/db/knex');
  await db.destroy();
  await closeTestDb();
});

const uuid = () => crypto.randomUUID();
let tech: Session;
let reader: Session;

type Cell = { classKey: string; tags: string[] };
const cells = (n: number, classKey: string, tags: string[] = []): Cell[] => Array.from({ length: n }, () => ({ classKey, tags }));

/** A collection with one image and a first read holding these cells, made through the API. */
async function readWith(marks: Cell[], image = { width: 1000, height: 800 }) {
  const st = await makeStallion();
  const collectionId = (await tech.json('/api/collections', 'POST', goodCollection(st.id))).body.collection.id as number;
  const res = await tech.fetch(`/api/collections/${collectionId}/images?name=f.jpg`, { method: 'POST', body: new Uint8Array(await jpegOf(image.width, image.height)) });
  const imageId = String(((await res.json()) as any).image.id);
  const readId = (await tech.json(`/api/collections/${collectionId}/reads`, 'POST', { kind: 'first' })).body.read.id as number;
  const changes = marks.map((m, i) => {
    const id = uuid();
    return { opId: uuid(), markId: id, kind: 'upsert', payload: { id, imageId, x: 5 + (i % 90) * 10, y: 5 + Math.floor(i / 90) * 10, classKey: m.classKey, tags: m.tags } };
  });
  for (let i = 0; i < changes.length; i += 200) {
    const r = await tech.json(`/api/reads/${readId}/sync`, 'POST', { changes: changes.slice(i, i + 200) });
    expect(r.body.acked).toHaveLength(Math.min(200, changes.length - i));
  }
  return { stallionId: st.id, collectionId, imageId, readId };
}

beforeAll(async () => {
  tech = await signedIn(USERS.tech);
  reader = await signedIn(USERS.reader);
});

describe('morphology totals', () => {
  // 81 normal of 263 sperm cells, 40 of the abnormal ones with extra defect tags, and 6 non-sperm cells.
  const marks: Cell[] = [
    ...cells(81, 'normal'),
    ...cells(60, 'abnormal_head'),
    ...cells(25, 'proximal_droplet', ['bent_coiled_tail']),
    ...cells(35, 'proximal_droplet'),
    ...cells(15, 'bent_coiled_tail', ['distal_droplet', 'abnormal_midpiece']),
    ...cells(47, 'bent_coiled_tail'),
    ...cells(4, 'round_cell'),
    ...cells(2, 'leukocyte'),
  ];

  it('are the engine’s figures for the marks sent, on the API and in the list', async () => {
    const { collectionId, stallionId } = await readWith(marks);
    const expected = summariseMorphology(morphologyClasses(DEFAULT_CLASS_SET), countMarks(marks.map((m) => ({ ...m, imageId: 'x' }))), { target: 200 });
    const api = await tech.json(`/api/collections/${collectionId}/morphology`);
    expect(api.status).toBe(200);
    const read = api.body.reads[0];
    const { perImage: _p, ...figures } = expected;
    expect(read.morphology).toEqual({ ...figures, perImage: [] });
    // Newcombe 1998, Stat Med 17:857–872, method 3: 81/263 → 0.2553–0.3662 (docs/references.md).
    expect(read.morphology.normalIntervalPct.lower).toBeCloseTo(25.53, 2);
    expect(read.morphology.normalIntervalPct.upper).toBeCloseTo(36.62, 2);
    // The route's headline fields are the same figures.
    expect(read).toMatchObject({ cellsCounted: 263, normal: 81, nonSperm: 6, targetReached: true, wilson: read.morphology.normalIntervalPct });
    expect(read.morphology.defectFrequency.totalDefects).toBe(237);

    const list = await tech.json(`/api/collections?stallionId=${stallionId}`);
    expect(list.body.rows[0].firstRead).toEqual({ cells: 263, pctNormal: read.morphology.pctNormal, status: 'open' });
    const one = await tech.json(`/api/collections/${collectionId}`);
    expect(one.body.collection.firstRead).toEqual(list.body.rows[0].firstRead);
  });

  it('counts a non-sperm class by the read’s snapshot, not by anything stored on the mark', async () => {
    const { collectionId, readId } = await readWith([...cells(3, 'normal'), ...cells(1, 'leukocyte')]);
    // The lab later edits its class set; the read keeps the snapshot it started with.
    const set = await testDb()('class_sets').where({ is_default: true }).first();
    const classes = typeof set.classes === 'string' ? JSON.parse(set.classes) : set.classes;
    await testDb()('class_sets').where({ id: set.id }).update({ classes: JSON.stringify(classes.map((c: { key: string }) => (c.key === 'normal' ? { ...c, name: 'Renamed' } : c))) });
    try {
      const r = (await tech.json(`/api/collections/${collectionId}/morphology`)).body.reads[0];
      expect(r.readId).toBe(readId);
      expect(r.morphology.cellsCounted).toBe(3);
      expect(r.morphology.nonSpermCounted).toBe(1);
      expect(r.morphology.cells.perClass.find((c: { classId: string }) => c.classId === 'normal').name).toBe('Normal');
    } finally {
      await testDb()('class_sets').where({ id: set.id }).update({ classes: JSON.stringify(classes) });
    }
  });

  it('keeps an open second read out of everyone’s totals but its reader’s, who sees only it (blind)', async () => {
    const { collectionId, readId, imageId } = await readWith(cells(2, 'normal'));
    const first = await testDb()('reads').where({ id: readId }).first();
    const readerId = (await testDb()('users').where({ email: USERS.reader }).first('id')).id;
    const [secondId] = await testDb()('reads').insert({ ...first, id: undefined, kind: 'second', reader_id: readerId, status: 'open' });
    await testDb()('marks').insert({ id: uuid(), read_id: secondId, image_id: Number(imageId), x: 1, y: 1, class_key: 'abnormal_head', tags: '[]', last_op_id: uuid(), updated_by: readerId });
    const kinds = async (s: Session) => (await s.json(`/api/collections/${collectionId}/morphology`)).body.reads.map((r: { kind: string }) => r.kind);
    expect(await kinds(tech)).toEqual(['first']);
    expect(await kinds(reader)).toEqual(['second']);
    await testDb()('reads').where({ id: secondId }).update({ status: 'submitted' });
    expect(await kinds(tech)).toEqual(['first', 'second']);
    expect(await kinds(reader)).toEqual(['first', 'second']);
  });

  it('comes from one grouped query on the marks index, for one read or many collections', async () => {
    const a = await readWith(cells(3, 'normal'));
    const b = await readWith(cells(2, 'abnormal_head', ['bent_coiled_tail']));
    const { db } = await import('@/db/knex');
    for (const scope of [{ readIds: [a.readId] }, { collectionIds: [a.collectionId, b.collectionId] }]) {
      const q = cellCountsQuery(scope).toSQL().toNative();
      const plan = ((await db.raw(`EXPLAIN ${q.sql}`, q.bindings as never))[0] as { table: string; key: string | null }[]);
      expect(plan.find((p) => p.table === 'm')?.key).toBe('marks_read_id_deleted_class_key_index');
      const rows = await cellCountsQuery(scope);
      expect(rows.length).toBe('readIds' in scope ? 1 : 2);
    }
  });

  it('is for staff only', async () => {
    const owner = await signedIn(USERS.owner);
    expect((await owner.json('/api/collections/1/morphology')).status).toBe(403);
    expect((await tech.json('/api/collections/abc/morphology')).status).toBe(422);
  });
});
