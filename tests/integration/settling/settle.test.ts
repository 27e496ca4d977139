import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeTestDb, testDb } from '../support/db';
import { Session, signedIn, USERS } from '../support/http';
import { built, json, signed } from '../reports/support';

// Settling over HTTP: the settle state, decisions saved once under retries and audited, refused
// for the wrong role or person and while a read is open, and the settled read written with the
// last decision, after which the collection's totals and its report use it.
afterAll(closeTestDb);

let reader: Session;
let tech: Session;
let vet: Session;
let manager: Session;
let owner: Session;
beforeAll(async () => {
  [reader, tech, vet, manager, owner] = await Promise.all([signedIn(USERS.reader), signedIn(USERS.tech), signedIn(USERS.vet), signedIn(USERS.manager), signedIn(USERS.owner)]);
});

const state = (s: Session, id: number) => s.json(`/api/collections/${id}/settle`);
const post = (s: Session, id: number, decisions: unknown[]) => s.json(`/api/collections/${id}/settle`, 'POST', { decisions });
const decision = (key: string, d: string, classKey?: string) => ({ opId: crypto.randomUUID(), key, decision: d, ...(classKey ? { classKey } : {}) });
const rows = (collectionId: number) => testDb()('settle_decisions').where({ collection_id: collectionId }).orderBy('id');

describe('the settle state', () => {
  it('lists every disagreement with both marks, the images and the progress, to the staff', async () => {
    const c = await built('unsettled');
    const r = await state(reader, c.collectionId);
    expect(r.status).toBe(200);
    expect(r.body).toMatchObject({ status: 'open', mayDecide: true, progress: { total: c.disagreements, decided: 0 } });
    expect(r.body.disagreements).toHaveLength(6);
    for (const d of r.body.disagreements) {
      expect(d.kind).toBe('class');
      expect(d.first.classKey).not.toBe(d.second.classKey);
      expect(d.key).toBe(`${d.imageId}:${d.first.id}:${d.second.id}`);
      expect(d.decision).toBeNull();
    }
    expect(r.body.images.map((i: { id: string }) => Number(i.id))).toEqual(c.imageIds);
    expect(r.body.marks.first).toHaveLength(272); // the example's 263 sperm and 9 non-sperm cells
    for (const s of [tech, manager]) expect((await state(s, c.collectionId)).body).toMatchObject({ status: 'open', mayDecide: false });
    expect((await state(owner, c.collectionId)).status).toBe(403);
    expect((await state(new Session(), c.collectionId)).status).toBe(401);
  });

  it('shows neither read while the second read is open (it is blind)', async () => {
    const c = await built('second-open');
    const r = await state(reader, c.collectionId);
    expect(r.body).toMatchObject({ status: 'not-ready', disagreements: [], marks: { first: [], second: [] } });
    expect(r.body.reason).toMatch(/second read is still open/);
  });
});

describe('deciding', () => {
  it('is refused to the first reader (403), the lab manager (403) and a client, and while a read is open (409); nothing is stored', async () => {
    const c = await built('unsettled');
    const key = (await state(reader, c.collectionId)).body.disagreements[0].key;
    const byTech = await post(tech, c.collectionId, [decision(key, 'first')]);
    expect(byTech.status).toBe(403);
    expect(byTech.body.error.message).toMatch(/Only the second reader \(Orrin Halvard\) or a veterinarian/);
    expect((await post(manager, c.collectionId, [decision(key, 'first')])).status).toBe(403);
    expect((await post(owner, c.collectionId, [decision(key, 'first')])).status).toBe(403);

    const open = await built('second-open');
    const r = await post(reader, open.collectionId, [decision(`${open.imageIds[0]}:${crypto.randomUUID()}:${crypto.randomUUID()}`, 'first')]);
    expect(r.status).toBe(409);
    expect(r.body.error.message).toMatch(/second read is still open/);
    expect(await rows(c.collectionId)).toEqual([]);
    expect(await rows(open.collectionId)).toEqual([]);
  });

  it('answers bad input with 422 and a message, and a decision on no disagreement with its reason', async () => {
    const c = await built('unsettled');
    const key = (await state(reader, c.collectionId)).body.disagreements[0].key;
    const noClass = await post(reader, c.collectionId, [decision(key, 'other')]);
    expect(noClass.status).toBe(422);
    expect(noClass.body.error.message).toMatch(/Another class needs its class key/);
    expect((await post(reader, c.collectionId, [{ ...decision(key, 'first'), opId: 'not-a-uuid' }])).status).toBe(422);
    expect((await post(reader, c.collectionId, [decision(key, 'maybe')])).status).toBe(422);
    const wrongClass = await post(reader, c.collectionId, [decision(key, 'other', 'no_such_class')]);
    expect(wrongClass.body.rejected[0].message).toMatch(/not a class of this read’s class set/);
    const stranger = await post(reader, c.collectionId, [decision(`${c.imageIds[0]}:${crypto.randomUUID()}:`, 'first')]);
    expect(stranger.status).toBe(200);
    expect(stranger.body.rejected[0].message).toMatch(/not one between the collection’s submitted first and second reads/);
    expect(await rows(c.collectionId)).toEqual([]);
  });

  it('stores a decision once however often it is sent, one after another or at once, and audits it with who and when', async () => {
    const c = await built('unsettled');
    const key = (await state(reader, c.collectionId)).body.disagreements[0].key;
    const d = decision(key, 'second');
    const a = await post(reader, c.collectionId, [d]);
    const b = await post(reader, c.collectionId, [d]);
    expect([a.status, b.status]).toEqual([200, 200]);
    expect(a.body.acked).toEqual([{ opId: d.opId, markId: key }]);
    expect(b.body.acked).toEqual([{ opId: d.opId, markId: key }]);
    const key2 = (await state(reader, c.collectionId)).body.disagreements[1].key;
    const d2 = decision(key2, 'other', 'abnormal_midpiece');
    const together = await Promise.all([1, 2, 3, 4].map(() => post(reader, c.collectionId, [d2, d])));
    for (const r of together) expect(r.status).toBe(200);
    const stored = await rows(c.collectionId);
    expect(stored.map((r) => [r.op_id, r.disagreement_key, r.decision, r.class_key])).toEqual([
      [d.opId, key, 'second', null],
      [d2.opId, key2, 'other', 'abnormal_midpiece'],
    ]);
    const readerId = (await testDb()('users').where({ email: USERS.reader }).first('id')).id;
    const audit = await testDb()('audit_log').where({ action: 'settle_decision', entity: 'collection', entity_id: String(c.collectionId) }).orderBy('id');
    expect(audit.map((x) => [x.user_id, json(x.after).opId, json(x.after).decision])).toEqual([
      [readerId, d.opId, 'second'],
      [readerId, d2.opId, 'other'],
    ]);
    for (const x of audit) expect(Date.now() - new Date(x.created_at).getTime()).toBeLessThan(10 * 60_000);
    expect((await state(reader, c.collectionId)).body.progress).toMatchObject({ total: 6, decided: 2 });
  });

  it('writes the settled read with the last decision; the collection’s totals and the report then use it', async () => {
    const c = await built('unsettled');
    const before = await reader.json(`/api/collections/${c.collectionId}/report`);
    expect(before.body.draft.basis).toBe('first-unchecked');
    const list = (await state(reader, c.collectionId)).body.disagreements as { key: string }[];
    // All but the last: no settled read yet.
    const first = await post(reader, c.collectionId, list.slice(0, -1).map((d) => decision(d.key, 'second')));
    expect(first.body.settledReadId).toBeNull();
    expect(await testDb()('reads').where({ collection_id: c.collectionId, kind: 'settled' }).first()).toBeUndefined();
    const last = await post(reader, c.collectionId, [decision(list.at(-1)!.key, 'second')]);
    expect(last.body.progress).toMatchObject({ total: 6, decided: 6, undecided: [] });
    const settled = await testDb()('reads').where({ collection_id: c.collectionId, kind: 'settled' }).first();
    expect(settled).toMatchObject({ id: last.body.settledReadId, status: 'submitted' });
    expect(settled.reader_id).toBe((await testDb()('users').where({ email: USERS.reader }).first('id')).id);
    expect(await testDb()('marks').where({ read_id: settled.id, deleted: false }).count({ n: '*' }).first()).toEqual({ n: 272 });

    // Settled on the second reader's classes = the example's cells: 81 of 263 sperm cells normal
    // (lib/reports/fixture.ts; Newcombe 1998's worked example).
    const morph = await reader.json(`/api/collections/${c.collectionId}/morphology`);
    const settledMorph = morph.body.reads.find((r: { kind: string }) => r.kind === 'settled');
    expect(settledMorph.morphology).toMatchObject({ cellsCounted: 263, normalCount: 81 });
    const after = await reader.json(`/api/collections/${c.collectionId}/report`);
    expect(after.body.draft.basis).toBe('settled');
    expect(after.body.draft.morphology).toMatchObject({ cellsCounted: 263, normalCount: 81, source: 'settled' });
    expect(await testDb()('audit_log').where({ action: 'settle', entity: 'read', entity_id: String(settled.id) }).first()).toBeTruthy();

    // Settled for good: a new decision is refused; a resend of a stored one is still acknowledged.
    const again = await post(reader, c.collectionId, [decision(list[0]!.key, 'first')]);
    expect(again.status).toBe(409);
    expect(again.body.error.message).toMatch(/settled already/);
    const storedOp = (await rows(c.collectionId))[0];
    const resend = await post(reader, c.collectionId, [{ opId: storedOp.op_id, key: storedOp.disagreement_key, decision: storedOp.decision }]);
    expect(resend.status).toBe(200);
    expect(resend.body.settledReadId).toBe(settled.id);
  });

  it('may be done by a veterinarian who did neither read; the settled read is hers', async () => {
    const c = await built('unsettled');
    const list = (await state(vet, c.collectionId)).body.disagreements as { key: string }[];
    const r = await post(vet, c.collectionId, list.map((d, i) => decision(d.key, i % 2 ? 'first' : 'not-cell')));
    expect(r.status).toBe(200);
    const settled = await testDb()('reads').where({ id: r.body.settledReadId }).first();
    expect(settled.reader_id).toBe((await testDb()('users').where({ email: USERS.vet }).first('id')).id);
    // Three cells dropped as not cells, three kept with the first reader's class: 272 − 3.
    expect(await testDb()('marks').where({ read_id: settled.id }).count({ n: '*' }).first()).toEqual({ n: 269 });
  });

  it('is locked with the collection once its report is signed: no decision changes, none is added', async () => {
    const c = await built('unsettled');
    const list = (await state(reader, c.collectionId)).body.disagreements as { key: string }[];
    await post(reader, c.collectionId, list.map((d) => decision(d.key, 'second')));
    await signed(vet, c.collectionId);
    const refusal = (p: Promise<unknown>) => p.then(() => 'allowed', (e: { sqlMessage?: string }) => e.sqlMessage?.split(':')[0]);
    const decisions = () => testDb()('settle_decisions').where({ collection_id: c.collectionId });
    expect(await refusal(decisions().update({ decision: 'first' }))).toBe('signed report');
    expect(await refusal(decisions().delete())).toBe('signed report');
    expect(await rows(c.collectionId)).toHaveLength(6);
  });
});
