// Candidate detection against known truth: the synthetic field generator knows where every
// head is. Candidates are paired with the true heads one to one within the pairing distance
// of the second read (lib/agreement/pairing.ts, 4 µm by default), as a reader's marks would be.
//
// Targets (from the issue): recall ≥ 0.95 and precision ≥ 0.90 on clean fields; recall ≥ 0.90
// with overlapping cells, debris and uneven lighting. Two magnifications (0.25 µm/px, heads
// ~24 px long; 0.5 µm/px, ~12 px) and both polarities (bright heads on a dark stained field,
// dark heads on a light phase-contrast field), five fields of 40 cells each per case.
import { describe, expect, it } from 'vitest';
import { pairingDistancePx, pairPoints } from '@/lib/agreement/pairing';
import { detectCandidates, searchSkipped } from '@/lib/candidates/detect';
import { generateField, type FieldOptions } from '@/lib/synthetic/generate-field';

const FIELDS = 5;
const HARD = { overlap: 0.25, debris: 30, illumination: 0.5 } as const;

type Case = { condition: 'clean' | 'overlaps, debris, uneven light'; look: 'stained' | 'phase'; micronsPerPixel: number };
const CASES: Case[] = (['clean', 'overlaps, debris, uneven light'] as const).flatMap((condition) =>
  (['stained', 'phase'] as const).flatMap((look) => [0.25, 0.5].map((micronsPerPixel) => ({ condition, look, micronsPerPixel }))),
);

async function measure(c: Case) {
  let truth = 0;
  let found = 0;
  let paired = 0;
  let polarityRight = 0;
  for (let i = 0; i < FIELDS; i++) {
    const options: FieldOptions = { seed: 7919 * (i + 1), width: 1600, height: 1200, micronsPerPixel: c.micronsPerPixel, cells: 40, format: 'jpeg', look: c.look, ...(c.condition === 'clean' ? {} : HARD) };
    const field = await generateField(options);
    const result = await detectCandidates(field.image, { micronsPerPixel: c.micronsPerPixel });
    const pairing = pairPoints(field.cells, result.candidates, pairingDistancePx(c.micronsPerPixel));
    truth += field.cells.length;
    found += result.candidates.length;
    paired += pairing.pairs.length;
    if (!searchSkipped(result.params) && result.params.polarity === (c.look === 'stained' ? 'bright' : 'dark')) polarityRight++;
  }
  return { recall: paired / truth, precision: paired / found, truth, found, paired, polarityRight };
}

describe('candidate detection on synthetic fields with known cells', () => {
  const rows: string[] = [];

  for (const c of CASES) {
    const name = `${c.condition}, ${c.look === 'stained' ? 'bright heads on dark' : 'dark heads on light'}, ${c.micronsPerPixel} µm/px`;
    it(name, { timeout: 120_000 }, async () => {
      const m = await measure(c);
      rows.push(`| ${c.condition} | ${c.look} | ${c.micronsPerPixel} | ${m.truth} | ${m.found} | ${m.paired} | ${m.recall.toFixed(3)} | ${m.precision.toFixed(3)} |`);
      console.log(`[accuracy] ${name}: recall ${m.recall.toFixed(3)}, precision ${m.precision.toFixed(3)} (${m.paired} paired of ${m.truth} cells, ${m.found} candidates)`);
      expect(m.polarityRight, 'polarity detected on every field').toBe(FIELDS);
      if (c.condition === 'clean') {
        expect(m.recall).toBeGreaterThanOrEqual(0.95);
        expect(m.precision).toBeGreaterThanOrEqual(0.9);
      } else {
        expect(m.recall).toBeGreaterThanOrEqual(0.9);
      }
    });
  }

  it('prints the figures', () => {
    console.log(['| fields | look | µm/px | cells | candidates | paired | recall | precision |', '|---|---|---|---|---|---|---|---|', ...rows].join('\n'));
    expect(rows).toHaveLength(CASES.length);
  });
});
