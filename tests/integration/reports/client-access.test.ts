import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_CLIENT_USER_EMAIL } from '@/lib/demo/scenario';
import { closeTestDb, testDb } from '../support/db';
import { Session, signedIn, USERS } from '../support/http';
import { built, pdfBytes, pdfStored, sha256, signed } from './support';

// A client sees the signed reports of their own stallions — current and superseded versions, and
// their PDFs — and nothing of other owners, and no draft, by any route.
afterAll(closeTestDb);

let vet: Session;
let owner: Session;
let own: { reportId: number; collectionId: number; stallionId: number; sha: string };
let other: { reportId: number; collectionId: number; stallionId: number; ownerName: string; code: string };
let draft: { collectionId: number };

beforeAll(async () => {
  [vet, owner] = await Promise.all([signedIn(USERS.vet), signedIn(USERS.owner)]);
  const clientId = (await testDb()('users').where({ email: DEMO_CLIENT_USER_EMAIL }).first('client_id')).client_id;
  const stallion = await testDb()('stallions').where({ client_id: clientId }).orderBy('id', 'desc').first('id');
  const mine = await built('settled', { stallionId: stallion.id, collectedAt: new Date('2026-07-30T08:00:00Z') });
  const v = await signed(vet, mine.collectionId);
  own = { reportId: v.id, collectionId: mine.collectionId, stallionId: stallion.id, sha: (await pdfStored(vet, v.id)).sha256 };
  const theirs = await built('settled');
  const t = await signed(vet, theirs.collectionId);
  await pdfStored(vet, t.id);
  const ownerName = (await testDb()('clients').where({ id: theirs.clientId }).first('name')).name;
  other = { reportId: t.id, collectionId: theirs.collectionId, stallionId: theirs.stallionId, ownerName, code: t.verificationCode };
  draft = { collectionId: (await built('settled', { stallionId: stallion.id, collectedAt: new Date('2026-07-31T08:00:00Z') })).collectionId };
}, 120_000);

describe('a client', () => {
  it('lists only the signed reports of their own stallions', async () => {
    const r = await owner.json('/api/reports?pageSize=100');
    expect(r.status).toBe(200);
    const ids = r.body.rows.map((x: { id: number }) => x.id);
    expect(ids).toContain(own.reportId);
    expect(ids).not.toContain(other.reportId);
    const clientId = (await testDb()('users').where({ email: DEMO_CLIENT_USER_EMAIL }).first('client_id')).client_id;
    const owners = await testDb()('report_versions as v').join('collections as k', 'k.id', 'v.collection_id').join('stallions as s', 's.id', 'k.stallion_id').whereIn('v.id', ids).pluck('s.client_id');
    expect(new Set(owners)).toEqual(new Set([clientId]));
    expect((await owner.json(`/api/reports?stallionId=${other.stallionId}`)).body.rows).toEqual([]);
    // No draft is a report: the unsigned collection of their own stallion is not listed.
    expect(r.body.rows.map((x: { collectionId: number }) => x.collectionId)).not.toContain(draft.collectionId);
  });

  it('opens their own report and downloads its PDF as stored', async () => {
    const r = await owner.json(`/api/reports/${own.reportId}`);
    expect(r.status).toBe(200);
    expect(r.body.report).toMatchObject({ id: own.reportId, status: 'current', sendings: [], ownerEmail: null });
    const pdf = await pdfBytes(owner, own.reportId);
    expect(pdf.status).toBe(200);
    expect(sha256(pdf.bytes)).toBe(own.sha);
    const page = await owner.fetch(`/portal/reports/${own.reportId}`);
    expect(page.status).toBe(200);
    expect(await page.text()).toContain('Download the signed PDF');
  });

  it('reaches neither another owner’s report nor any draft, by any route', async () => {
    const refusals: [string, Promise<Response>][] = [
      [`/api/reports/${other.reportId}`, owner.fetch(`/api/reports/${other.reportId}`)],
      [`/api/reports/${other.reportId}/pdf`, owner.fetch(`/api/reports/${other.reportId}/pdf`)],
      [`/api/collections/${draft.collectionId}/report`, owner.fetch(`/api/collections/${draft.collectionId}/report`)],
      [`/api/collections/${own.collectionId}/report`, owner.fetch(`/api/collections/${own.collectionId}/report`)],
      [`/api/collections/${draft.collectionId}`, owner.fetch(`/api/collections/${draft.collectionId}`)],
      [`/api/collections/${draft.collectionId}/morphology`, owner.fetch(`/api/collections/${draft.collectionId}/morphology`)],
      [`/api/stallions/${other.stallionId}`, owner.fetch(`/api/stallions/${other.stallionId}`)],
      [`/portal/reports/${other.reportId}`, owner.fetch(`/portal/reports/${other.reportId}`)],
      [`/portal/stallions/${other.stallionId}`, owner.fetch(`/portal/stallions/${other.stallionId}`)],
      [`/reports/${own.reportId}`, owner.fetch(`/reports/${own.reportId}`)],
      [`/collections/${draft.collectionId}/report`, owner.fetch(`/collections/${draft.collectionId}/report`)],
    ];
    for (const [path, p] of refusals) {
      const res = await p;
      const body = await res.text();
      // A route answers 403 or 404; a page sends a wrong role to /no-access, and shows another owner's
      // record as not found (streamed pages answer 200 with the not-found page).
      const notFoundPage = res.status === 200 && path.startsWith('/portal/') && body.includes('not-found-heading');
      const ok = [403, 404].includes(res.status) || (res.status === 307 && res.headers.get('location')?.includes('/no-access')) || notFoundPage;
      expect(ok, `${path}: ${res.status}`).toBe(true);
      // Nothing of the other owner's report leaks into the answer.
      expect(body, path).not.toContain(other.ownerName);
      expect(body, path).not.toContain(other.code);
    }
    for (const [method, path, body] of [
      ['POST', `/api/reports/${own.reportId}/send`, { to: ['x@quillfield.example'] }],
      ['POST', `/api/reports/${own.reportId}/amend`, { reason: 'I would like it changed.' }],
      ['POST', `/api/reports/${own.reportId}/pdf`, undefined],
      ['POST', `/api/collections/${draft.collectionId}/report/sign`, { password: 'quillfield-demo' }],
      ['PUT', `/api/collections/${draft.collectionId}/report`, { remarks: null, interpretation: null }],
    ] as const) {
      expect((await owner.json(path, method, body)).status, path).toBe(403);
    }
  });

  it('sees superseded versions of their own reports, marked as such', async () => {
    await vet.json(`/api/reports/${own.reportId}/amend`, 'POST', { reason: 'Remarks completed.' });
    const v2 = await signed(vet, own.collectionId);
    const list = await owner.json(`/api/reports?stallionId=${own.stallionId}&pageSize=100`);
    const mine = list.body.rows.filter((x: { collectionId: number }) => x.collectionId === own.collectionId);
    expect(mine.map((x: { version: number; status: string }) => [x.version, x.status])).toEqual([[2, 'current'], [1, 'superseded']]);
    const old = await owner.json(`/api/reports/${own.reportId}`);
    expect(old.body.report.supersededBy).toMatchObject({ version: 2, reason: 'Remarks completed.' });
    expect((await owner.json(`/api/reports?status=latest&stallionId=${own.stallionId}&pageSize=100`)).body.rows.map((x: { id: number }) => x.id)).toContain(v2.id);
    const page = await (await owner.fetch(`/portal/reports/${own.reportId}`)).text();
    expect(page).toContain('Superseded by version 2');
  });
});
