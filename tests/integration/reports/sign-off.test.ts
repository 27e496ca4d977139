import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { isCanonicalVerificationCode } from '@/lib/reports/verification';
import { closeTestDb, testDb } from '../support/db';
import { randomLoopback, Session, signedIn, USERS } from '../support/http';
import { built, json, pdfStored, sign, signed } from './support';

// Sign-off: a veterinarian only, with the password re-entered; refused while the report is not ready.
afterAll(closeTestDb);

let vet: Session;
let tech: Session;
let manager: Session;
let owner: Session;
beforeAll(async () => {
  [vet, tech, manager, owner] = await Promise.all([signedIn(USERS.vet), signedIn(USERS.tech), signedIn(USERS.manager), signedIn(USERS.owner)]);
});

describe('the draft of a collection’s report', () => {
  it('is previewed by the staff with every section, and refused to a client', async () => {
    const c = await built('settled');
    for (const s of [vet, tech, manager]) {
      const r = await s.json(`/api/collections/${c.collectionId}/report`);
      expect(r.status).toBe(200);
      expect(r.body.state).toBe('draft');
      expect(r.body.readiness).toEqual({ ready: true, reasons: [] });
      expect(r.body.draft.basis).toBe('settled');
      // 81 of 263 sperm cells normal (lib/reports/fixture.ts, Newcombe 1998's worked example).
      expect(r.body.draft.morphology).toMatchObject({ cellsCounted: 263, normalCount: 81, source: 'settled' });
      expect(r.body.draft.agreement).toMatchObject({ pairs: 263, onlyFirst: 0, onlySecond: 0 });
      expect(r.body.draft.people).toMatchObject({ readBy: { name: 'Tamsin Reedway' }, checkedBy: { name: 'Orrin Halvard' }, signedBy: null });
    }
    expect((await owner.json(`/api/collections/${c.collectionId}/report`)).status).toBe(403);
    expect((await new Session().json(`/api/collections/${c.collectionId}/report`)).status).toBe(401);
  });
});

describe('sign-off', () => {
  it('is the veterinarian’s only: 403 for every other role, 401 without a session', async () => {
    const c = await built('settled');
    for (const s of [tech, manager, owner]) expect((await sign(s, c.collectionId)).status).toBe(403);
    expect((await sign(new Session(), c.collectionId)).status).toBe(401);
    expect(await testDb()('report_versions').where({ collection_id: c.collectionId }).first()).toBeUndefined();
  });

  it('refuses a wrong password with 401, signs nothing, and audits the attempt without the password', async () => {
    const c = await built('settled');
    const wrong = 'not-the-vets-password-7f3a';
    const r = await sign(vet, c.collectionId, { password: wrong });
    expect(r.status).toBe(401);
    expect(r.body.error.code).toBe('wrong_password');
    expect(await testDb()('report_versions').where({ collection_id: c.collectionId }).first()).toBeUndefined();
    expect((await testDb()('collections').where({ id: c.collectionId }).first('signed_report_id')).signed_report_id).toBeNull();
    const audit = await testDb()('audit_log').where({ action: 'sign_off_refused', entity: 'collection', entity_id: String(c.collectionId) }).first();
    expect(audit).toBeTruthy();
    expect(JSON.stringify(audit)).not.toContain(wrong);
    expect(json(audit.after)).toMatchObject({ reason: 'wrong_password' });
    // The vet is still signed in: the 401 is about the password, not the session.
    expect((await vet.json('/api/auth/session')).body.user.email).toBe(USERS.vet);
  });

  it('counts password attempts like sign-in: after five wrong ones from one address it waits (429), even for the right one', async () => {
    const c = await built('settled');
    const from = randomLoopback();
    const here = await signedIn(USERS.vet, { from });
    for (let i = 0; i < 5; i++) expect((await sign(here, c.collectionId, { password: `wrong-${i}` })).status).toBe(401);
    const limited = await sign(here, c.collectionId);
    expect(limited.status).toBe(429);
    expect(limited.body.error.message).toMatch(/Wait \d+ s/);
    expect(await testDb()('report_versions').where({ collection_id: c.collectionId }).first()).toBeUndefined();
    // Another address is not held up.
    expect((await sign(vet, c.collectionId)).status).toBe(201);
  });

  it('is 422 without a password', async () => {
    const c = await built('settled');
    expect((await vet.json(`/api/collections/${c.collectionId}/report/sign`, 'POST', {})).status).toBe(422);
  });

  it('is refused with 409 and every reason while a read is open, the second read is missing or disagreements are unsettled', async () => {
    const cases = [
      ['first-open', ['read_open', 'no_read']],
      ['first-only', ['second_read_missing']],
      ['second-open', ['read_open', 'second_read_missing']],
      ['unsettled', ['disagreements_unsettled']],
    ] as const;
    for (const [state, codes] of cases) {
      const c = await built(state);
      const r = await sign(vet, c.collectionId);
      expect(r.status, state).toBe(409);
      expect(r.body.error.code).toBe('not_ready');
      expect(r.body.error.issues.map((i: { path: string }) => i.path)).toEqual(codes);
      expect((await vet.json(`/api/collections/${c.collectionId}/report`)).body.readiness.reasons.map((x: { code: string }) => x.code)).toEqual(codes);
      expect(await testDb()('report_versions').where({ collection_id: c.collectionId }).first()).toBeUndefined();
    }
  });

  it('freezes the report, locks the collection, queues the PDF and audits the signing', async () => {
    const c = await built('settled');
    const report = await signed(vet, c.collectionId, { remarks: 'Droplets as expected.', interpretation: 'Re-evaluate in ten weeks.' });
    expect(report.version).toBe(1);
    expect(isCanonicalVerificationCode(report.verificationCode)).toBe(true);
    expect(report.snapshot).toMatchObject({
      morphology: { source: 'settled', cellsCounted: 263, normalCount: 81 },
      veterinarian: { remarks: 'Droplets as expected.', interpretation: 'Re-evaluate in ten weeks.' },
      people: { signedBy: { name: 'Dr Maren Kettleby' }, readBy: { name: 'Tamsin Reedway' }, checkedBy: { name: 'Orrin Halvard' } },
      report: { version: 1, supersedes: null, supersededBy: null },
    });
    expect((await testDb()('collections').where({ id: c.collectionId }).first('signed_report_id')).signed_report_id).toBe(report.id);
    const state = await vet.json(`/api/collections/${c.collectionId}/report`);
    expect(state.body.state).toBe('signed');
    expect(state.body.readiness.reasons.map((x: { code: string }) => x.code)).toEqual(['already_signed']);
    expect((await sign(vet, c.collectionId)).status).toBe(409);
    const audit = await testDb()('audit_log').where({ action: 'sign', entity: 'report', entity_id: String(report.id) }).first();
    expect(json(audit.after)).toMatchObject({ collectionId: c.collectionId, version: 1, verificationCode: report.verificationCode });
    const pdf = await pdfStored(vet, report.id);
    expect(pdf.sha256).toMatch(/^[0-9a-f]{64}$/);
  });

  it('signs a single read where the lab allows reports without a second read, and says so', async () => {
    const original = (await manager.json('/api/settings')).body.settings;
    try {
      expect((await manager.json('/api/settings', 'PUT', { ...original, secondReadRequired: false })).status).toBe(200);
      const c = await built('first-only');
      const report = await signed(vet, c.collectionId);
      expect(report.snapshot.morphology.source).toBe('single');
      expect(report.snapshot.agreement).toBeNull();
      expect(report.snapshot.settings.secondReadRequired).toBe(false);
      expect(report.snapshot.people.checkedBy).toBeNull();
    } finally {
      await manager.json('/api/settings', 'PUT', original);
    }
  });
});
