import { parse } from 'content-disposition';
import { afterAll, describe, expect, it } from 'vitest';
import { jpegOf } from '../../unit/images/fixtures';
import { closeTestDb } from '../support/db';
import { goodCollection, makeStallion } from '../support/fixtures';
import { signedIn, USERS } from '../support/http';

afterAll(closeTestDb);

describe('downloading an original', () => {
  it('keeps a file name with characters outside Latin-1 (RFC 6266 filename*)', async () => {
    const s = await signedIn(USERS.tech);
    const st = await makeStallion();
    const collectionId = (await s.json('/api/collections', 'POST', goodCollection(st.id))).body.collection.id;
    const name = 'Ščítek – field α №3.jpg';
    const up = await s.fetch(`/api/collections/${collectionId}/images?name=${encodeURIComponent(name)}`, { method: 'POST', headers: { 'content-type': 'application/octet-stream' }, body: new Uint8Array(await jpegOf(300, 200)) });
    expect(up.status).toBe(201);
    const { image } = (await up.json()) as { image: { id: number } };
    const res = await s.fetch(`/api/images/${image.id}/original`);
    expect(res.status).toBe(200);
    const header = res.headers.get('content-disposition')!;
    expect(header).toMatch(/^attachment; filename="[\x20-\x7e]+"; filename\*=UTF-8''/);
    expect(parse(header).parameters.filename).toBe(name);
    expect((await res.arrayBuffer()).byteLength).toBeGreaterThan(0);
  });
});
