// Candidate detection at coarse scales, on synthetic fields with known cells (paired as in
// accuracy.test.ts). A stallion head is ~6 µm long (from memory), so at 0.75 µm/px it is 8 px
// long, at 1 µm/px 6 px. Down to 0.75 µm/px detection must meet the clean-field targets
// (recall ≥ 0.95, precision ≥ 0.90); coarser, it must give no candidates and say why, rather
// than guess (before v3, phase-contrast fields there gave 11 000–29 000 candidates for 120 cells).
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { pairingDistancePx, pairPoints } from '@/lib/agreement/pairing';
import { CELL_LENGTH_UM, detectCandidates, MIN_HEAD_LENGTH_PX, searchSkipped } from '@/lib/candidates/detect';
import { generateField, type FieldOptions } from '@/lib/synthetic/generate-field';

const FIELDS = 3;
const LOOKS = ['stained', 'phase'] as const;

async function measure(look: (typeof LOOKS)[number], micronsPerPixel: number) {
  let truth = 0;
  let found = 0;
  let paired = 0;
  const skipped = new Set<string>();
  for (let i = 0; i < FIELDS; i++) {
    const options: FieldOptions = { seed: 7919 * (i + 1), width: 1600, height: 1200, micronsPerPixel, cells: 40, format: 'jpeg', look };
    const field = await generateField(options);
    const result = await detectCandidates(field.image, { micronsPerPixel });
    const pairing = pairPoints(field.cells, result.candidates, pairingDistancePx(micronsPerPixel));
    truth += field.cells.length;
    found += result.candidates.length;
    paired += pairing.pairs.length;
    if (result.params.skipped) skipped.add(result.params.skipped);
  }
  return { truth, found, paired, recall: paired / truth, precision: found ? paired / found : NaN, skipped: [...skipped] };
}

describe('candidate detection at coarse scales', () => {
  const rows: string[] = [];

  for (const look of LOOKS) {
    for (const mpp of [0.6, 0.75]) {
      it(`finds the cells of a clean ${look} field at ${mpp} µm/px`, { timeout: 120_000 }, async () => {
        const m = await measure(look, mpp);
        rows.push(`| ${look} | ${mpp} | ${m.truth} | ${m.found} | ${m.paired} | ${m.recall.toFixed(3)} | ${m.precision.toFixed(3)} | |`);
        expect(m.skipped).toEqual([]);
        expect(m.recall).toBeGreaterThanOrEqual(0.95);
        expect(m.precision).toBeGreaterThanOrEqual(0.9);
      });
    }
    for (const mpp of [0.8, 1, 1.5, 2]) {
      it(`gives no candidates on a ${look} field at ${mpp} µm/px, and says why`, { timeout: 120_000 }, async () => {
        const m = await measure(look, mpp);
        rows.push(`| ${look} | ${mpp} | ${m.truth} | ${m.found} | ${m.paired} | | | ${m.skipped.join('; ')} |`);
        expect(m.found).toBe(0);
        const headPx = Math.round((6 / mpp) * 10) / 10;
        expect(m.skipped).toEqual([`scale too coarse: a head would be ${headPx} px long; cell finding needs at least ${MIN_HEAD_LENGTH_PX}`]);
      });
    }
  }

  it('records the scale limit and the most cells the field could hold, without opening the pixels', async () => {
    // 1600 × 1200 px at 0.9 µm/px = 1 555 200 µm²; a cell 70 µm × 3 µm covers 210 µm² → 7405.
    const field = await generateField({ seed: 3, width: 1600, height: 1200, micronsPerPixel: 0.9, cells: 10, format: 'jpeg', look: 'phase' });
    const r = await detectCandidates(field.image, { micronsPerPixel: 0.9, scaleSource: 'lab setting' });
    expect(searchSkipped(r.params)).toBe(true);
    expect(r.params).toEqual({
      library: expect.any(String),
      sharp: expect.any(String),
      micronsPerPixel: 0.9,
      scaleSource: 'lab setting',
      headLengthUm: 6,
      headWidthUm: 3,
      imageWidth: 1600,
      imageHeight: 1200,
      headLengthPx: 6.67,
      minHeadLengthPx: 8,
      maxCandidates: 7405,
      cellFootprintUm2: CELL_LENGTH_UM * 3,
      skipped: 'scale too coarse: a head would be 6.7 px long; cell finding needs at least 8',
    });
  });

  it('shows no candidates where there are more than the field could hold', async () => {
    // A 640 × 480 px field at 0.5 µm/px is 76 800 µm²: room for 365 cells of 210 µm². Drawn full
    // of head-like dark ellipses (6.6 × 3.4 µm, on a 13 µm grid: 450 of them, more than any smear
    // a reader scores), the search finds more than 365, and none is shown.
    const ellipses: string[] = [];
    for (let y = 13; y < 480; y += 26) for (let x = 13; x < 640; x += 26) ellipses.push(`<ellipse cx="${x}" cy="${y}" rx="6.6" ry="3.4" fill="#303030"/>`);
    const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="640" height="480"><rect width="640" height="480" fill="#d8d8d8"/>${ellipses.join('')}</svg>`;
    const image = await sharp(Buffer.from(svg)).png().toBuffer();
    const r = await detectCandidates(image, { micronsPerPixel: 0.5, polarity: 'dark' });
    expect(ellipses).toHaveLength(450);
    expect(r.params.maxCandidates).toBe(365);
    if (searchSkipped(r.params)) throw new Error('the search should have run at 0.5 µm/px');
    expect(r.params.found).toBeGreaterThan(365);
    expect(r.candidates).toEqual([]);
    expect(r.params.skipped).toBe(`implausible result: ${r.params.found} candidates, more than the 365 cells the field could hold`);
  });

  it('prints the figures', () => {
    console.log(['| look | µm/px | cells | candidates | paired | recall | precision | skipped |', '|---|---|---|---|---|---|---|---|', ...rows].join('\n'));
    expect(rows).toHaveLength(LOOKS.length * 6);
  });
});
