import { simpleParser } from 'mailparser';
import MailComposer from 'nodemailer/lib/mail-composer';
import { describe, expect, it } from 'vitest';
import { asciiFilename, composeReportEmail, reportPdfFilename, safeFilenamePart } from '@/lib/reports/email';
import { exampleReportSnapshot } from '@/lib/reports/fixture';
import { markSuperseded } from '@/lib/reports/snapshot';

const APP = 'https://reports.quillfield.example';
const pdf = Buffer.from('%PDF-1.3 stand-in for the signed report\n');

/** The message as nodemailer would send it, read back by mailparser. */
async function throughTheWire(mail: ReturnType<typeof composeReportEmail>) {
  const raw = await new MailComposer({ from: 'lab@quillfield.example', to: 'owner@quillfield.example', ...mail }).compile().build();
  return { raw: raw.toString('utf8'), parsed: await simpleParser(raw) };
}

describe('the report e-mail', () => {
  const s = exampleReportSnapshot();
  const mail = composeReportEmail({ snapshot: s, pdf, appUrl: APP });
  const url = `${APP}/verify/${s.report.verificationCode}`;

  it('names the stallion, the collection day and the version in the subject', () => {
    expect(mail.subject).toBe('Semen evaluation and morphology report: Thistlewick Lantern, collected 26 May 2026 (version 2)');
  });

  it('says in both bodies that the attached PDF is the signed report, with the link, code and cautions', () => {
    for (const body of [mail.text, mail.html]) {
      expect(body).toContain('The attached PDF is the signed report');
      expect(body).toContain(s.report.verificationCode);
      expect(body).toContain(url);
      expect(body).toContain('Version 2 — supersedes version 1: Interpretation completed after the follow-up examination on 29 May.');
      expect(body).toMatch(/never replace, a veterinarian’s judgement/);
      expect(body).toMatch(/local regulations and licensed veterinary practice/);
      expect(body).toContain('30.8 % normal (95 % interval 25.5–36.6 %) of 263 sperm cells');
      expect(body).toContain('PMMN 0.87 × 10⁹');
      expect(body).toContain('Signed by Dr Maren Kettleby on 29 May 2026, 15:05 BST');
    }
    expect(mail.html).toContain(`<a href="${url}">`);
  });

  it('attaches the PDF byte for byte', async () => {
    expect(mail.attachments).toHaveLength(1);
    expect(mail.attachments[0]).toMatchObject({ filename: 'Thistlewick Lantern 2026-05-26 report v2.pdf', contentType: 'application/pdf' });
    const { parsed } = await throughTheWire(mail);
    expect(parsed.attachments).toHaveLength(1);
    expect(parsed.attachments[0]!.content.equals(pdf)).toBe(true);
    expect(parsed.attachments[0]!.filename).toBe('Thistlewick Lantern 2026-05-26 report v2.pdf');
    expect(parsed.subject).toBe(mail.subject);
  });

  it('says when the report has been superseded', () => {
    const old = markSuperseded(exampleReportSnapshot({ version: 1 }), { version: 2, reason: 'Interpretation completed.', by: 'Dr Maren Kettleby', at: '2026-05-29T13:50:00.000Z' });
    const m = composeReportEmail({ snapshot: old, pdf, appUrl: APP });
    expect(m.text).toContain('Superseded by version 2: Interpretation completed.');
    expect(m.subject).toMatch(/\(version 1\)$/);
  });

  it('escapes what people typed, in the HTML only', () => {
    const nasty = exampleReportSnapshot({
      patch: (i) => {
        i.stallion.name = 'Hob & <b>Nob</b> "Jr"';
        i.lab.name = "O'Quill <Lab>";
      },
    });
    const m = composeReportEmail({ snapshot: nasty, pdf, appUrl: APP, message: 'Dear Corwen,\n<script>alert(1)</script>' });
    expect(m.html).toContain('Hob &amp; &lt;b&gt;Nob&lt;/b&gt; &quot;Jr&quot;');
    expect(m.html).toContain('O&#39;Quill &lt;Lab&gt;');
    expect(m.html).not.toContain('<script>');
    expect(m.html).toContain('&lt;script&gt;');
    expect(m.text).toContain('Hob & <b>Nob</b> "Jr"');
    expect(m.text.startsWith('Dear Corwen,\n<script>')).toBe(true);
  });
});

describe('attachment file names', () => {
  it('keep a name in any script and lose only what file systems refuse', () => {
    expect(safeFilenamePart('Ødegård Łukasz Δέλτα Жук 雷')).toBe('Ødegård Łukasz Δέλτα Жук 雷');
    expect(safeFilenamePart('A/B: C? *D* "E" <F> | G\\H')).toBe('A_B_ C_ _D_ _E_ _F_ _ G_H');
    expect(safeFilenamePart('  ..hidden.  ')).toBe('hidden');
    expect(safeFilenamePart('tab\tand\nnewline')).toBe('tab_and_newline');
    expect(safeFilenamePart('\u202Efdp.exe')).toBe('_fdp.exe'); // right-to-left override
    expect(safeFilenamePart('')).toBe('report');
    // Composed and decomposed forms give the same name (NFC).
    expect(safeFilenamePart('Cafe\u0301')).toBe('Café');
  });

  it('cut long names at 80 characters, never inside a character', () => {
    const long = '🐴'.repeat(100);
    const cut = safeFilenamePart(long);
    expect([...cut]).toHaveLength(80);
    expect(cut).toBe('🐴'.repeat(80));
  });

  it('use the lab’s day of the collection', () => {
    // 23:30 UTC on 31 May is already 1 June in New Zealand.
    const late = exampleReportSnapshot({
      patch: (i) => {
        i.collection.collectedAt = '2026-05-31T23:30:00.000Z';
        i.settings.timeZone = 'Pacific/Auckland';
        i.breedingSoundness = null;
        i.healthEvents = [];
      },
    });
    expect(reportPdfFilename(late)).toBe('Thistlewick Lantern 2026-06-01 report v2.pdf');
  });

  it('travel through nodemailer and mailparser with non-Latin letters intact', async () => {
    const s = exampleReportSnapshot({ patch: (i) => (i.stallion.name = 'Ørnulf Łyżwa Жук') });
    const mail = composeReportEmail({ snapshot: s, pdf, appUrl: APP });
    const { raw, parsed } = await throughTheWire(mail);
    // nodemailer writes the non-ASCII name with RFC 2231 parameter encoding.
    expect(raw).toMatch(/filename\*(0\*)?=utf-8''/i);
    expect(parsed.attachments[0]!.filename).toBe('Ørnulf Łyżwa Жук 2026-05-26 report v2.pdf');
    expect(parsed.subject).toContain('Ørnulf Łyżwa Жук');
  });

  it('have an ASCII stand-in for old HTTP clients', () => {
    expect(asciiFilename('Ørnulf Łyżwa Café "x".pdf')).toBe('_rnulf _yzwa Cafe _x_.pdf');
  });
});
