import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeTestDb, testDb } from '../support/db';
import { signedIn, USERS, type Session } from '../support/http';
import { collectionWithImage, grid, mark, startRead, submit, type Cell } from './support';

afterAll(async () => {
  await closeTestDb();
});

let tech: Session;
let reader: Session;
let vet: Session;
let manager: Session;

beforeAll(async () => {
  [tech, reader, vet, manager] = await Promise.all([signedIn(USERS.tech), signedIn(USERS.reader), signedIn(USERS.vet), signedIn(USERS.manager)]);
});

const post = (s: Session, collectionId: number, kind = 'second') => s.json(`/api/collections/${collectionId}/reads`, 'POST', { kind });

describe('starting a second read', () => {
  it('is refused to the first reader (403), before the first read is submitted (409), and starts once for another reader (201)', async () => {
    const { collectionId, imageId } = await collectionWithImage(tech);
    expect((await post(reader, collectionId)).status).toBe(409); // no first read yet
    const firstId = await startRead(tech, collectionId, 'first');
    await mark(tech, firstId, imageId, grid(5, 4));

    const early = await post(reader, collectionId);
    expect(early.status).toBe(409);
    expect(early.body.error.message).toMatch(/not submitted/);
    expect((await post(tech, collectionId)).status).toBe(403);

    await submit(tech, firstId);
    const own = await post(tech, collectionId);
    expect(own.status).toBe(403);
    expect(own.body.error.message).toMatch(/another reader/);
    expect((await post(manager, collectionId)).status).toBe(403);

    const started = await post(reader, collectionId);
    expect(started.status).toBe(201);
    expect(started.body.read).toMatchObject({ kind: 'second', status: 'open', number: 2, collectionId });
    // The same reader asking again gets the same open read; a third reader is refused while it is open.
    const again = await post(reader, collectionId);
    expect([again.status, again.body.read.id]).toEqual([200, started.body.read.id]);
    const third = await post(vet, collectionId);
    expect(third.status).toBe(409);
    expect(third.body.error.message).toMatch(/in progress/);
    // It uses the first read's class set, so the two reads pair class for class.
    const rows = await testDb()('reads').whereIn('id', [firstId, started.body.read.id]).orderBy('id').select('class_set_snapshot');
    expect(rows[1].class_set_snapshot).toEqual(rows[0].class_set_snapshot);
    // A settled read is not started through this route.
    expect((await post(vet, collectionId, 'settled')).status).toBe(422);
  });

  it('allows a recount (a further second read) only when the two reads differ beyond the acceptable difference', async () => {
    // 40 normal cells in the first read; the second read calls 20 of them abnormal: 100 % vs 50 %,
    // far beyond the limit of about 19 points (1.96 × √(75 × 25 × (1/40 + 1/40)), by hand).
    const { collectionId, imageId } = await collectionWithImage(tech, { micronsPerPixel: 0.25 });
    const firstId = await startRead(tech, collectionId, 'first');
    await mark(tech, firstId, imageId, grid(40, 40));
    await submit(tech, firstId);
    const secondId = await startRead(reader, collectionId, 'second');
    await mark(reader, secondId, imageId, grid(40, 20));
    await submit(reader, secondId);

    const a = await vet.json(`/api/collections/${collectionId}/agreement`);
    expect(a.status).toBe(200);
    expect(a.body.agreement.acceptableDifference).toMatchObject({ difference: 50, differ: true });
    expect(a.body.agreement.acceptableDifference.limit).toBeCloseTo(18.98, 2);
    expect(a.body.agreement.recountAdvised).toBe(true);
    const list = await vet.json(`/api/collections/${collectionId}`);
    expect(list.body.collection.recountAdvised).toBe(true);

    // The two who read it may not recount; someone who read neither may.
    expect((await post(reader, collectionId)).status).toBe(403);
    expect((await post(tech, collectionId)).status).toBe(403);
    const recount = await post(vet, collectionId);
    expect(recount.status).toBe(201);
    expect(recount.body.read).toMatchObject({ kind: 'second', number: 3 });
  });

  it('refuses a further second read when the two reads agree within the limit', async () => {
    const { collectionId, imageId } = await collectionWithImage(tech, { micronsPerPixel: 0.25 });
    const firstId = await startRead(tech, collectionId, 'first');
    await mark(tech, firstId, imageId, grid(20, 15));
    await submit(tech, firstId);
    const secondId = await startRead(reader, collectionId, 'second');
    await mark(reader, secondId, imageId, grid(20, 14));
    await submit(reader, secondId);
    const refused = await post(vet, collectionId);
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toMatch(/recount is advised/);
  });
});

describe('the image scale', () => {
  it('changes freely until cells are marked, then is refused with 409 (both routes), and the same value passes', async () => {
    const { collectionId, imageId } = await collectionWithImage(tech);
    expect((await tech.json(`/api/images/${imageId}`, 'PATCH', { micronsPerPixel: 0.3 })).status).toBe(200);
    const readId = await startRead(tech, collectionId, 'first');
    await mark(tech, readId, imageId, grid(1, 1));
    const one = await tech.json(`/api/images/${imageId}`, 'PATCH', { micronsPerPixel: 0.25 });
    expect(one.status).toBe(409);
    expect(one.body.error.message).toMatch(/cells are marked on it/);
    const all = await tech.json(`/api/collections/${collectionId}/images`, 'PATCH', { micronsPerPixel: 0.25 });
    expect(all.status).toBe(409);
    expect((await testDb()('field_images').where({ id: Number(imageId) }).first('microns_per_pixel')).microns_per_pixel).toBeCloseTo(0.3, 6);
    // Removing the scale is a change too; setting the one it has is not.
    expect((await tech.json(`/api/images/${imageId}`, 'PATCH', { micronsPerPixel: null })).status).toBe(409);
    expect((await tech.json(`/api/images/${imageId}`, 'PATCH', { micronsPerPixel: 0.3 })).status).toBe(200);
  });
});

describe('GET /api/collections/{id}/agreement', () => {
  // A constructed pair on one image at 0.25 µm/px, so the lab's 4 µm is 16 px (by hand).
  // First reader: ten sperm cells and a round cell; the second reader moves each mark 0–12 px,
  // calls A5 a head defect and A9 a distal droplet, misses A10 and adds one cell far from any.
  const first: Cell[] = [
    { x: 100, y: 100, classKey: 'normal' }, // A1
    { x: 200, y: 100, classKey: 'normal' }, // A2
    { x: 300, y: 100, classKey: 'normal' }, // A3
    { x: 400, y: 100, classKey: 'normal' }, // A4
    { x: 500, y: 100, classKey: 'normal' }, // A5
    { x: 600, y: 100, classKey: 'abnormal_head' }, // A6
    { x: 700, y: 100, classKey: 'abnormal_head' }, // A7
    { x: 100, y: 300, classKey: 'proximal_droplet' }, // A8
    { x: 200, y: 300, classKey: 'normal' }, // A9
    { x: 300, y: 300, classKey: 'normal' }, // A10, missed by the second reader
    { x: 500, y: 500, classKey: 'round_cell' },
  ];
  const second: Cell[] = [
    { x: 103, y: 104, classKey: 'normal' },
    { x: 200, y: 110, classKey: 'normal' },
    { x: 300, y: 100, classKey: 'normal' },
    { x: 405, y: 100, classKey: 'normal' },
    { x: 500, y: 100, classKey: 'abnormal_head' },
    { x: 600, y: 100, classKey: 'abnormal_head' },
    { x: 712, y: 100, classKey: 'abnormal_head' },
    { x: 100, y: 300, classKey: 'proximal_droplet' },
    { x: 200, y: 300, classKey: 'distal_droplet' },
    { x: 800, y: 600, classKey: 'normal' }, // only the second reader
    { x: 505, y: 500, classKey: 'round_cell' },
  ];

  it('answers 409 until both reads are submitted, 409 to the blind second reader, then the figures worked out by hand', async () => {
    const { collectionId, imageId } = await collectionWithImage(tech, { micronsPerPixel: 0.25 });
    const firstId = await startRead(tech, collectionId, 'first');
    await mark(tech, firstId, imageId, first);
    expect((await vet.json(`/api/collections/${collectionId}/agreement`)).status).toBe(409);
    await submit(tech, firstId);
    const secondId = await startRead(reader, collectionId, 'second');
    await mark(reader, secondId, imageId, second);
    expect((await vet.json(`/api/collections/${collectionId}/agreement`)).status).toBe(409);
    const blind = await reader.json(`/api/collections/${collectionId}/agreement`);
    expect(blind.status).toBe(409);
    expect(blind.body.error.message).toMatch(/blind/);
    await submit(reader, secondId);

    const r = await manager.json(`/api/collections/${collectionId}/agreement`);
    expect(r.status).toBe(200);
    const a = r.body.agreement;
    // Worked by hand (from memory of Cohen 1960's formula, κ = (po − pe) / (1 − pe)):
    // 9 sperm pairs + 1 round-cell pair; A10 alone; the extra cell alone.
    expect([a.pairs, a.spermPairs, a.onlyFirst, a.onlySecond]).toEqual([10, 9, 1, 1]);
    expect(a.confusion).toEqual({
      normal: { normal: 4, abnormal_head: 1, distal_droplet: 1 },
      abnormal_head: { abnormal_head: 2 },
      proximal_droplet: { proximal_droplet: 1 },
      round_cell: { round_cell: 1 },
    });
    // po = 7/9; pe = (6·4 + 2·3 + 1·1 + 0·1) / 81 = 31/81; κ = (63 − 31) / (81 − 31) = 32/50 = 0.64.
    expect(a.observedAgreement).toBeCloseTo(7 / 9, 12);
    expect(a.expectedAgreement).toBeCloseTo(31 / 81, 12);
    expect(a.kappa).toBeCloseTo(0.64, 12);
    expect(a.band).toBe('substantial'); // Landis & Koch 1977: 0.61–0.80
    // % normal: first 7 of 10 sperm cells, second 5 of 10.
    expect(a.percentNormal).toEqual({ first: 70, second: 50 });
    // Limit 1.96 × √(60 × 40 × (1/10 + 1/10)) = 1.96 × √480 = 42.94 points (WHO 2010 §2.11 formula, by hand).
    expect(a.acceptableDifference.difference).toBeCloseTo(20, 9);
    expect(a.acceptableDifference.limit).toBeCloseTo(42.941, 3);
    expect(a.acceptableDifference.differ).toBe(false);
    expect(a.disagreements).toBe(4); // A5, A9 (class), A10 (only first), the extra cell (only second)
    expect(a.recountAdvised).toBe(false);
    expect([a.firstRead.readId, a.secondRead.readId, a.firstRead.number, a.secondRead.number]).toEqual([firstId, secondId, 1, 2]);
    expect(a.pairingDistanceUm).toBe(4);
  });

  it('pairs at the lab’s pairing distance: at 2 µm (8 px) the 10- and 12-px pairs fall apart', async () => {
    const before = await testDb()('lab_settings').where({ key: 'lab' }).first('value');
    const stored = before ? (typeof before.value === 'string' ? JSON.parse(before.value) : before.value) : {};
    const { collectionId, imageId } = await collectionWithImage(tech, { micronsPerPixel: 0.25 });
    const firstId = await startRead(tech, collectionId, 'first');
    await mark(tech, firstId, imageId, first);
    await submit(tech, firstId);
    const secondId = await startRead(reader, collectionId, 'second');
    await mark(reader, secondId, imageId, second);
    await submit(reader, secondId);
    const put = await manager.json('/api/settings', 'PUT', { ...stored, pairingDistanceUm: 2 });
    try {
      expect(put.status, JSON.stringify(put.body)).toBe(200);
      const a = (await vet.json(`/api/collections/${collectionId}/agreement`)).body.agreement;
      // A2–B2 (10 px) and A7–B7 (12 px) no longer pair: 8 pairs, 3 marks alone on each side.
      expect([a.pairs, a.onlyFirst, a.onlySecond, a.pairingDistanceUm]).toEqual([8, 3, 3, 2]);
    } finally {
      await testDb()('lab_settings').where({ key: 'lab' }).update({ value: JSON.stringify(stored) });
    }
  });
});
