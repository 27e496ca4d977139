import { afterAll, describe, expect, it } from 'vitest';
import { generateField } from '@/lib/synthetic/generate-field';
import { closeTestDb, testDb, unique } from '../support/db';
import { goodCollection, makeStallion } from '../support/fixtures';
import { APP_URL, signedIn, USERS } from '../support/http';

afterAll(closeTestDb);

const APP_ORIGIN = new URL(APP_URL).origin;
const userCount = async () => Number(((await testDb()('users').count({ n: '*' }).first()) as { n: number }).n);

describe('cross-site writes', () => {
  it('a text/plain form posted from another site cannot invite a lab manager', async () => {
    const s = await signedIn(USERS.manager);
    const before = await userCount();
    const body = JSON.stringify({ email: `${unique('intruder')}@evil.example`, name: 'Intruder', role: 'lab_manager' });
    // What <form enctype="text/plain"> on another site sends: its own Origin, text/plain, a JSON-looking body.
    for (const origin of ['https://evil.example', 'http://lims.localhost:3100', 'null']) {
      const r = await s.json('/api/users', 'POST', body, { origin, 'content-type': 'text/plain' });
      expect(r.status, origin).toBe(403);
      expect(r.body.error.code).toBe('cross_site');
    }
    // No Origin, but the browser says the page was on another site.
    const fetchSite = await s.json('/api/users', 'POST', body, { 'sec-fetch-site': 'cross-site', 'content-type': 'application/json' });
    expect(fetchSite.status).toBe(403);
    expect(await userCount()).toBe(before);
  });

  it('a body that must be JSON is refused with 415 unless it says application/json, even from the app itself', async () => {
    const s = await signedIn(USERS.manager);
    const before = await userCount();
    const body = JSON.stringify({ email: `${unique('plain')}@quillfield.example`, name: 'Plain Text', role: 'technician' });
    for (const type of ['text/plain', 'application/x-www-form-urlencoded', 'multipart/form-data; boundary=x']) {
      const r = await s.json('/api/users', 'POST', body, { origin: APP_ORIGIN, 'content-type': type });
      expect(r.status, type).toBe(415);
      expect(r.body.error.message).toMatch(/application\/json/);
    }
    expect(await userCount()).toBe(before);
    // The app's own page: same origin, JSON.
    const ok = await s.json('/api/users', 'POST', body, { origin: APP_ORIGIN, 'sec-fetch-site': 'same-origin', 'content-type': 'application/json; charset=utf-8' });
    expect(ok.status).toBe(201);
  });

  it('moving marks from another site is refused; from the app it works', async () => {
    const s = await signedIn(USERS.tech);
    const st = await makeStallion();
    const { body: c } = await s.json('/api/collections', 'POST', goodCollection(st.id));
    const field = await generateField({ seed: 3, width: 400, height: 300, cells: 2, format: 'jpeg' });
    const up = await s.fetch(`/api/collections/${c.collection.id}/images?name=f.jpg`, { method: 'POST', headers: { 'content-type': 'application/octet-stream', origin: APP_ORIGIN }, body: new Uint8Array(field.image) });
    expect(up.status).toBe(201);
    const image = ((await up.json()) as { image: { id: number } }).image;
    const crossUpload = await s.fetch(`/api/collections/${c.collection.id}/images?name=g.jpg`, { method: 'POST', headers: { 'content-type': 'application/octet-stream', origin: 'https://evil.example' }, body: new Uint8Array(field.image) });
    expect(crossUpload.status).toBe(403);
    const { body: r } = await s.json(`/api/collections/${c.collection.id}/reads`, 'POST', { kind: 'first' }, { origin: APP_ORIGIN });
    const markId = crypto.randomUUID();
    const change = { opId: crypto.randomUUID(), markId, kind: 'upsert', payload: { id: markId, imageId: image.id, x: 10, y: 10, classKey: 'normal', tags: [] } };
    const cross = await s.json(`/api/reads/${r.read.id}/sync`, 'POST', JSON.stringify({ changes: [change] }), { origin: 'https://evil.example', 'content-type': 'text/plain' });
    expect(cross.status).toBe(403);
    expect(await testDb()('marks').where({ read_id: r.read.id }).count({ n: '*' }).first()).toEqual({ n: 0 });
    const own = await s.json(`/api/reads/${r.read.id}/sync`, 'POST', { changes: [change] }, { origin: APP_ORIGIN });
    expect(own.status, JSON.stringify(own.body)).toBe(200);
    expect(own.body.acked).toHaveLength(1);
  });

  it("server actions keep Next's own origin check (a foreign Origin is aborted before any action runs)", async () => {
    const post = (origin: string) =>
      fetch(`${APP_URL}/invite/${'a'.repeat(43)}`, { method: 'POST', headers: { origin, 'next-action': '7f'.padEnd(42, '0'), 'content-type': 'text/plain;charset=UTF-8' }, body: '[]', redirect: 'manual' });
    const foreign = await post('https://evil.example');
    const own = await post(APP_ORIGIN);
    // Own origin: the (made-up) action is looked up and not found; foreign: refused before the lookup.
    expect(own.status).toBe(409);
    expect(foreign.status).toBe(500);
  });
});
