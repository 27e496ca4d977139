import { afterAll, describe, expect, it } from 'vitest';
import { closeTestDb, testDb } from '../support/db';
import { counts, goodCollection, makeStallion } from '../support/fixtures';
import { Session, signedIn, USERS } from '../support/http';

afterAll(closeTestDb);

describe('collections API', () => {
  it('creates a collection, audits it and numbers ejaculates of the day', async () => {
    const s = await signedIn(USERS.tech);
    const st = await makeStallion();
    const r1 = await s.json('/api/collections', 'POST', goodCollection(st.id));
    expect(r1.status).toBe(201);
    expect(r1.body.collection).toMatchObject({ stallionId: st.id, volumeMl: 50, concentrationMillionPerMl: 150, numberThatDay: 1, daysSincePrevious: null, recordedBy: 'Tamsin Reedway' });
    const r2 = await s.json('/api/collections', 'POST', goodCollection(st.id, { collectedAt: '2026-06-01T10:00:00.000Z' }));
    expect(r2.body.collection.numberThatDay).toBe(2);
    expect(r2.body.collection.daysSincePrevious).toBe(0);
    const r3 = await s.json('/api/collections', 'POST', goodCollection(st.id, { collectedAt: '2026-06-04T09:00:00.000Z' }));
    // 2026-06-01 10:00 → 06-04 09:00 is 2.96 days, shown to one decimal.
    expect(r3.body.collection.daysSincePrevious).toBe(3);
    const audit = await testDb()('audit_log').where({ entity: 'collection', entity_id: String(r1.body.collection.id), action: 'create' }).first();
    // Who recorded it, what, and the row as stored (no before: it is new).
    const techId = (await testDb()('users').where({ email: USERS.tech }).first('id')).id;
    expect(audit).toMatchObject({ user_id: techId, action: 'create', entity: 'collection', before: null });
    const after = typeof audit.after === 'string' ? JSON.parse(audit.after) : audit.after;
    expect(after).toMatchObject({ stallion_id: st.id, collected_at: '2026-06-01T09:00:00.000Z', volume_ml: 50, concentration_m_per_ml: 150, progressive_motility_pct: 60, recorded_by: techId });
  });

  it('works out concentration from counting-chamber counts (1:20, 500 in 5 squares → 500 × 10^6/mL; WHO laboratory manual 2010 worked example, docs/references.md)', async () => {
    const s = await signedIn(USERS.tech);
    const st = await makeStallion();
    const r = await s.json('/api/collections', 'POST', goodCollection(st.id, { concentrationMethod: 'chamber', concentrationMillionPerMl: null, chamberDilution: 20, chamberSquares: 5, chamberCount1: 500, chamberCount2: 500 }));
    expect(r.status).toBe(201);
    expect(r.body.collection.concentrationMillionPerMl).toBe(500);
  });

  it('asks for a recount when the two chamber counts disagree, writing nothing', async () => {
    const s = await signedIn(USERS.tech);
    const st = await makeStallion();
    const before = await counts();
    // |400 − 500| = 100 > 1.96 × √900 = 58.8 (Poisson check, from memory as the WHO manual's basis)
    const r = await s.json('/api/collections', 'POST', goodCollection(st.id, { concentrationMethod: 'chamber', chamberDilution: 20, chamberSquares: 5, chamberCount1: 400, chamberCount2: 500 }));
    expect(r.status).toBe(422);
    expect(r.body.error.issues).toEqual(expect.arrayContaining([expect.objectContaining({ path: 'chamberCount2', message: expect.stringMatching(/recount/) })]));
    expect(await counts()).toEqual(before);
  });

  it('refuses impossible values with the field and the reason, and writes nothing', async () => {
    const s = await signedIn(USERS.tech);
    const st = await makeStallion();
    const before = await counts();
    const cases: [Record<string, unknown>, string, RegExp][] = [
      [{ volumeMl: -5 }, 'volumeMl', /below 0/],
      [{ totalMotilityPct: 120 }, 'totalMotilityPct', /above 100/],
      [{ totalMotilityPct: 50, progressiveMotilityPct: 60 }, 'progressiveMotilityPct', /exceed total motility/],
      [{ collectedAt: new Date(Date.now() + 3 * 864e5).toISOString() }, 'collectedAt', /future/],
      [{ volumeMl: null }, 'volumeMl', /Volume is needed/],
      [{ stallionId: 'abc' }, 'stallionId', /stallion/],
      [{ preparation: 'glitter' }, 'preparation', /preparation/],
    ];
    for (const [over, path, message] of cases) {
      const r = await s.json('/api/collections', 'POST', goodCollection(st.id, over));
      expect(r.status, JSON.stringify(over)).toBe(422);
      const issue = r.body.error.issues.find((i: { path: string }) => i.path === path);
      expect(issue?.message, JSON.stringify(over)).toMatch(message);
    }
    expect((await s.json('/api/collections', 'POST', goodCollection(999999))).status).toBe(422);
    expect(await counts()).toEqual(before);
  });

  it('edits a collection and keeps the before/after in the audit log', async () => {
    const s = await signedIn(USERS.vet);
    const st = await makeStallion();
    const { body } = await s.json('/api/collections', 'POST', goodCollection(st.id));
    const id = body.collection.id;
    const r = await s.json(`/api/collections/${id}`, 'PATCH', goodCollection(st.id, { volumeMl: 62.5, remarks: 'Gel removed again' }));
    expect(r.status).toBe(200);
    expect(r.body.collection.volumeMl).toBe(62.5);
    const audit = await testDb()('audit_log').where({ entity: 'collection', entity_id: String(id), action: 'update' }).first();
    const before = typeof audit.before === 'string' ? JSON.parse(audit.before) : audit.before;
    const after = typeof audit.after === 'string' ? JSON.parse(audit.after) : audit.after;
    expect(Number(before.volume_ml)).toBe(50);
    expect(after.volume_ml).toBe(62.5);
    const bad = await s.json(`/api/collections/${id}`, 'PATCH', goodCollection(st.id, { volumeMl: -1 }));
    expect(bad.status).toBe(422);
    expect((await s.json(`/api/collections/${id}`)).body.collection.volumeMl).toBe(62.5);
  });

  it('lists with sorting, filtering and paging on the server', async () => {
    const s = await signedIn(USERS.tech);
    const st = await makeStallion();
    for (const [i, v] of [30, 80, 55].entries()) {
      await s.json('/api/collections', 'POST', goodCollection(st.id, { collectedAt: `2026-07-0${i + 1}T09:00:00.000Z`, volumeMl: v }));
    }
    const asc = await s.json(`/api/collections?stallionId=${st.id}&sort=volumeMl&dir=asc`);
    expect(asc.body.rows.map((r: { volumeMl: number }) => r.volumeMl)).toEqual([30, 55, 80]);
    expect(asc.body.total).toBe(3);
    const paged = await s.json(`/api/collections?stallionId=${st.id}&sort=collectedAt&dir=desc&pageSize=5&page=1`);
    expect(paged.body.rows[0].collectedAt).toBe('2026-07-03T09:00:00.000Z');
    const ranged = await s.json(`/api/collections?stallionId=${st.id}&from=2026-07-02&to=2026-07-02`);
    expect(ranged.body.rows.map((r: { volumeMl: number }) => r.volumeMl)).toEqual([80]);
    const page2 = await s.json(`/api/collections?stallionId=${st.id}&sort=volumeMl&pageSize=5&page=2`);
    expect(page2.body.rows).toEqual([]);
    const byName = await s.json(`/api/collections?q=${encodeURIComponent(st.name)}`);
    expect(byName.body.total).toBe(3);
    expect((await s.json('/api/collections?sort=password')).status).toBe(422);
    expect((await s.json('/api/collections?pageSize=100000')).status).toBe(422);
  });

  it('is for staff only', async () => {
    expect((await new Session().json('/api/collections')).status).toBe(401);
    const owner = await signedIn(USERS.owner);
    expect((await owner.json('/api/collections')).status).toBe(403);
    const st = await makeStallion();
    expect((await owner.json('/api/collections', 'POST', goodCollection(st.id))).status).toBe(403);
  });
});
