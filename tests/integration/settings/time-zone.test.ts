import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeTestDb } from '../support/db';
import { goodCollection, makeStallion } from '../support/fixtures';
import { Session, signedIn, USERS } from '../support/http';

afterAll(closeTestDb);

let tech: Session;
let mgr: Session;
let original: Record<string, unknown>;

beforeAll(async () => {
  [tech, mgr] = await Promise.all([signedIn(USERS.tech), signedIn(USERS.manager)]);
  original = (await mgr.json('/api/settings')).body.settings;
});
afterAll(async () => {
  await mgr.json('/api/settings', 'PUT', original);
});

describe('the lab time zone', () => {
  it('is a lab setting: an unknown zone is refused with a message, nothing changed', async () => {
    expect(original.timeZone).toBe('UTC');
    const bad = await mgr.json('/api/settings', 'PUT', { ...original, timeZone: 'Mars/Olympus_Mons' });
    expect(bad.status).toBe(422);
    expect(bad.body.error.issues[0]).toMatchObject({ path: 'timeZone' });
    expect(bad.body.error.message).toContain('time zone');
    expect((await mgr.json('/api/settings')).body.settings.timeZone).toBe('UTC');
    expect((await tech.json('/api/settings', 'PUT', { ...original, timeZone: 'Europe/London' })).status).toBe(403);
  });

  it('decides which collections share a day, for "ejaculate of the day" and the list’s date filter', async () => {
    const st = await makeStallion();
    // 19:30 and 20:30 on 10 June in New York (EDT, UTC−4) are 23:30 on 10 June and 00:30 on 11 June in UTC.
    const make = async (collectedAt: string) => (await tech.json('/api/collections', 'POST', goodCollection(st.id, { collectedAt }))).body.collection;
    const a = await make('2026-06-10T23:30:00.000Z');
    const b = await make('2026-06-11T00:30:00.000Z');
    expect([a.numberThatDay, b.numberThatDay]).toEqual([1, 1]); // two UTC days

    const put = await mgr.json('/api/settings', 'PUT', { ...original, timeZone: 'America/New_York' });
    expect(put.status).toBe(200);
    const numbers = async () => Promise.all([a.id, b.id].map(async (id) => (await tech.json(`/api/collections/${id}`)).body.collection.numberThatDay));
    expect(await numbers()).toEqual([1, 2]); // renumbered: one New York day
    const listed = await tech.json(`/api/collections?stallionId=${st.id}&from=2026-06-10&to=2026-06-10`);
    expect(listed.body.rows.map((r: { id: number }) => r.id).sort()).toEqual([a.id, b.id].sort());
    const c = await make('2026-06-11T01:30:00.000Z'); // 21:30 in New York, still 10 June there
    expect(c.numberThatDay).toBe(3);

    await mgr.json('/api/settings', 'PUT', { ...original, timeZone: 'UTC' });
    expect(await numbers()).toEqual([1, 1]);
    expect((await tech.json(`/api/collections/${c.id}`)).body.collection.numberThatDay).toBe(2);
    const utcDay = await tech.json(`/api/collections?stallionId=${st.id}&from=2026-06-10&to=2026-06-10`);
    expect(utcDay.body.rows.map((r: { id: number }) => r.id)).toEqual([a.id]);
  });
});
