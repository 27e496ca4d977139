import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeTestDb } from '../support/db';
import { randomLoopback, Session, signedIn, USERS } from '../support/http';
import { built, pdfStored, signed } from './support';

// /verify/{code}: public, rate-limited, and it shows only the stallion's name, the collection date,
// the version, who signed and when, current or superseded, and the PDF's checksum.
afterAll(closeTestDb);

let vet: Session;
beforeAll(async () => {
  vet = await signedIn(USERS.vet);
});

/** The page's visible text (tags, scripts and the RSC payload left out). */
async function verifyPage(code: string, from = randomLoopback()) {
  const s = new Session({ from });
  const res = await s.fetch(`/verify/${encodeURIComponent(code)}`);
  const html = await res.text();
  const visible = html.replace(/<script[\s\S]*?<\/script>/g, ' ').replace(/<[^>]+>/g, ' ').replace(/&#x27;|&#39;/g, "'").replace(/&amp;/g, '&').replace(/\s+/g, ' ');
  return { status: res.status, html, visible };
}

describe('the verification page', () => {
  it('shows the listed facts of a signed report to anyone without signing in, and nothing else', async () => {
    const c = await built('settled', { name: `Verify Check ${Date.now().toString(36)}` });
    const report = await signed(vet, c.collectionId, { remarks: 'Private remark 7Q2', interpretation: 'Private interpretation 9X4' });
    const pdf = await pdfStored(vet, report.id);
    const page = await verifyPage(report.verificationCode);
    expect(page.status).toBe(200);
    const v = page.visible;
    expect(v).toContain('Genuine signed report');
    expect(v).toContain(report.snapshot.stallion.name);
    expect(v).toContain('26 May 2026');
    expect(v).toMatch(/Version 1 /);
    expect(v).toContain('Signed by Dr Maren Kettleby');
    expect(v).toMatch(/Signed on \d{2} \w{3} \d{4}, \d{2}:\d{2}/);
    expect(v).toContain('Current: this is the latest signed version.');
    expect(v).toContain(pdf.sha256);
    // Nothing else, in the visible text or anywhere in what was sent.
    for (const secret of [
      report.snapshot.stallion.registration, report.snapshot.stallion.owner.name, 'Private remark 7Q2', 'Private interpretation 9X4', 'Warmblood',
      '30.8', 'PMMN', 'Tamsin Reedway', 'Orrin Halvard', 'Quillfield Equine Reproduction Centre', 'Report test collection', '6.27',
    ]) {
      expect(page.html, secret).not.toContain(secret);
    }
  });

  it('reads a code as people type it, says when it has a typo, and when no report has it', async () => {
    const c = await built('settled');
    const report = await signed(vet, c.collectionId);
    const typed = report.verificationCode.toLowerCase().replace(/-/g, ' ');
    expect((await verifyPage(typed)).visible).toContain('Genuine signed report');
    const last = report.verificationCode.slice(-1);
    const typo = report.verificationCode.slice(0, -1) + (last === '0' ? '1' : '0');
    expect((await verifyPage(typo)).visible).toContain('typing mistake');
    expect((await verifyPage('ABC')).visible).toContain('five groups of four');
    // A well-formed code that no report carries (the first code of a different seed, check symbol right).
    const { newVerificationCode } = await import('@/lib/reports/verification');
    expect((await verifyPage(newVerificationCode())).visible).toContain('No report has this code');
  });

  it('says "superseded" for an old code once the amended report is signed again, and "current" for the new one', async () => {
    const c = await built('settled');
    const v1 = await signed(vet, c.collectionId);
    await vet.json(`/api/reports/${v1.id}/amend`, 'POST', { reason: 'Corrected volume.' });
    expect((await verifyPage(v1.verificationCode)).visible).toContain('Not current: withdrawn for amendment');
    const v2 = await signed(vet, c.collectionId);
    expect((await verifyPage(v1.verificationCode)).visible).toContain('Superseded by version 2');
    const now = await verifyPage(v2.verificationCode);
    expect(now.visible).toContain('Current: this is the latest signed version.');
    expect(now.visible).toMatch(/Version 2 /);
  });

  it('is rate-limited per address: 30 look-ups in 10 minutes', async () => {
    const c = await built('settled');
    const report = await signed(vet, c.collectionId);
    const from = randomLoopback();
    for (let i = 0; i < 30; i++) expect((await verifyPage(report.verificationCode, from)).visible).toContain('Genuine signed report');
    const limited = await verifyPage(report.verificationCode, from);
    expect(limited.visible).toContain('Too many checks');
    expect(limited.html).not.toContain(report.snapshot.stallion.name);
    // Another address still gets its answer.
    expect((await verifyPage(report.verificationCode)).visible).toContain('Genuine signed report');
  });
});
