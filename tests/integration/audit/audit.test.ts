import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeTestDb, testDb } from '../support/db';
import { Session, signedIn, USERS } from '../support/http';
import { built, signed } from '../reports/support';

// The lab manager's audit log: who changed what and when, before and after, filtered by person,
// record type, record and date, paged on the server.
afterAll(closeTestDb);

let manager: Session;
let vet: Session;
beforeAll(async () => {
  [manager, vet] = await Promise.all([signedIn(USERS.manager), signedIn(USERS.vet)]);
});

describe('GET /api/audit', () => {
  it('is for the lab manager only', async () => {
    for (const email of [USERS.tech, USERS.vet, USERS.owner]) expect((await (await signedIn(email)).json('/api/audit')).status).toBe(403);
    expect((await new Session().json('/api/audit')).status).toBe(401);
    expect((await manager.json('/api/audit')).status).toBe(200);
  });

  it('filters by person, record type and record, newest first, with before and after', async () => {
    const c = await built('settled');
    const report = await signed(vet, c.collectionId);
    await vet.json(`/api/reports/${report.id}/amend`, 'POST', { reason: 'Audit check reason.' });
    const vetId = (await testDb()('users').where({ email: USERS.vet }).first('id')).id;
    const r = await manager.json(`/api/audit?entity=report&entityId=${report.id}&userId=${vetId}`);
    expect(r.status).toBe(200);
    expect(r.body.total).toBe(2);
    expect(r.body.rows.map((x: { action: string }) => x.action)).toEqual(['amend', 'sign']);
    expect(r.body.rows[0]).toMatchObject({ userName: 'Dr Maren Kettleby', entity: 'report', entityId: String(report.id), reason: 'Audit check reason.', before: { status: 'current', version: 1 }, after: { status: 'amended', version: 1 } });
    expect((await manager.json(`/api/audit?entity=report&entityId=${report.id}&q=sign`)).body.rows.map((x: { action: string }) => x.action)).toEqual(['sign']);
    const managerId = (await testDb()('users').where({ email: USERS.manager }).first('id')).id;
    expect((await manager.json(`/api/audit?entity=report&entityId=${report.id}&userId=${managerId}`)).body.total).toBe(0);
  });

  it('filters by the lab’s days and pages on the server', async () => {
    const all = await manager.json('/api/audit?pageSize=5');
    expect(all.body.rows).toHaveLength(5);
    expect(all.body.total).toBeGreaterThan(5);
    const next = await manager.json('/api/audit?pageSize=5&page=2');
    expect(next.body.rows.map((x: { id: number }) => x.id)).not.toEqual(expect.arrayContaining([all.body.rows[0].id]));
    const ats = all.body.rows.map((x: { at: string }) => x.at);
    expect([...ats].sort().reverse()).toEqual(ats);
    const today = new Date().toISOString().slice(0, 10);
    expect((await manager.json(`/api/audit?from=${today}&to=${today}`)).body.total).toBeGreaterThan(0);
    expect((await manager.json('/api/audit?from=2001-01-01&to=2001-01-02')).body.total).toBe(0);
    expect((await manager.json('/api/audit?from=yesterday')).status).toBe(422);
  });
});
