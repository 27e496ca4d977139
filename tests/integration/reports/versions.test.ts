import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { goodCollection } from '../support/fixtures';
import { closeTestDb, testDb } from '../support/db';
import { Session, signedIn, USERS } from '../support/http';
import { built, json, pdfBytes, pdfStored, sha256, signed } from './support';

// A signed report is frozen: its JSON and its PDF never change, whatever changes afterwards.
// Amendments make versions and keep the old ones, each with its reason, in the audit log too.
afterAll(closeTestDb);

let vet: Session;
let tech: Session;
let manager: Session;
beforeAll(async () => {
  [vet, tech, manager] = await Promise.all([signedIn(USERS.vet), signedIn(USERS.tech), signedIn(USERS.manager)]);
});

async function frozen(reportId: number) {
  const r = await vet.json(`/api/reports/${reportId}`);
  const pdf = await pdfBytes(vet, reportId);
  expect(pdf.status).toBe(200);
  return { snapshot: r.body.report.snapshot, sha: sha256(pdf.bytes), bytes: pdf.bytes };
}

describe('a signed report', () => {
  it('keeps its JSON and PDF when lab settings, class sets, records and marks change afterwards', async () => {
    const c = await built('settled');
    const report = await signed(vet, c.collectionId, { remarks: 'As signed.', interpretation: null });
    const stored = await pdfStored(vet, report.id);
    const before = await frozen(report.id);
    expect(before.sha).toBe(stored.sha256);
    expect(before.snapshot).toEqual(report.snapshot);
    const same = async (what: string) => {
      const now = await frozen(report.id);
      expect(now.snapshot, what).toEqual(before.snapshot);
      expect(now.sha, what).toBe(before.sha);
      expect(Buffer.compare(now.bytes, before.bytes), what).toBe(0);
    };

    // Lab settings: dose sizes, thresholds, target, window lengths, the lab's name.
    const settings = (await manager.json('/api/settings')).body.settings;
    const classSets = (await manager.json('/api/class-sets')).body.classSets;
    const defaultSet = classSets.find((s: { isDefault: boolean }) => s.isDefault);
    try {
      const changed = { ...settings, freshDoseBillion: 0.7, cooledDoseBillion: 1.5, bseThresholdBillion: 2, targetCells: 150, spermatogenesisDays: 60, epididymalTransitDays: 12, labName: 'Renamed laboratory' };
      expect((await manager.json('/api/settings', 'PUT', changed)).status).toBe(200);
      await same('after the lab settings changed');
      // The class set: a class renamed and the set's name changed.
      const renamed = { name: `${defaultSet.name} (edited)`, classes: defaultSet.classes.map((k: { key: string; name: string }) => (k.key === 'normal' ? { ...k, name: 'Normal, renamed' } : k)), isDefault: true };
      expect((await manager.json(`/api/class-sets/${defaultSet.id}`, 'PUT', renamed)).status).toBe(200);
      await same('after the class set changed');
      // The stallion's record and its owner's.
      const st = (await tech.json(`/api/stallions/${c.stallionId}`)).body.stallion;
      expect((await tech.json(`/api/stallions/${c.stallionId}`, 'PATCH', { name: `${st.name} Renamed`, registration: st.registration, breed: 'Friesian', foalingYear: 2016, clientId: st.clientId })).status).toBe(200);
      await testDb()('clients').where({ id: c.clientId }).update({ name: 'Another owner name' });
      await same('after the stallion and owner records changed');
      // The collection's record and its marks: only after an amendment unlocks them.
      expect((await vet.json(`/api/reports/${report.id}/amend`, 'POST', { reason: 'Volume corrected from the collection sheet.' })).status).toBe(200);
      expect((await tech.json(`/api/collections/${c.collectionId}`, 'PATCH', goodCollection(c.stallionId, { collectedAt: '2026-05-26T07:40:00.000Z', volumeMl: 40, concentrationMillionPerMl: 165, totalMotilityPct: 62, progressiveMotilityPct: 45 }))).status).toBe(200);
      const normals = await testDb()('marks').where({ read_id: c.reads.settled, class_key: 'normal' }).orderBy('id').limit(5).pluck('id');
      await testDb()('marks').whereIn('id', normals).update({ class_key: 'detached_head' });
      await same('after the collection record and marks changed');

      // Signing the corrected report makes version 2 from the new figures; version 1 stays as it was.
      const v2 = await signed(vet, c.collectionId);
      expect(v2.version).toBe(2);
      // 40 mL × 165 × 10^6/mL = 6.6 × 10^9 (computed); 76 normal of 263 after the corrections (81 − 5).
      expect(v2.snapshot.semen.totalSpermBillion).toBeCloseTo(6.6, 10);
      expect(v2.snapshot.morphology.normalCount).toBe(76);
      // Version 2 uses the settings of its own signing.
      expect(v2.snapshot.settings.doses.fresh.sizeBillion).toBe(0.7);
      expect(v2.snapshot.lab.name).toBe('Renamed laboratory');
      expect(v2.snapshot.stallion.name).toBe(`${st.name} Renamed`);
      await pdfStored(vet, v2.id);
      await same('after version 2 was signed');
      expect(before.snapshot.semen.totalSpermBillion).toBeCloseTo(6.27, 10);
      expect(before.snapshot.settings.doses.fresh.sizeBillion).toBe(settings.freshDoseBillion);
    } finally {
      await manager.json('/api/settings', 'PUT', settings);
      await manager.json(`/api/class-sets/${defaultSet.id}`, 'PUT', { name: defaultSet.name, classes: defaultSet.classes, isDefault: true });
    }
  });
});

describe('amendments', () => {
  it('are the veterinarian’s, with a reason', async () => {
    const c = await built('settled');
    const report = await signed(vet, c.collectionId);
    for (const s of [tech, manager]) expect((await s.json(`/api/reports/${report.id}/amend`, 'POST', { reason: 'Not mine to amend.' })).status).toBe(403);
    const owner = await signedIn(USERS.owner);
    expect((await owner.json(`/api/reports/${report.id}/amend`, 'POST', { reason: 'Not mine to amend.' })).status).toBe(403);
    expect((await vet.json(`/api/reports/${report.id}/amend`, 'POST', {})).status).toBe(422);
    expect((await vet.json(`/api/reports/${report.id}/amend`, 'POST', { reason: ' ' })).status).toBe(422);
    expect((await testDb()('collections').where({ id: c.collectionId }).first('signed_report_id')).signed_report_id).toBe(report.id);
  });

  it('make versions and keep the old one readable, marked “superseded by version 2, reason …”, every step in the audit log', async () => {
    const c = await built('settled');
    const v1 = await signed(vet, c.collectionId);
    const reason = 'Interpretation completed after the follow-up examination.';
    const amended = await vet.json(`/api/reports/${v1.id}/amend`, 'POST', { reason });
    expect(amended.status).toBe(200);
    expect(amended.body.report).toMatchObject({ status: 'amended', amendment: { reason, by: 'Dr Maren Kettleby' } });
    expect((await vet.json(`/api/reports/${v1.id}/amend`, 'POST', { reason })).status).toBe(409);
    const state = await vet.json(`/api/collections/${c.collectionId}/report`);
    expect(state.body.state).toBe('amended');
    expect(state.body.readiness.ready).toBe(true);

    const v2 = await signed(vet, c.collectionId, { interpretation: 'Re-evaluate after the window clears.' });
    expect(v2.version).toBe(2);
    expect(v2.snapshot.report.supersedes).toMatchObject({ version: 1, reason, by: 'Dr Maren Kettleby' });

    const old = (await vet.json(`/api/reports/${v1.id}`)).body.report;
    expect(old.status).toBe('superseded');
    expect(old.supersededBy).toMatchObject({ version: 2, reason });
    // The frozen snapshot is as signed; the page's copy says it is superseded.
    expect(old.snapshot.report.supersededBy).toBeNull();
    expect(old.content.report.supersededBy).toMatchObject({ version: 2, reason });
    expect(old.versions.map((v: { version: number; status: string }) => [v.version, v.status])).toEqual([[1, 'superseded'], [2, 'current']]);
    expect((await vet.json(`/api/reports/${v1.id}/amend`, 'POST', { reason })).status).toBe(409);

    const audit = await testDb()('audit_log').where({ entity: 'report' }).whereIn('entity_id', [String(v1.id), String(v2.id)]).orderBy('id').select('action', 'entity_id', 'reason', 'after');
    expect(audit.map((a) => [a.action, Number(a.entity_id)])).toEqual([['sign', v1.id], ['amend', v1.id], ['sign', v2.id]]);
    expect(audit[1]!.reason).toBe(reason);
    expect(json(audit[2]!.after)).toMatchObject({ version: 2, supersedes: v1.id });
  });
});

describe('GET /api/reports', () => {
  it('lists signed versions newest first, paged, with the fields a list needs', async () => {
    const a = await built('settled');
    const b = await built('settled');
    const first = await signed(vet, a.collectionId);
    const second = await signed(vet, b.collectionId);
    const r = await manager.json('/api/reports?pageSize=5');
    expect(r.status).toBe(200);
    expect(r.body.rows.length).toBeLessThanOrEqual(5);
    expect(r.body.total).toBeGreaterThanOrEqual(2);
    expect(r.body.rows.slice(0, 2).map((x: { id: number }) => x.id)).toEqual([second.id, first.id]);
    const item = r.body.rows[0];
    for (const key of ['id', 'collectionId', 'stallionName', 'collectedAt', 'version', 'status', 'signedBy', 'signedAt', 'verificationCode']) expect(item).toHaveProperty(key);
    expect(item).toMatchObject({ collectionId: b.collectionId, version: 1, status: 'current', signedBy: 'Dr Maren Kettleby', verificationCode: second.verificationCode, collectedAt: '2026-05-26T07:40:00.000Z' });
    const signedAts = r.body.rows.map((x: { signedAt: string }) => x.signedAt);
    expect([...signedAts].sort().reverse()).toEqual(signedAts);
    const page2 = await manager.json('/api/reports?pageSize=5&page=2');
    expect(page2.body.rows.map((x: { id: number }) => x.id)).not.toContain(second.id);
    expect((await manager.json('/api/reports?pageSize=500')).status).toBe(422);
  });
});
