import sharp from 'sharp';
import { afterAll, describe, expect, it } from 'vitest';
import { generateField } from '@/lib/synthetic/generate-field';
import { grey16Tiff, jpegOf, pngClaiming } from '../../unit/images/fixtures';
import { closeTestDb, testDb } from '../support/db';
import { goodCollection, makeStallion } from '../support/fixtures';
import { Session, signedIn, USERS } from '../support/http';
import { objectKeys } from '../support/s3';

afterAll(closeTestDb);

async function newCollection(s: Session) {
  const st = await makeStallion();
  const r = await s.json('/api/collections', 'POST', goodCollection(st.id));
  return r.body.collection.id as number;
}

async function upload(s: Session, collectionId: number, name: string, body: Buffer, extra = '') {
  const res = await s.fetch(`/api/collections/${collectionId}/images?name=${encodeURIComponent(name)}${extra}`, {
    method: 'POST',
    headers: { 'content-type': 'application/octet-stream' },
    body: new Uint8Array(body),
  });
  return { status: res.status, body: (await res.json()) as any };
}

describe('field images', () => {
  it('stores a JPEG with a full-size display copy and a thumbnail, and knows it again by checksum', async () => {
    const s = await signedIn(USERS.tech);
    const id = await newCollection(s);
    const field = await generateField({ seed: 7, width: 1200, height: 900, cells: 8, format: 'jpeg' });
    const r = await upload(s, id, 'field-01.jpg', field.image, '&micronsPerPixel=0.25&magnification=1000&optics=dic');
    expect(r.status).toBe(201);
    expect(r.body.image).toMatchObject({ fileName: 'field-01.jpg', format: 'jpeg', width: 1200, height: 900, bytes: field.image.length, micronsPerPixel: 0.25, magnification: 1000, optics: 'dic' });
    expect(r.body.image.sha256).toMatch(/^[0-9a-f]{64}$/);
    const display = await s.fetch(r.body.image.displayUrl);
    expect(display.headers.get('content-type')).toBe('image/jpeg');
    const dm = await sharp(Buffer.from(await display.arrayBuffer())).metadata();
    expect([dm.width, dm.height]).toEqual([1200, 900]);
    const thumb = await sharp(Buffer.from(await (await s.fetch(r.body.image.thumbUrl)).arrayBuffer())).metadata();
    expect(Math.max(thumb.width!, thumb.height!)).toBe(320);
    const original = Buffer.from(await (await s.fetch(`/api/images/${r.body.image.id}/original`)).arrayBuffer());
    expect(original.equals(field.image)).toBe(true);

    const again = await upload(s, id, 'copy-of-field-01.jpg', field.image);
    expect(again.status).toBe(200);
    expect(again.body).toMatchObject({ duplicate: true, image: { id: r.body.image.id } });
    expect(await testDb()('field_images').where({ collection_id: id }).count({ n: '*' }).first()).toEqual({ n: 1 });
    expect(await objectKeys(`collections/${id}/`)).toHaveLength(3);
  });

  it('turns a 16-bit greyscale TIFF into an 8-bit display copy', async () => {
    const s = await signedIn(USERS.tech);
    const id = await newCollection(s);
    const r = await upload(s, id, 'dic-16bit.tif', await grey16Tiff(640, 480));
    expect(r.status).toBe(201);
    expect(r.body.image).toMatchObject({ format: 'tiff', bitDepth: 16, width: 640, height: 480 });
    const dm = await sharp(Buffer.from(await (await s.fetch(r.body.image.displayUrl)).arrayBuffer())).metadata();
    expect(dm.format).toBe('jpeg');
    expect(dm.depth).toBe('uchar');
  });

  it('refuses every bad file with a message naming it, leaving nothing in storage or database', async () => {
    const s = await signedIn(USERS.tech);
    const id = await newCollection(s);
    const jpeg = await jpegOf(800, 600);
    const cases: [string, Buffer, number, RegExp][] = [
      ['notes.png', Buffer.from('This is a text file with a .png name.\n'.repeat(20)), 415, /notes\.png/],
      ['half.jpg', jpeg.subarray(0, Math.floor(jpeg.length / 2)), 422, /half\.jpg/],
      ['bomb.png', await pngClaiming(20000, 20000), 422, /bomb\.png/],
      ['empty.jpg', Buffer.alloc(0), 422, /empty/i],
      ['huge.tif', Buffer.alloc(9 * 1024 * 1024, 7), 413, /limit/],
    ];
    for (const [name, body, status, message] of cases) {
      const r = await upload(s, id, name, body);
      expect(r.status, name).toBe(status);
      expect(r.body.error.message, name).toMatch(message);
    }
    expect(await testDb()('field_images').where({ collection_id: id }).count({ n: '*' }).first()).toEqual({ n: 0 });
    expect(await objectKeys(`collections/${id}/`)).toEqual([]);
  });

  it('keeps only a safe display name for path-like file names', async () => {
    const s = await signedIn(USERS.tech);
    const id = await newCollection(s);
    const r = await upload(s, id, '../../etc/passwd.jpg', await jpegOf(300, 200));
    expect(r.status).toBe(201);
    expect(r.body.image.fileName).toBe('passwd.jpg');
    const w = await upload(s, id, 'C:\\scope\\exports\\slide 3.png', await (await import('../../unit/images/fixtures')).pngOf(300, 200));
    expect(w.body.image.fileName).toBe('slide 3.png');
    const keys = await objectKeys(`collections/${id}/`);
    for (const k of keys) expect(k).not.toMatch(/\.\.|passwd|\\/);
  });

  it('orders, scales and deletes images; refuses deleting an image with marks', async () => {
    const s = await signedIn(USERS.tech);
    const id = await newCollection(s);
    const a = (await upload(s, id, 'a.jpg', await jpegOf(400, 300))).body.image;
    const b = (await upload(s, id, 'b.jpg', await jpegOf(401, 300))).body.image;
    expect((await s.json(`/api/images/${b.id}`, 'PATCH', { move: 'up' })).status).toBe(200);
    const list = (await s.json(`/api/collections/${id}/images`)).body.images;
    expect(list.map((i: { fileName: string }) => i.fileName)).toEqual(['b.jpg', 'a.jpg']);
    expect((await s.json(`/api/collections/${id}/images`, 'PATCH', { micronsPerPixel: 0.2 })).body.updated).toBe(2);
    expect((await s.json(`/api/images/${a.id}`, 'PATCH', { micronsPerPixel: -1 })).status).toBe(422);
    const read = (await s.json(`/api/collections/${id}/reads`, 'POST', { kind: 'first' })).body.read;
    const markId = crypto.randomUUID();
    await s.json(`/api/reads/${read.id}/sync`, 'POST', { changes: [{ opId: crypto.randomUUID(), markId, kind: 'upsert', payload: { id: markId, imageId: String(a.id), x: 10, y: 10, classKey: 'normal', tags: [] } }] });
    const refused = await s.json(`/api/images/${a.id}`, 'DELETE');
    expect(refused.status).toBe(409);
    const del = await s.json(`/api/images/${b.id}`, 'DELETE');
    expect(del.status).toBe(200);
    expect((await s.json(`/api/collections/${id}/images`)).body.images).toHaveLength(1);
    expect(await objectKeys(`collections/${id}/`)).toHaveLength(3);
  });

  it('serves images only to staff who may see them', async () => {
    const tech = await signedIn(USERS.tech);
    const id = await newCollection(tech);
    const img = (await upload(tech, id, 'x.jpg', await jpegOf(300, 200))).body.image;
    expect((await new Session().fetch(img.displayUrl)).status).toBe(401);
    const owner = await signedIn(USERS.owner);
    expect((await owner.fetch(img.displayUrl)).status).toBe(403);
    expect((await upload(owner, id, 'y.jpg', await jpegOf(300, 200))).status).toBe(403);
    const manager = await signedIn(USERS.manager);
    expect((await upload(manager, id, 'z.jpg', await jpegOf(300, 200))).status).toBe(403);
    expect((await tech.fetch('/api/images/abc/display')).status).toBe(422);
    expect((await tech.fetch(`/api/images/${img.id}/secret`)).status).toBe(422);
  });
});
