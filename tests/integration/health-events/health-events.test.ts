import ExcelJS from 'exceljs';
import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { HEALTH_EVENT_KINDS } from '@/lib/health/kinds';
import { exportHeader } from '@/lib/history/export';
import { closeTestDb, testDb } from '../support/db';
import { goodCollection, makeStallion } from '../support/fixtures';
import { Session, signedIn, USERS } from '../support/http';

let tech: Session;
let vet: Session;
let mgr: Session;
let owner: Session;
let original: Record<string, unknown>;

beforeAll(async () => {
  [tech, vet, mgr, owner] = await Promise.all([signedIn(USERS.tech), signedIn(USERS.vet), signedIn(USERS.manager), signedIn(USERS.owner)]);
  original = (await mgr.json('/api/settings')).body.settings;
});
afterAll(async () => {
  await mgr.json('/api/settings', 'PUT', original);
  await closeTestDb();
});

const json = (v: unknown) => (typeof v === 'string' ? JSON.parse(v) : v);
const fever = { kind: 'fever', startedOn: '2026-05-04', endedOn: '2026-05-06', peakTemperatureC: 39.8, notes: 'Treated by the attending vet.' };

/** A stallion owned by the demo client (so the client's own stallion is tested), with collections on the given instants. */
async function stallionWithCollections(instants: string[], { ownedByDemoClient = false } = {}) {
  const st = await makeStallion();
  if (ownedByDemoClient) {
    const me = await testDb()('users').where({ email: USERS.owner }).first('client_id');
    await testDb()('stallions').where({ id: st.id }).update({ client_id: me.client_id });
  }
  const ids: number[] = [];
  for (const collectedAt of instants) ids.push((await tech.json('/api/collections', 'POST', goodCollection(st.id, { collectedAt }))).body.collection.id);
  return { ...st, collections: ids };
}

describe('health events', () => {
  it('are the kinds the database accepts', async () => {
    const row = await testDb()('information_schema.COLUMNS').where({ TABLE_SCHEMA: testDb().raw('database()'), TABLE_NAME: 'health_events', COLUMN_NAME: 'kind' }).first('COLUMN_TYPE as type');
    expect([...String(row.type).matchAll(/'([^']*)'/g)].map((m) => m[1])).toEqual([...HEALTH_EVENT_KINDS]);
  });

  it('are recorded, changed and deleted by technicians and veterinarians, every write audited with before and after', async () => {
    const st = await makeStallion();
    const created = await vet.json(`/api/stallions/${st.id}/health-events`, 'POST', fever);
    expect(created.status).toBe(201);
    const e = created.body.event;
    // 6 May + 57 + 10 = 12 July (computed: 25 days to 31 May, 30 in June, 12 in July); 69 days from 4 May
    expect(e).toMatchObject({ stallionId: st.id, kind: 'fever', kindLabel: 'Fever', startedOn: '2026-05-04', endedOn: '2026-05-06', peakTemperatureC: 39.8, recordedBy: 'Dr Maren Kettleby' });
    expect(e.window).toEqual({ startDate: '2026-05-04', endDate: '2026-05-06', lastDate: '2026-07-11', clearsDate: '2026-07-12', totalDays: 69 });

    const changed = await tech.json(`/api/health-events/${e.id}`, 'PATCH', { ...fever, endedOn: '2026-05-08', notes: 'Treated; normal again on 9 May.' });
    expect(changed.status).toBe(200);
    expect(changed.body.event).toMatchObject({ endedOn: '2026-05-08', updatedBy: 'Tamsin Reedway', window: { clearsDate: '2026-07-14' } });
    expect((await mgr.json(`/api/stallions/${st.id}/health-events`)).body.events.map((x: { id: number }) => x.id)).toEqual([e.id]);

    expect((await tech.json(`/api/health-events/${e.id}`, 'DELETE')).status).toBe(200);
    expect(await testDb()('health_events').where({ id: e.id }).first()).toBeUndefined();
    expect((await tech.json(`/api/health-events/${e.id}`)).status).toBe(404);

    const audit = await testDb()('audit_log').where({ entity: 'health_event', entity_id: String(e.id) }).orderBy('id');
    expect(audit.map((a) => a.action)).toEqual(['create', 'update', 'delete']);
    expect(json(audit[0].after)).toMatchObject({ stallion_id: st.id, kind: 'fever', started_on: '2026-05-04', ended_on: '2026-05-06', peak_temperature_c: 39.8 });
    expect(json(audit[1].before)).toMatchObject({ ended_on: '2026-05-06', notes: 'Treated by the attending vet.' });
    expect(json(audit[1].after)).toMatchObject({ ended_on: '2026-05-08', notes: 'Treated; normal again on 9 May.' });
    expect(json(audit[2].before)).toMatchObject({ ended_on: '2026-05-08' });
    expect(audit[2].after).toBeNull();
  });

  it('refuse bad input with a message for each field, and change nothing', async () => {
    const st = await makeStallion();
    const n = async () => Number((await testDb()('health_events').count({ n: '*' }).first())!.n);
    const before = await n();
    const bad = await tech.json(`/api/stallions/${st.id}/health-events`, 'POST', { kind: 'injury', startedOn: '2026-05-04', endedOn: '2026-05-01', peakTemperatureC: 39 });
    expect(bad.status).toBe(422);
    expect(bad.body.error.issues.map((i: { path: string }) => i.path).sort()).toEqual(['endedOn', 'peakTemperatureC']);
    expect(bad.body.error.issues.find((i: { path: string }) => i.path === 'endedOn').message).toContain('before the start date');
    expect((await tech.json(`/api/stallions/${st.id}/health-events`, 'POST', { kind: 'flu', startedOn: 'soon' })).status).toBe(422);
    expect((await tech.json('/api/stallions/99999999/health-events', 'POST', fever)).status).toBe(404);
    expect((await tech.json(`/api/stallions/${st.id}/health-events`, 'POST', 'not json')).status).toBe(400);
    expect(await n()).toBe(before);
  });

  it('are read by the lab manager but not written; clients get nothing', async () => {
    const st = await stallionWithCollections(['2026-05-20T09:00:00.000Z'], { ownedByDemoClient: true });
    const e = (await vet.json(`/api/stallions/${st.id}/health-events`, 'POST', fever)).body.event;
    expect((await mgr.json(`/api/stallions/${st.id}/health-events`)).status).toBe(200);
    expect((await mgr.json(`/api/stallions/${st.id}/health-events`, 'POST', fever)).status).toBe(403);
    expect((await mgr.json(`/api/health-events/${e.id}`, 'PATCH', fever)).status).toBe(403);
    expect((await mgr.json(`/api/health-events/${e.id}`, 'DELETE')).status).toBe(403);
    // The client owns this stallion, and still sees none of it.
    expect((await owner.json(`/api/stallions/${st.id}`)).status).toBe(200);
    for (const path of [`/api/stallions/${st.id}/health-events`, `/api/health-events/${e.id}`, `/api/stallions/${st.id}/history`, `/api/stallions/${st.id}/export`, '/api/collections/export']) {
      const r = await owner.json(path);
      expect(r.status, path).toBe(403);
      expect(JSON.stringify(r.body)).not.toContain('39.8');
    }
    expect((await owner.json(`/api/stallions/${st.id}/health-events`, 'POST', fever)).status).toBe(403);
    expect((await owner.json(`/api/health-events/${e.id}`, 'DELETE')).status).toBe(403);
    expect(await testDb()('health_events').where({ id: e.id }).first('id')).toBeTruthy();
    const page = await owner.fetch(`/stallions/${st.id}/history`);
    expect(await page.text()).not.toContain('Peak temperature');
  }, 90_000);
});

describe('windows and flags', () => {
  it('flag collections inside a window in the list and on the collection, and a settings change of window length moves them', async () => {
    // 10 July 2026 is day 68 of a window opened on 4 May (computed: 28 in May from the 4th, 30 in June, 10); 14 July day 72.
    const st = await stallionWithCollections(['2026-04-30T09:00:00.000Z', '2026-05-04T09:00:00.000Z', '2026-07-10T09:00:00.000Z', '2026-07-11T09:00:00.000Z', '2026-07-14T09:00:00.000Z']);
    const [before, first, day68, day69, day72] = st.collections;
    const flags = async () => {
      const list = await tech.json(`/api/collections?stallionId=${st.id}&sort=collectedAt&dir=asc`);
      return Object.fromEntries(list.body.rows.map((r: { id: number; window: unknown }) => [r.id, r.window]));
    };
    expect(Object.values(await flags()).every((f) => f === null)).toBe(true);

    await vet.json(`/api/stallions/${st.id}/health-events`, 'POST', fever); // 4–6 May: 69 days, clears 12 July
    let f = await flags();
    expect(f[before]).toBeNull();
    expect(f[first]).toMatchObject({ clearsDate: '2026-07-12', events: [{ kind: 'fever', label: 'Fever', windowDay: 1, windowDays: 69, clearsDate: '2026-07-12' }] });
    expect(f[day68].events[0].windowDay).toBe(68);
    expect(f[day69].events[0].windowDay).toBe(69); // the last day inside
    expect(f[day72]).toBeNull();
    const one = await tech.json(`/api/collections/${day69}`);
    expect(one.body.collection.window).toMatchObject({ clearsDate: '2026-07-12' });

    // A second, overlapping event: flagged once, each event listed, the stretch clears with the later one.
    await tech.json(`/api/stallions/${st.id}/health-events`, 'POST', { kind: 'medication', startedOn: '2026-05-10', notes: 'Antipyretic course' });
    f = await flags();
    // 10 May + 67 = 16 July (computed: 22 days to 31 May, 30 in June, 16 in July)
    expect(f[day69]).toMatchObject({ clearsDate: '2026-07-16', events: [{ kind: 'fever', windowDay: 69 }, { kind: 'medication', windowDay: 63 }] });
    expect(f[day72]).toMatchObject({ clearsDate: '2026-07-16', events: [{ kind: 'medication', windowDay: 66 }] });

    // Transit 10 → 4 days: the fever clears on 6 July (6 May + 61), the medication on 10 July (10 May + 61).
    expect((await mgr.json('/api/settings', 'PUT', { ...original, epididymalTransitDays: 4 })).status).toBe(200);
    f = await flags();
    expect(f[day68]).toBeNull(); // 10 July is now the medication's clearing day
    expect(f[day72]).toBeNull();
    expect(f[first]).toMatchObject({ clearsDate: '2026-07-10', events: [{ kind: 'fever', windowDay: 1, windowDays: 63 }] });
    // and longer again: 57 + 14 = 71 days after 10 May clears 20 July
    await mgr.json('/api/settings', 'PUT', { ...original, epididymalTransitDays: 14 });
    f = await flags();
    expect(f[day72]).toMatchObject({ clearsDate: '2026-07-20' });
    await mgr.json('/api/settings', 'PUT', original);
  });

  it('count the lab’s days: a change of time zone moves a collection late in the evening', async () => {
    // 6 July 2026 23:30 in New York (EDT, UTC−4) is 03:30 UTC on 7 July. An event on 1 May (one day)
    // clears on 7 July (1 May + 67, computed: 31 in May, 30 in June, 7): in UTC the collection is on
    // the clearing day, in New York on day 67.
    const st = await stallionWithCollections(['2026-07-07T03:30:00.000Z']);
    await tech.json(`/api/stallions/${st.id}/health-events`, 'POST', { kind: 'injury', startedOn: '2026-05-01' });
    const flag = async () => (await tech.json(`/api/collections/${st.collections[0]}`)).body.collection.window;
    expect(await flag()).toBeNull();
    await mgr.json('/api/settings', 'PUT', { ...original, timeZone: 'America/New_York' });
    expect(await flag()).toMatchObject({ events: [{ kind: 'injury', windowDay: 67 }] });
    await mgr.json('/api/settings', 'PUT', original);
  });
});

describe('the stallion page', () => {
  it('says "re-evaluate from {date}" while a window is open, and not after', async () => {
    const st = await makeStallion();
    const day = (offset: number) => new Date(Date.now() + offset * 86_400_000).toISOString().slice(0, 10);
    const shown = (d: string) => new Date(`${d}T00:00:00Z`).toLocaleDateString('en-GB', { day: '2-digit', month: 'short', year: 'numeric', timeZone: 'UTC' });
    const page = async () => (await tech.fetch(`/stallions/${st.id}`)).text();
    expect(await page()).not.toContain('Re-evaluate from');
    // An injury 80 days ago has cleared (67 days); one 10 days ago clears 57 days from today.
    await tech.json(`/api/stallions/${st.id}/health-events`, 'POST', { kind: 'injury', startedOn: day(-80) });
    expect(await page()).not.toContain('Re-evaluate from');
    await tech.json(`/api/stallions/${st.id}/health-events`, 'POST', { kind: 'housing', startedOn: day(-10), notes: 'Moved to the north barn' });
    const html = await page();
    expect(html).toContain('Re-evaluate from');
    expect(html).toContain(shown(day(57)));
  });
});

describe('history API and exports', () => {
  it('returns the series of a range with figures, windows and the events, in one answer', async () => {
    const st = await stallionWithCollections(['2026-04-20T09:00:00.000Z', '2026-05-27T09:00:00.000Z', '2026-08-01T09:00:00.000Z', '2025-06-01T09:00:00.000Z']);
    await vet.json(`/api/stallions/${st.id}/health-events`, 'POST', fever);
    const r = await tech.json(`/api/stallions/${st.id}/history?from=2026-01-01&to=2026-12-31`);
    expect(r.status).toBe(200);
    expect(r.body.range).toEqual({ from: '2026-01-01', to: '2026-12-31' });
    expect(r.body.seasons).toEqual([2026, 2025]);
    expect(r.body.series.map((p: { id: number }) => p.id)).toEqual(st.collections.slice(0, 3));
    const [a, b] = r.body.series;
    expect(a).toMatchObject({ collectedAt: '2026-04-20T09:00:00.000Z', percentNormal: null, totalSpermBillion: 7.5, windows: [] });
    // 27 May is day 24 of the fever of 4 May (computed: 27 − 4 + 1)
    expect(b.windows).toEqual([expect.objectContaining({ kind: 'fever', windowDay: 24, windowDays: 69 })]);
    expect(b.daysSincePrevious).toBe(37);
    expect(r.body.events).toEqual([expect.objectContaining({ kind: 'fever', peakTemperatureC: 39.8, window: expect.objectContaining({ clearsDate: '2026-07-12' }) })]);
    expect(r.body.windows).toEqual([{ startDate: '2026-05-04', clearsDate: '2026-07-12', eventIds: [r.body.events[0].id] }]);
    expect(r.body.summary).toMatchObject({ collections: 3, insideWindows: { collections: 1 }, outsideWindows: { collections: 2 } });
    // the default is the season of the latest collection
    expect((await tech.json(`/api/stallions/${st.id}/history`)).body.range).toEqual({ from: '2026-01-01', to: '2026-12-31' });
    expect((await tech.json(`/api/stallions/${st.id}/history?from=2026-05-01&to=2026-04-01`)).status).toBe(422);
    expect((await tech.json(`/api/stallions/99999999/history`)).status).toBe(404);
    const none = await makeStallion();
    expect((await tech.json(`/api/stallions/${none.id}/history`)).body).toMatchObject({ series: [], events: [], summary: { collections: 0 } });
  });

  it('exports a stallion’s collections as CSV and .xlsx with the same numbers as the history', async () => {
    const st = await stallionWithCollections(['2026-04-20T09:00:00.000Z', '2026-05-27T09:00:00.000Z']);
    await vet.json(`/api/stallions/${st.id}/health-events`, 'POST', fever);
    const history = (await tech.json(`/api/stallions/${st.id}/history?from=2026-01-01&to=2026-12-31`)).body;
    const csv = await tech.fetch(`/api/stallions/${st.id}/export?format=csv&from=2026-01-01&to=2026-12-31`);
    expect(csv.status).toBe(200);
    expect(csv.headers.get('content-type')).toBe('text/csv; charset=utf-8');
    expect(csv.headers.get('content-disposition')).toMatch(/^attachment; filename="?test-stallion-.*_2026-01-01_to_2026-12-31\.csv/);
    const rows: string[][] = parse(Buffer.from(await csv.arrayBuffer()), { bom: true });
    expect(rows[0]).toEqual(exportHeader());
    expect(rows.slice(1).map((r) => Number(r[0]))).toEqual(st.collections);
    const col = (r: string[], h: string) => r[exportHeader().indexOf(h)];
    expect(Number(col(rows[2]!, 'Total sperm (10^9)'))).toBe(history.series[1].totalSpermBillion);
    expect(col(rows[2]!, 'Collected at')).toBe('2026-05-27T09:00:00.000+00:00'); // the lab's zone is UTC here
    expect(col(rows[2]!, 'Inside health-event windows')).toBe('Fever (day 24 of 69)');

    const xlsx = await tech.fetch(`/api/stallions/${st.id}/export?format=xlsx&from=2026-01-01&to=2026-12-31`);
    expect(xlsx.headers.get('content-type')).toBe('application/vnd.openxmlformats-officedocument.spreadsheetml.sheet');
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.load(await xlsx.arrayBuffer());
    const sheet = wb.worksheets[0]!;
    expect(sheet.rowCount).toBe(3);
    expect(sheet.getRow(3).getCell(exportHeader().indexOf('Total sperm (10^9)') + 1).value).toBe(history.series[1].totalSpermBillion);

    expect((await tech.json(`/api/stallions/${st.id}/export?format=pdf`)).status).toBe(422);
    expect((await tech.json('/api/stallions/99999999/export')).status).toBe(404);
  });

  it('exports the lab’s collections of a date range, across stallions, in lab days', async () => {
    const a = await stallionWithCollections(['2019-03-01T09:00:00.000Z', '2019-03-02T23:30:00.000Z']);
    const b = await stallionWithCollections(['2019-03-02T10:00:00.000Z', '2019-03-04T10:00:00.000Z']);
    const mine = new Set([...a.collections, ...b.collections]);
    const ids = async (q: string) => {
      const r = await tech.fetch(`/api/collections/export?format=csv&${q}`);
      // Only these tests' rows (a re-run on the same database adds more of them on the same days).
      return (parse(Buffer.from(await r.arrayBuffer()), { bom: true }) as string[][]).slice(1).map((r) => Number(r[0])).filter((id) => mine.has(id));
    };
    expect(await ids('from=2019-03-01&to=2019-03-02')).toEqual([a.collections[0], b.collections[0], a.collections[1]]);
    expect(await ids(`from=2019-03-01&to=2019-03-31&stallionId=${b.id}`)).toEqual(b.collections);
    // In Berlin (CET, UTC+1) 23:30 UTC on 2 March is 00:30 on 3 March: out of the range
    await mgr.json('/api/settings', 'PUT', { ...original, timeZone: 'Europe/Berlin' });
    expect(await ids('from=2019-03-01&to=2019-03-02')).toEqual([a.collections[0], b.collections[0]]);
    await mgr.json('/api/settings', 'PUT', original);
  });

  it('gives the report the events covering a collection, in the snapshot’s shape', async () => {
    const st = await stallionWithCollections(['2026-05-27T09:00:00.000Z', '2026-08-01T09:00:00.000Z']);
    await vet.json(`/api/stallions/${st.id}/health-events`, 'POST', fever);
    // Called in process, as the signing code will (db/queries/health-events.ts).
    const { healthEventsCoveringCollection } = await import('@/db/queries/health-events');
    const actor = { id: 1, role: 'veterinarian' as const, name: 'x', email: 'x', clientId: null };
    const events = await healthEventsCoveringCollection(actor as never, st.collections[0]!);
    expect(events).toEqual([
      { kind: 'Fever', description: 'Peak temperature 39.8 °C — Treated by the attending vet.', startedOn: '2026-05-04', endedOn: '2026-05-06', dayOfWindow: 24, windowDays: 69, windowClearsOn: '2026-07-12' },
    ]);
    expect(await healthEventsCoveringCollection(actor as never, st.collections[1]!)).toEqual([]);
  });
});
