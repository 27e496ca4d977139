import { afterAll, describe, expect, it } from 'vitest';
import { closeTestDb, testDb, unique } from '../support/db';
import { counts, makeStallion } from '../support/fixtures';
import { signedIn, USERS } from '../support/http';

afterAll(closeTestDb);

describe('stallions and clients API', () => {
  it('creates a client and a stallion, edits it, and audits both', async () => {
    const s = await signedIn(USERS.tech);
    const c = await s.json('/api/clients', 'POST', { name: unique('Linnet Farrow'), kind: 'owner', email: 'linnet@farrow.example' });
    expect(c.status).toBe(201);
    const reg = unique('956');
    const r = await s.json('/api/stallions', 'POST', { name: 'Tidewater Sorrel', clientId: c.body.client.id, breed: 'Warmblood', foalingYear: 2015, registration: reg });
    expect(r.status).toBe(201);
    expect(r.body.stallion).toMatchObject({ name: 'Tidewater Sorrel', owner: c.body.client.name, collections: 0 });
    const id = r.body.stallion.id;
    const e = await s.json(`/api/stallions/${id}`, 'PATCH', { name: 'Tidewater Sorrel II', clientId: c.body.client.id, foalingYear: 2016 });
    expect(e.body.stallion).toMatchObject({ name: 'Tidewater Sorrel II', foalingYear: 2016, registration: null });
    const actions = await testDb()('audit_log').where({ entity: 'stallion', entity_id: String(id) }).pluck('action');
    expect(actions).toEqual(['create', 'update']);
  });

  it('refuses bad input and duplicates, writing nothing', async () => {
    const s = await signedIn(USERS.tech);
    const st = await makeStallion();
    const reg = (await testDb()('stallions').where({ id: st.id }).first()).registration;
    const before = await counts();
    const bad = await s.json('/api/stallions', 'POST', { name: '', clientId: 'x', foalingYear: 1800 });
    expect(bad.status).toBe(422);
    expect(bad.body.error.issues.map((i: { path: string }) => i.path).sort()).toEqual(['clientId', 'foalingYear', 'name']);
    expect((await s.json('/api/stallions', 'POST', { name: 'Dup', clientId: st.clientId, registration: reg })).status).toBe(409);
    expect((await s.json('/api/stallions', 'POST', { name: 'Ghost owner', clientId: 999999 })).status).toBe(422);
    expect((await s.json('/api/clients', 'POST', { name: 'X', kind: 'owner', email: 'nope' })).status).toBe(422);
    expect(await counts()).toEqual(before);
  });

  it('lets a client see only their own stallions, and never edit', async () => {
    const owner = await signedIn(USERS.owner);
    const mine = await owner.json('/api/stallions?pageSize=100');
    expect(mine.status).toBe(200);
    const me = await testDb()('users').where({ email: USERS.owner }).first();
    expect(mine.body.total).toBeGreaterThan(0);
    for (const row of mine.body.rows) expect(row.clientId).toBe(me.client_id);
    const other = await makeStallion();
    expect((await owner.json(`/api/stallions/${other.id}`)).status).toBe(404);
    expect((await owner.json(`/api/stallions?clientId=${other.clientId}`)).body.total).toBe(0);
    expect((await owner.json(`/api/stallions/${mine.body.rows[0].id}`, 'PATCH', { name: 'Renamed', clientId: me.client_id })).status).toBe(403);
    expect((await owner.json('/api/clients')).status).toBe(403);
  });

  it('sorts and pages stallions on the server', async () => {
    const s = await signedIn(USERS.vet);
    const a = await s.json('/api/stallions?sort=name&dir=asc&pageSize=5');
    const names = a.body.rows.map((r: { name: string }) => r.name);
    expect(names).toEqual([...names].sort((x: string, y: string) => x.localeCompare(y)));
    const total = a.body.total;
    const last = await s.json(`/api/stallions?sort=name&dir=asc&pageSize=5&page=${Math.ceil(total / 5)}`);
    expect(last.body.rows.length).toBe(total - 5 * (Math.ceil(total / 5) - 1));
  });

  it('records testicular measurements, refusing half-given dimensions', async () => {
    const s = await signedIn(USERS.vet);
    const st = await makeStallion();
    const ok = await s.json(`/api/stallions/${st.id}/testis`, 'POST', { measuredOn: '2026-05-01', method: 'caliper', leftLengthCm: 10, leftWidthCm: 6.5, leftHeightCm: 7, rightLengthCm: 10, rightWidthCm: 6.5, rightHeightCm: 7, totalWidthCm: 9.5 });
    expect(ok.status).toBe(201);
    const before = await counts();
    const half = await s.json(`/api/stallions/${st.id}/testis`, 'POST', { measuredOn: '2026-05-01', method: 'caliper', leftLengthCm: 10 });
    expect(half.status).toBe(422);
    expect(half.body.error.issues.map((i: { path: string }) => i.path)).toEqual(expect.arrayContaining(['leftWidthCm', 'leftHeightCm']));
    expect((await s.json(`/api/stallions/${st.id}/testis`, 'POST', { measuredOn: '2999-01-01', method: 'caliper', totalWidthCm: 9 })).status).toBe(422);
    expect(await counts()).toEqual(before);
    const list = await s.json(`/api/stallions/${st.id}/testis`);
    expect(list.body.measurements[0]).toMatchObject({ measuredOn: '2026-05-01', leftLengthCm: 10, totalWidthCm: 9.5 });
  });

  it('lets only the lab manager change lab settings', async () => {
    const tech = await signedIn(USERS.tech);
    const current = (await tech.json('/api/settings')).body.settings;
    expect(current.targetCells).toBeGreaterThan(0);
    expect((await tech.json('/api/settings', 'PUT', current)).status).toBe(403);
    const mgr = await signedIn(USERS.manager);
    expect((await mgr.json('/api/settings', 'PUT', { ...current, cooledDoseBillion: -1 })).status).toBe(422);
    const r = await mgr.json('/api/settings', 'PUT', { ...current, targetCells: 150 });
    expect(r.body.settings.targetCells).toBe(150);
    await mgr.json('/api/settings', 'PUT', current);
  });
});
