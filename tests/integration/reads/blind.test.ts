import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { demoIds, fill, GET_ROUTES, PAGES, type DemoIds, type Entry, type Visitor } from '../../support/surface';
import { closeTestDb, testDb } from '../support/db';
import { signedIn, USERS, type Session } from '../support/http';
import { collectionWithImage, grid, mark, startRead, submit } from './support';

/*
 * Blindness, walked over the whole surface: every page (its HTML, and its RSC payload as the
 * router asks for it) and every GET route of tests/support/surface.ts, with the bracketed records
 * pointing at a collection whose second read is open. As the second reader, no response may carry
 * the first read's mark ids or its figures; as the first reader (and a veterinarian), none may
 * carry the open second read's. The figures are chosen so that no demo read can show them:
 * 29 normal of 37 cells is 78.378… % ("78.4"), 11 of 23 is 47.826… % ("47.8"); demo reads count
 * 200, 210 or 211 cells, whose percentages never round to either.
 */
afterAll(closeTestDb);

let tech: Session;
let reader: Session;
let vet: Session;
let ids: DemoIds;
let firstMarks: string[];
let secondMarks: string[];
let firstId: number;
let secondId: number;

// The collection is the newest of the demo season, so the first page of every list shows it.
const COLLECTED_AT = '2026-07-31T20:00:00.000Z';

beforeAll(async () => {
  [tech, reader, vet] = await Promise.all([signedIn(USERS.tech), signedIn(USERS.reader), signedIn(USERS.vet)]);
  const demo = await demoIds(testDb());
  const c = await collectionWithImage(tech, { micronsPerPixel: 0.25, collectedAt: COLLECTED_AT });
  firstId = await startRead(tech, c.collectionId, 'first');
  firstMarks = await mark(tech, firstId, c.imageId, grid(37, 29));
  await submit(tech, firstId);
  secondId = await startRead(reader, c.collectionId, 'second');
  secondMarks = await mark(reader, secondId, c.imageId, grid(23, 11));
  ids = { ...demo, stallion: String(c.stallionId), collection: String(c.collectionId), read: String(firstId), image: c.imageId };
});

afterAll(async () => {
  // Leave no open second read behind for other tests' lists, and no figures a later run of this test would find.
  await testDb()('reads').where({ id: secondId }).update({ status: 'submitted', submitted_at: new Date() });
  await testDb()('marks').whereIn('read_id', [firstId, secondId]).update({ deleted: true });
});

const TREE = encodeURIComponent(JSON.stringify(['', { children: ['(lab)', { children: ['elsewhere', { children: ['__PAGE__', {}] }] }] }]));
const BINARY = /\/(thumb|display|original|pdf)$/;

/** Every response the visitor may get from the surface, as text: page HTML, page RSC payload, GET route JSON / CSV. */
async function walk(s: Session, role: Visitor, extra: string[] = []): Promise<{ what: string; status: number; body: string }[]> {
  const allowed = (e: Entry) => e.roles.includes(role);
  const out: { what: string; status: number; body: string }[] = [];
  for (const p of PAGES.filter(allowed)) {
    const path = fill(p.path, ids);
    const html = await s.fetch(path);
    out.push({ what: `HTML ${path}`, status: html.status, body: await html.text() });
    const headers = { rsc: '1', 'next-router-state-tree': TREE };
    let res = await s.fetch(path, { headers });
    if (res.status === 307 && res.headers.get('location')?.includes('_rsc=')) res = await s.fetch(res.headers.get('location')!, { headers });
    out.push({ what: `RSC ${path}`, status: res.status, body: await res.text() });
  }
  for (const r of GET_ROUTES.filter(allowed).filter((r) => !BINARY.test(r.path))) {
    const path = fill(r.path, ids);
    const res = await s.fetch(path);
    out.push({ what: `GET ${path}`, status: res.status, body: await res.text() });
  }
  for (const path of extra) {
    const res = await s.fetch(path);
    out.push({ what: `GET ${path}`, status: res.status, body: await res.text() });
  }
  return out;
}

/** What in these responses gives away the read: its mark ids, its % normal (shown and raw), its cell count. */
function leaks(responses: { what: string; body: string }[], read: { marks: string[]; shown: string; raw: string; cells: number }): string[] {
  const found: string[] = [];
  for (const r of responses) {
    const body = r.body.replace(/<!-- -->/g, '');
    for (const id of read.marks) if (body.includes(id)) found.push(`${r.what}: mark ${id}`);
    // As shown on a page: the rounded figure with its per cent sign (a bare "47.8" is also a volume
    // or a class's share somewhere in the demo; the figure in JSON is caught by `raw`).
    if (new RegExp(`(?<![\\d.])${read.shown.replace('.', '\\.')}[\\s\u00a0]*(?:%|&nbsp;%)`).test(body)) found.push(`${r.what}: "${read.shown} %"`);
    if (body.includes(read.raw)) found.push(`${r.what}: "${read.raw}"`);
    if (new RegExp(`"cellsCounted":${read.cells}\\b`).test(body)) found.push(`${r.what}: cellsCounted ${read.cells}`);
    if (body.includes(`${read.cells} of 200 cells`)) found.push(`${r.what}: "${read.cells} of 200 cells"`);
  }
  return found;
}

const FIRST = () => ({ marks: firstMarks, shown: '78.4', raw: '78.378', cells: 37 });
const SECOND = () => ({ marks: secondMarks, shown: '47.8', raw: '47.826', cells: 23 });

describe('a blind second read, walked over every page and GET route', () => {
  it('gives the second reader nothing of the first read, but their own read', async () => {
    const name = (await testDb()('stallions').where({ id: Number(ids.stallion) }).first('name')).name as string;
    // The list's search too, and the stallion's history over the whole season.
    const extra = [
      `/api/collections?stallionId=${ids.stallion}`, `/api/collections?q=${encodeURIComponent(name)}`, `/api/reads/${secondId}`, `/reads/${secondId}`,
      '/api/collections?sort=collectedAt&dir=desc', `/api/stallions/${ids.stallion}/history?from=2026-01-01&to=2026-12-31`, `/api/stallions/${ids.stallion}/export?from=2026-01-01&to=2026-12-31`,
    ];
    const responses = await walk(reader, 'technician', extra);
    expect(responses.filter((r) => r.status >= 500).map((r) => `${r.what}: ${r.status}`)).toEqual([]);
    expect(leaks(responses, FIRST())).toEqual([]);
    // The walk reaches the collection: the second reader's own read is there (so the search can fail).
    expect(leaks(responses, SECOND()).length).toBeGreaterThan(0);
    expect(responses.find((r) => r.what === `GET /api/reads/${firstId}`)?.status).toBe(403);
  });

  for (const [who, session, role] of [
    ['the first reader', () => tech, 'technician'],
    ['a veterinarian', () => vet, 'veterinarian'],
  ] as const) {
    it(`gives ${who} nothing of the open second read`, async () => {
      const responses = await walk(session(), role, [`/api/collections?stallionId=${ids.stallion}`, `/api/reads/${secondId}`, `/reads/${secondId}`]);
      expect(responses.filter((r) => r.status >= 500).map((r) => `${r.what}: ${r.status}`)).toEqual([]);
      expect(leaks(responses, SECOND())).toEqual([]);
      expect(leaks(responses, FIRST()).length).toBeGreaterThan(0);
      expect(responses.find((r) => r.what === `GET /api/reads/${secondId}`)?.status).toBe(403);
    });
  }

  it('opens both reads to both readers once the second read is submitted', async () => {
    await submit(reader, secondId);
    try {
      const m = await reader.json(`/api/collections/${ids.collection}/morphology`);
      expect(m.body.reads.map((r: { readId: number }) => r.readId)).toEqual([firstId, secondId]);
      expect((await reader.json(`/api/reads/${firstId}`)).status).toBe(200);
      expect((await tech.json(`/api/reads/${secondId}`)).status).toBe(200);
    } finally {
      await testDb()('reads').where({ id: secondId }).update({ status: 'open', submitted_at: null });
    }
  });
});
