// Renders the example report and reads it back with Debian's poppler-utils (pdftotext, pdfinfo,
// pdftoppm; scripts/install.sh installs them) and the QR code with jsQR.
import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import jsQR from 'jsqr';
import { PNG } from 'pngjs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { exampleReportSnapshot } from '@/lib/reports/fixture';
import { renderReportPdf } from '@/lib/reports/pdf/render';
import { ReportSnapshotError, markSuperseded, type ReportSnapshot } from '@/lib/reports/snapshot';

const APP = 'https://reports.quillfield.example';
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'fieldmark-report-pdf-'));
let n = 0;

async function render(snapshot: ReportSnapshot) {
  const pdf = await renderReportPdf(snapshot, { appUrl: APP });
  const file = path.join(dir, `r${++n}.pdf`);
  fs.writeFileSync(file, pdf);
  // -layout keeps table rows on one line; -raw keeps the order of the text as drawn (paragraphs in
  // columns stay whole, a superscript follows its base: "× 10 9").
  const text = execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' });
  const raw = execFileSync('pdftotext', ['-raw', file, '-'], { encoding: 'utf8' }).replace(/\s+/g, ' ');
  const pages = Number(/Pages:\s+(\d+)/.exec(execFileSync('pdfinfo', [file], { encoding: 'utf8' }))![1]);
  return { pdf, file, text, raw, pages };
}
/** One line of the text with runs of spaces made single, for table rows. */
const squash = (text: string) => text.replace(/[ \t]+/g, ' ');

afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

describe('the PDF of the example report', () => {
  const s = exampleReportSnapshot();
  let out: Awaited<ReturnType<typeof render>>;
  beforeAll(async () => {
    out = await render(s);
  }, 60_000);

  it('is a PDF with its title and page numbers on every page', () => {
    expect(out.pdf.subarray(0, 5).toString()).toBe('%PDF-');
    expect(out.pages).toBeGreaterThanOrEqual(2);
    for (let p = 1; p <= out.pages; p++) expect(out.text).toContain(`Page ${p} of ${out.pages}`);
    expect(out.text).toContain('Quillfield Equine Reproduction Centre');
    expect(out.text).toContain('Semen evaluation and morphology report');
    expect(out.text).toContain('Thistlewick Lantern — collected 26 May 2026, 08:40 BST');
  });

  it('carries the cautions in the footer of every page', () => {
    const flat = out.raw;
    const footer = 'Morphology figures and semen arithmetic support, and never replace, a veterinarian’s judgement. Breeding and treatment decisions follow local regulations and licensed veterinary practice.';
    expect(flat.split(footer).length - 1).toBe(out.pages);
    expect(flat).toContain('Stallions can strike, kick, rear or mount without warning.');
    expect(flat).toContain('Formaldehyde and formol saline are carcinogenic');
  });

  it('shows % normal with its Wilson interval and the cells counted against the target', () => {
    const t = squash(out.text);
    expect(t).toContain('30.8 %');
    // 81/263 → 25.53–36.62 % (Newcombe 1998, Stat Med 17:857–872, method 3).
    expect(t).toContain('95 % interval 25.5–36.6 % (Wilson)');
    expect(t).toContain('69.2 %');
    expect(t).toMatch(/182 of 263 cells/);
    expect(t).toMatch(/target 200 — reached/);
  });

  it('lists the count and % of every class and group', () => {
    const t = squash(out.text);
    // Counts chosen in the fixture; % = count / 263 (computed by hand).
    const rows: [string, string, number, string][] = [
      ['Normal', 'Normal', 81, '30.8'],
      ['Abnormal head shape or size', 'Head', 22, '8.4'],
      ['Acrosome defect', 'Head', 9, '3.4'],
      ['Nuclear vacuoles', 'Head', 6, '2.3'],
      ['Abnormal midpiece', 'Midpiece', 24, '9.1'],
      ['Proximal cytoplasmic droplet', 'Cytoplasmic droplet', 41, '15.6'],
      ['Distal cytoplasmic droplet', 'Cytoplasmic droplet', 33, '12.5'],
      ['Bent or coiled tail', 'Tail', 28, '10.6'],
      ['Detached head', 'Other', 12, '4.6'],
    ];
    for (const [name, group, count, pct] of rows) expect(t).toContain(`${name} ${group} ${count} ${pct} %`);
    expect(t).toContain('Sperm cells counted 263 100.0 %');
    for (const [group, count, pct] of [['Head', 37, '14.1'], ['Cytoplasmic droplet', 74, '28.1'], ['Other', 19, '7.2']] as const) {
      expect(t).toContain(`${group} ${count} ${pct} %`);
    }
    expect(t).toMatch(/Round cell \(germ cell\) 6\b/);
    expect(t).toMatch(/Leukocyte 3\b/);
    expect(t).toContain('Other cells, counted apart (in no %)');
  });

  it('labels the defect frequencies as such, with tags counted', () => {
    const t = squash(out.text);
    expect(t).toContain('Defect frequencies (a cell may carry several; may exceed 100 %)');
    expect(t).toContain('Proximal cytoplasmic droplet 50 19.0 %');
    expect(t).toContain('Bent or coiled tail 42 16.0 %');
    expect(t).toContain('Defects seen in all 226 85.9 %');
  });

  it('shows the semen arithmetic, PMMN and doses', () => {
    const t = out.raw;
    expect(t).toContain('Gel-free volume 38.0 mL');
    expect(t).toContain('Concentration 165 × 10 6 /mL counting chamber');
    // Total = 38 mL × 165 × 10^6/mL = 6.27 × 10^9 (Kavak et al. 2003); PMS = 45 % of it.
    expect(t).toContain('Total sperm 6.27 × 10 9 volume × concentration');
    expect(t).toContain('Total motile sperm 3.89 × 10 9');
    expect(t).toContain('Progressively motile sperm (PMS) 2.82 × 10 9');
    // PMMN = 2.8215 × 81/263 = 0.869 × 10^9 (computed by hand).
    expect(t).toContain('Progressively motile, morphologically normal (PMMN) 0.87 × 10 9 PMS × % normal (30.8 %)');
    // Doses (computed): 2.8215 / 0.5 = 5 rest 0.32; / 1.0 = 2 rest 0.82; 6.27 / 0.8 = 7 rest 0.67.
    expect(t).toContain('Fresh 0.50 × 10 9 progressively motile sperm 5 0.32 × 10 9');
    expect(t).toContain('Cooled-shipped 1.00 × 10 9 progressively motile sperm 2 0.82 × 10 9');
    expect(t).toContain('Frozen 0.80 × 10 9 total sperm 7 0.67 × 10 9');
    expect(t).toContain('PMMN 0.87 × 10 9 against a threshold of 1.00 × 10 9 — below the threshold.');
  });

  it('shows the agreement figures, the health event and the people', () => {
    const t = squash(out.text);
    expect(t).toContain('0.78 (substantial, Landis & Koch)');
    expect(t).toContain('82.1 % of 251 paired cells');
    expect(t).toMatch(/2\.6 points; acceptable up to 8\.0/);
    expect(t).toMatch(/Fever 04 May 2026 – 06 May 2026 day 23 of 69 12 Jul 2026/);
    expect(t).toContain('Tamsin Reedway');
    expect(t).toContain('Orrin Halvard');
    expect(t).toContain('Dr Maren Kettleby');
    expect(t).toContain('29 May 2026, 15:05 BST');
    expect(t).toContain('From the settled read');
  });

  it('prints the verification code and the version line', () => {
    const flat = out.raw;
    expect(flat).toContain(s.report.verificationCode);
    expect(flat).toContain('Version 2 — supersedes version 1: Interpretation completed after the follow-up examination on 29 May.');
    expect(flat).toContain(`${APP}/verify/${s.report.verificationCode}`);
  });

  it('has a QR code on page 1 that opens the verification page', () => {
    const prefix = path.join(dir, 'qr');
    // The top right quarter of page 1 at 150 dpi (the page is 1240 × 1754 px): the QR code's corner of the header.
    execFileSync('pdftoppm', ['-png', '-r', '150', '-f', '1', '-l', '1', '-x', '620', '-y', '0', '-W', '620', '-H', '440', '-singlefile', out.file, prefix]);
    const png = PNG.sync.read(fs.readFileSync(`${prefix}.png`));
    const found = jsQR(new Uint8ClampedArray(png.data.buffer, png.data.byteOffset, png.data.byteLength), png.width, png.height);
    expect(found?.data).toBe(`${APP}/verify/${s.report.verificationCode}`);
  }, 30_000);

  it('is the same, byte for byte, every time the same snapshot is rendered', async () => {
    const again = await renderReportPdf(s, { appUrl: APP });
    expect(again.equals(out.pdf)).toBe(true);
  }, 60_000);
});

describe('other reports', () => {
  it('say so when superseded, and when they come from a single read', async () => {
    const v1 = markSuperseded(exampleReportSnapshot({ version: 1, singleRead: true }), {
      version: 2,
      reason: 'Interpretation completed.',
      by: 'Dr Maren Kettleby',
      at: '2026-05-29T13:50:00.000Z',
    });
    const { raw: flat } = await render(v1);
    expect(flat).toContain('Superseded by version 2: Interpretation completed.');
    expect(flat).toContain('From a single read: this lab allows reports without a second read');
    expect(flat).not.toContain('Agreement between the two reads');
    expect(flat).not.toContain('supersedes version');
  }, 60_000);

  it('print names in Latin, Greek and Cyrillic letters', async () => {
    const name = 'Łyżwa Ørnulf Δέλτα Жук';
    const { text } = await render(exampleReportSnapshot({ patch: (i) => ((i.stallion.name = name), (i.stallion.owner = { name: 'Đặng Thị Hương' })) }));
    expect(text).toContain(name);
    expect(text).toContain('Đặng Thị Hương');
  }, 60_000);

  it('are not made from a snapshot that contradicts itself', async () => {
    const broken = JSON.parse(JSON.stringify(exampleReportSnapshot())) as ReportSnapshot;
    broken.morphology.normalCount = 80;
    await expect(renderReportPdf(broken, { appUrl: APP })).rejects.toThrow(ReportSnapshotError);
  });
});
