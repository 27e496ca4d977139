import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { simpleParser } from 'mailparser';
import nodemailer from 'nodemailer';
import { SMTPServer } from 'smtp-server';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sendReport } from '@/db/queries/report-sendings';
import { ApiError } from '@/lib/api/errors';
import { newVerificationCode } from '@/lib/reports/verification';
import { closeTestDb, testDb } from '../support/db';
import { Session, signedIn, USERS } from '../support/http';
import { waitForMail } from '../support/mail';
import { built, json, pdfBytes, pdfStored, sha256, signed } from './support';

// The signed PDF as stored, its text, and sending it: to the local mail sink through the app, and to
// a relay that refuses (an SMTP server of the test's own).
afterAll(closeTestDb);

let vet: Session;
let tech: Session;
let manager: Session;
let owner: Session;
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'fieldmark-report-'));
beforeAll(async () => {
  [vet, tech, manager, owner] = await Promise.all([signedIn(USERS.vet), signedIn(USERS.tech), signedIn(USERS.manager), signedIn(USERS.owner)]);
});
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

const squash = (t: string) => t.replace(/[ \t]+/g, ' ');
const tag = () => `${Date.now().toString(36)}${Math.random().toString(36).slice(2, 6)}`;

describe('the signed PDF', () => {
  it('is downloaded byte for byte as stored, with its checksum, and carries the right numbers for the constructed collection', async () => {
    const c = await built('settled', { name: `Pdf Check ${tag()}` });
    const report = await signed(vet, c.collectionId, { remarks: 'Remarks for the PDF check.', interpretation: 'Interpretation for the PDF check.' });
    const stored = await pdfStored(vet, report.id);
    const got = await pdfBytes(vet, report.id);
    expect(got.status).toBe(200);
    expect(got.headers.get('content-type')).toBe('application/pdf');
    expect(got.headers.get('content-disposition')).toMatch(/attachment; filename="Pdf Check .* 2026-05-26 report v1\.pdf"/);
    expect(got.headers.get('repr-digest')).toBe(`sha-256=:${Buffer.from(stored.sha256, 'hex').toString('base64')}:`);
    expect(sha256(got.bytes)).toBe(stored.sha256);
    const row = await testDb()('report_versions').where({ id: report.id }).first('pdf_sha256', 'pdf_bytes');
    expect([row.pdf_sha256, row.pdf_bytes]).toEqual([stored.sha256, got.bytes.length]);
    // The same again: stored once, never rendered again.
    expect(sha256((await pdfBytes(vet, report.id)).bytes)).toBe(stored.sha256);

    const file = path.join(dir, 'report.pdf');
    fs.writeFileSync(file, got.bytes);
    const text = squash(execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' }));
    const raw = execFileSync('pdftotext', ['-raw', file, '-'], { encoding: 'utf8' }).replace(/\s+/g, ' ');
    // 81 normal of 263 sperm cells: 30.8 %, Wilson 95 % interval 25.5–36.6 % (Newcombe 1998, Stat Med 17:857–872, method 3).
    expect(text).toContain('30.8 %');
    expect(text).toContain('95 % interval 25.5–36.6 % (Wilson)');
    expect(text).toMatch(/182 of 263 cells/);
    expect(text).toMatch(/target 200 — reached/);
    // 38 mL × 165 × 10^6/mL = 6.27 × 10^9 total (Kavak et al. 2003's total = volume × concentration; computed);
    // × 45 % progressive = 2.82; × 30.8 % normal = 0.87 PMMN; doses at 0.5, 1 and 0.8 × 10^9 → 5, 2 and 7 (computed).
    expect(raw).toContain('Total sperm 6.27 × 10 9');
    expect(raw).toContain('Progressively motile sperm (PMS) 2.82 × 10 9');
    expect(raw).toMatch(/normal \(PMMN\) 0\.87 × 10 9/);
    expect(text).toMatch(/Fresh 0\.50 × 10 ?9? progressively motile sperm 5/);
    expect(text).toMatch(/Cooled-shipped 1\.00 × 10 ?9? progressively motile sperm 2/);
    expect(text).toMatch(/Frozen 0\.80 × 10 ?9? total sperm 7/);
    // Class counts of the settled read (lib/reports/fixture.ts), with % = count / 263 (computed).
    expect(text).toMatch(/Proximal cytoplasmic droplet Cytoplasmic droplet 41 15\.6 %/);
    expect(text).toMatch(/Bent or coiled tail Tail 28 10\.6 %/);
    // Agreement: the first read differs from the second on 6 of 263 paired cells: 257 / 263 = 97.7 % (computed).
    // (pdftotext may split a figure at a kerned glyph: "97 .7".)
    expect(raw).toMatch(/97 ?\.7 % of 263 paired cells/);
    expect(raw).toContain('From the settled read');
    expect(raw).toContain(report.verificationCode);
    expect(raw).toContain('Interpretation for the PDF check.');
    expect(raw).toContain('Tamsin Reedway');
    expect(raw).toContain('Dr Maren Kettleby');
  });

  it('is 409 while it is not made, and a failed render is shown with its reason and can be retried', async () => {
    const c = await built('settled');
    const model = await signed(vet, (await built('settled')).collectionId);
    // A signed version whose render failed for good (made as a row, so no worker got to it first).
    const code = newVerificationCode();
    const snapshot = { ...model.snapshot, report: { ...model.snapshot.report, verificationCode: code } };
    const vetId = (await testDb()('users').where({ email: USERS.vet }).first('id')).id;
    const [id] = await testDb()('report_versions').insert({ collection_id: c.collectionId, version: 1, snapshot: JSON.stringify(snapshot), verification_code: code, signed_by: vetId, signed_at: new Date() });
    await testDb()('report_pdf_jobs').insert({ report_id: id, status: 'failed', attempts: 4, error: 'The PDF could not be rendered: out of memory' });
    const r = await vet.json(`/api/reports/${id}`);
    expect(r.body.report.pdf).toEqual({ status: 'failed', attempts: 4, error: 'The PDF could not be rendered: out of memory' });
    const refused = await pdfBytes(vet, id);
    expect(refused.status).toBe(409);
    expect(JSON.parse(refused.bytes.toString()).error.code).toBe('pdf_failed');
    expect((await tech.json(`/api/reports/${id}/pdf`, 'POST')).status).toBe(403);
    const retry = await manager.json(`/api/reports/${id}/pdf`, 'POST');
    expect(retry.status).toBe(200);
    expect(retry.body.pdf.status).toBe('preparing');
    const stored = await pdfStored(vet, id);
    expect(sha256((await pdfBytes(vet, id)).bytes)).toBe(stored.sha256);
    // Stored once: a retry of a stored PDF is refused.
    expect((await manager.json(`/api/reports/${id}/pdf`, 'POST')).status).toBe(409);
  });
});

describe('sending a signed report', () => {
  it('e-mails the owner and an address typed in, the PDF attached as stored, and records each sending', async () => {
    const ownerEmail = `owner-${tag()}@quillfield.example`;
    const other = `referring-${tag()}@pennacott-vets.example`;
    const c = await built('settled', { clientEmail: ownerEmail });
    const report = await signed(vet, c.collectionId);
    const stored = await pdfStored(vet, report.id);
    for (const s of [tech, owner]) expect((await s.json(`/api/reports/${report.id}/send`, 'POST', { to: [other] })).status).toBe(403);
    expect((await vet.json(`/api/reports/${report.id}/send`, 'POST', { to: ['not an address'] })).status).toBe(422);
    const r = await vet.json(`/api/reports/${report.id}/send`, 'POST', { includeOwner: true, to: [other], message: 'With our compliments.' });
    expect(r.status, JSON.stringify(r.body)).toBe(201);
    expect(r.body.sendings.map((x: { recipient: string; status: string }) => [x.recipient, x.status]).sort()).toEqual([[other, 'sent'], [ownerEmail, 'sent']].sort());
    for (const s of r.body.sendings) expect(s.relayResponse).toMatch(/^250/);

    for (const to of [ownerEmail, other]) {
      const mail = await waitForMail(to);
      const source = await fetch(`${process.env.MAIL_WEB_URL ?? 'http://127.0.0.1:1090'}/api/email/${mail.id}/source`);
      const parsed = await simpleParser(Buffer.from(await source.arrayBuffer()));
      expect(parsed.subject).toMatch(/^Semen evaluation and morphology report: Report Test .* \(version 1\)$/);
      expect(parsed.text).toContain(report.verificationCode);
      expect(parsed.text).toContain('With our compliments.');
      expect(parsed.html).toContain(`/verify/${report.verificationCode}`);
      expect(parsed.attachments).toHaveLength(1);
      const pdf = parsed.attachments[0]!;
      expect(pdf.contentType).toBe('application/pdf');
      expect(pdf.filename).toMatch(/ 2026-05-26 report v1\.pdf$/);
      expect(sha256(pdf.content)).toBe(stored.sha256);
    }
    const rows = await testDb()('report_sendings').where({ report_id: report.id }).select('recipient', 'status', 'note');
    expect(rows.map((x) => x.status)).toEqual(['sent', 'sent']);
    expect(rows[0]!.note).toBe('With our compliments.');
    const audit = await testDb()('audit_log').where({ action: 'send', entity: 'report', entity_id: String(report.id) }).first();
    expect(json(audit.after).results).toHaveLength(2);
    // The report page shows them.
    expect((await vet.json(`/api/reports/${report.id}`)).body.report.sendings).toHaveLength(2);
    expect((await owner.json(`/api/reports/${report.id}`)).status).toBe(404);
  });

  it('refuses a superseded version and a report without any address', async () => {
    const c = await built('settled', { clientEmail: null });
    const v1 = await signed(vet, c.collectionId);
    await pdfStored(vet, v1.id);
    const none = await vet.json(`/api/reports/${v1.id}/send`, 'POST', { includeOwner: true, to: [] });
    expect(none.status).toBe(422);
    expect(none.body.error.message).toMatch(/no e-mail address on record/);
    await vet.json(`/api/reports/${v1.id}/amend`, 'POST', { reason: 'A new version follows.' });
    expect((await vet.json(`/api/reports/${v1.id}/send`, 'POST', { to: ['someone@quillfield.example'] })).status).toBe(409);
    await signed(vet, c.collectionId);
    const superseded = await vet.json(`/api/reports/${v1.id}/send`, 'POST', { to: ['someone@quillfield.example'] });
    expect(superseded.status).toBe(409);
    expect(superseded.body.error.message).toMatch(/superseded; send version 2/);
  });

  it('records a refusing relay’s answer as “not sent”, and says so', async () => {
    const refusing = new SMTPServer({
      disabledCommands: ['STARTTLS', 'AUTH'],
      onRcptTo(address, _session, cb) {
        const err = Object.assign(new Error(`Mailbox ${address.address} unavailable`), { responseCode: 550 });
        cb(err);
      },
    });
    await new Promise<void>((resolve) => refusing.listen(0, '127.0.0.1', resolve));
    const port = (refusing.server.address() as { port: number }).port;
    const transport = nodemailer.createTransport({ host: '127.0.0.1', port, secure: false, ignoreTLS: true });
    try {
      const c = await built('settled');
      const report = await signed(vet, c.collectionId);
      await pdfStored(vet, report.id);
      const vetUser = await testDb()('users').where({ email: USERS.vet }).first('id', 'name', 'email', 'role', 'client_id');
      const actor = { id: vetUser.id, name: vetUser.name, email: vetUser.email, role: vetUser.role, clientId: null };
      const to = `nobody-${tag()}@quillfield.example`;
      const err = await sendReport(actor, report.id, { includeOwner: false, to: [to], message: null }, { transport }).then(() => null, (e: unknown) => e);
      expect(err).toBeInstanceOf(ApiError);
      expect((err as ApiError).status).toBe(502);
      expect((err as ApiError).message).toMatch(new RegExp(`Not sent to ${to.replace(/[.]/g, '\\.')} \\(the relay answered: 550`));
      const rows = await testDb()('report_sendings').where({ report_id: report.id }).select('recipient', 'status', 'relay_response', 'message_id');
      expect(rows).toHaveLength(1);
      expect(rows[0]).toMatchObject({ recipient: to, status: 'failed', message_id: null });
      expect(rows[0]!.relay_response).toMatch(/^550 .*unavailable/);
      const shown = (await vet.json(`/api/reports/${report.id}`)).body.report.sendings;
      expect(shown).toEqual([expect.objectContaining({ recipient: to, status: 'failed' })]);
    } finally {
      transport.close();
      await new Promise<void>((resolve) => refusing.close(() => resolve()));
    }
  });
});
