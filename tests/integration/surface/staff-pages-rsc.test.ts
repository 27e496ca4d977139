import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { demoIds, fill, staffPages, type DemoIds } from '../../support/surface';
import { closeTestDb, testDb } from '../support/db';
import { Session, signedIn, USERS } from '../support/http';

// A client sends the request the browser's router makes when it already holds the staff layout
// (RSC: 1, and a router state tree that says so). Next then renders the page alone, without the
// layout and its role check, so each page must check the role itself (item 4 of the hardening).
afterAll(closeTestDb);

/** The router state of some other staff page, whose (lab) layout is therefore already loaded. */
const TREE = encodeURIComponent(JSON.stringify(['', { children: ['(lab)', { children: ['elsewhere', { children: ['__PAGE__', {}] }] }] }]));

async function rsc(s: Session, path: string): Promise<{ status: number; body: string }> {
  const headers = { rsc: '1', 'next-router-state-tree': TREE };
  let res = await s.fetch(path, { headers });
  // Next asks for its cache-busting search parameter first.
  if (res.status === 307 && res.headers.get('location')?.includes('_rsc=')) res = await s.fetch(res.headers.get('location')!, { headers });
  return { status: res.status, body: await res.text() };
}

let ids: DemoIds;
let names: string[];
let owner: Session;
let tech: Session;

beforeAll(async () => {
  ids = await demoIds(testDb());
  // Every client's and stallion's name: page data no client may receive from a staff page.
  names = [...(await testDb()('clients').pluck('name')), ...(await testDb()('stallions').pluck('name'))];
  [owner, tech] = await Promise.all([signedIn(USERS.owner), signedIn(USERS.tech)]);
});

describe('staff pages requested by a client with the RSC headers', () => {
  it('give the page data to staff (so the request is the one that matters)', async () => {
    const r = await rsc(tech, fill('/stallions/[stallion]/edit', ids));
    expect(r.status).toBe(200);
    expect(names.filter((n) => r.body.includes(n)).length).toBeGreaterThan(1);
  });

  for (const page of staffPages()) {
    it(`${page.path}: no page data, a redirect to the no-access page`, async () => {
      const r = await rsc(owner, fill(page.path, ids));
      expect(r.status).toBeLessThan(500);
      expect(names.filter((n) => r.body.includes(n))).toEqual([]);
      expect(r.body).toMatch(/NEXT_REDIRECT;replace;\/no-access;/);
    });
  }
});
