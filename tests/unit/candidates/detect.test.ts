import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { detectCandidates, METHOD, OPENCV_PACKAGE } from '@/lib/candidates/detect';
import { loadOpenCv } from '@/lib/candidates/opencv';
import { generateField } from '@/lib/synthetic/generate-field';

const sha = (b: Buffer | string) => createHash('sha256').update(b).digest('hex').slice(0, 16);

describe('detectCandidates', () => {
  it('names the installed OpenCV package and leaves the process error handlers as they were', async () => {
    const pkg = JSON.parse(readFileSync('node_modules/@techstark/opencv-js/package.json', 'utf8')) as { name: string; version: string };
    expect(OPENCV_PACKAGE).toBe(`${pkg.name}@${pkg.version}`);
    const before = [process.listenerCount('unhandledRejection'), process.listenerCount('uncaughtException')];
    await loadOpenCv();
    expect([process.listenerCount('unhandledRejection'), process.listenerCount('uncaughtException')]).toEqual(before);
  });

  it('gives the same candidates for the same image, with the method and parameters recorded', async () => {
    const f = await generateField({ seed: 31, width: 1200, height: 900, micronsPerPixel: 0.25, cells: 12, format: 'jpeg' });
    const a = await detectCandidates(f.image, { micronsPerPixel: 0.25 });
    const b = await detectCandidates(f.image, { micronsPerPixel: 0.25 });
    expect(b.candidates).toEqual(a.candidates);
    expect(a.method).toBe(METHOD);
    expect(a.params).toMatchObject({ library: OPENCV_PACKAGE, opencv: expect.stringMatching(/^4\./), micronsPerPixel: 0.25, scaleSource: 'image', polarity: 'bright', polarityDetected: true, imageWidth: 1200, imageHeight: 900, threshold: 'otsu, at least the noise floor' });
    for (const c of a.candidates) {
      expect(c.x).toBeGreaterThanOrEqual(0);
      expect(c.x).toBeLessThanOrEqual(1200);
      expect(c.y).toBeGreaterThanOrEqual(0);
      expect(c.y).toBeLessThanOrEqual(900);
      expect(c.score).toBeGreaterThan(0);
      expect(c.score).toBeLessThanOrEqual(1);
    }
    // Reading order: bands of 1.5 head lengths (36 px here) top to bottom, left to right in each.
    const band = (c: { y: number }) => Math.floor(c.y / 36);
    for (let i = 1; i < a.candidates.length; i++) {
      const p = a.candidates[i - 1];
      const q = a.candidates[i];
      expect(band(p) < band(q) || (band(p) === band(q) && p.x <= q.x)).toBe(true);
    }
  });

  it('finds nothing on an empty field, and takes a forced polarity and a lab-setting scale', async () => {
    const blank = await sharp({ create: { width: 800, height: 600, channels: 3, background: '#40364a' } }).png().toBuffer();
    const r = await detectCandidates(blank, { micronsPerPixel: 0.25, polarity: 'dark', scaleSource: 'lab setting' });
    expect(r.candidates).toEqual([]);
    expect(r.params).toMatchObject({ polarity: 'dark', polarityDetected: false, scaleSource: 'lab setting' });
    await expect(detectCandidates(blank, { micronsPerPixel: 0 })).rejects.toThrow(RangeError);
  });

  it('reads a 16-bit greyscale TIFF and an image turned by its orientation tag, in the marks’ pixels', async () => {
    const f = await generateField({ seed: 8, width: 1000, height: 800, micronsPerPixel: 0.25, cells: 6, format: 'tiff16', look: 'phase' });
    const r = await detectCandidates(f.image, { micronsPerPixel: 0.25 });
    expect(r.params).toMatchObject({ polarity: 'dark' });
    const near = (cs: { x: number; y: number }[], t: { x: number; y: number }) => Math.min(...cs.map((c) => Math.hypot(c.x - t.x, c.y - t.y)));
    for (const cell of f.cells.filter((c) => c.classKey !== 'other')) expect(near(r.candidates, cell)).toBeLessThan(16);

    // Stored turned a quarter (orientation 6 = shown rotated 90° clockwise): candidates come in
    // the upright frame the display copy and the marks use (width and height swap).
    const g = await generateField({ seed: 9, width: 900, height: 700, micronsPerPixel: 0.25, cells: 6, format: 'png' });
    const stored = await sharp(g.image).rotate(-90).withMetadata({ orientation: 6 }).jpeg({ quality: 95 }).toBuffer();
    const turned = await detectCandidates(stored, { micronsPerPixel: 0.25 });
    expect([turned.params.imageWidth, turned.params.imageHeight]).toEqual([900, 700]);
    for (const cell of g.cells.filter((c) => c.classKey !== 'other')) expect(near(turned.candidates, cell)).toBeLessThan(16);
  });
});

describe('generateField testing options', () => {
  it('draws exactly the same field as before the options existed when none is given', async () => {
    // Check values: the generator's output for these options, recorded before `look`, `overlap`,
    // `debris` and `illumination` were added (computed).
    const f = await generateField({ seed: 1, width: 1200, height: 900, micronsPerPixel: 0.3, cells: 30, format: 'png', liveFraction: 0.6 });
    expect(sha(JSON.stringify(f.cells))).toBe('7d1201665995a542');
    expect(sha(f.image)).toBe('422027be7a17cf18');
  });

  it('phase look is light with dark heads; overlaps bring heads closer; debris and uneven light change the field', async () => {
    const base = { seed: 4, width: 1000, height: 800, micronsPerPixel: 0.25, cells: 20 } as const;
    const phase = await generateField({ ...base, look: 'phase' });
    const { data, info } = await sharp(phase.image).greyscale().raw().toBuffer({ resolveWithObject: true });
    const at = (x: number, y: number) => data[Math.round(y) * info.width + Math.round(x)];
    expect((await sharp(phase.image).greyscale().stats()).channels[0].mean).toBeGreaterThan(130); // light field
    for (const c of phase.cells.filter((c) => c.classKey !== 'other')) expect(at(c.x, c.y), `${c.classKey}`).toBeLessThan(110); // dark head

    const closest = (cells: { x: number; y: number }[]) => Math.min(...cells.flatMap((a, i) => cells.slice(i + 1).map((b) => Math.hypot(a.x - b.x, a.y - b.y))));
    const apart = await generateField(base);
    const crossed = await generateField({ ...base, overlap: 0.5 });
    // Apart, head centres are at least ~7.8 µm = 31 px apart (see synthetic.test.ts); cells laid
    // across others keep OVERLAP_HEAD_GAP_UM = 5 µm = 20 px between heads.
    expect(closest(apart.cells)).toBeGreaterThan(30);
    expect(apart.cells.some((c) => c.overlapping)).toBe(false);
    const across = crossed.cells.filter((c) => c.overlapping).length;
    expect(across).toBeGreaterThan(4); // about half of the 19 after the first (binomial, computed)
    expect(across).toBeLessThan(16);
    expect(closest(crossed.cells)).toBeGreaterThanOrEqual(20);

    const mean = async (img: Buffer) => (await sharp(img).greyscale().stats()).channels[0].mean;
    expect(await mean((await generateField({ ...base, illumination: 0.6 })).image)).toBeLessThan((await mean(apart.image)) * 0.9);
    const dirty = await generateField({ ...base, debris: 40 });
    expect(dirty.cells).toEqual(apart.cells); // debris adds particles, never cells
    expect(sha(dirty.image)).not.toBe(sha(apart.image));
    await expect(generateField({ ...base, overlap: 2 })).rejects.toThrow(RangeError);
  });
});
