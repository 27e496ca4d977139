import { createHash } from 'node:crypto';
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { generateField } from '@/lib/synthetic/generate-field';
import { SPERM_CLASS_KEYS } from '@/lib/synthetic/sperm';

const sha = (b: Buffer) => createHash('sha256').update(b).digest('hex');
const small = { width: 900, height: 700, micronsPerPixel: 0.25 } as const;

describe('generateField', () => {
  it('same seed → same cells and the same image bytes', async () => {
    const a = await generateField({ seed: 11, ...small, cells: 10 });
    const b = await generateField({ seed: 11, ...small, cells: 10 });
    expect(b.cells).toEqual(a.cells);
    expect(sha(b.image)).toBe(sha(a.image));
    const c = await generateField({ seed: 12, ...small, cells: 10 });
    expect(c.cells).not.toEqual(a.cells);
  });

  it('gives exact class counts, cells inside the image, apart, and drawn where reported', async () => {
    const counts = Object.fromEntries(SPERM_CLASS_KEYS.map((k) => [k, 1]));
    const f = await generateField({ seed: 5, width: 1400, height: 1000, cells: counts, liveFraction: 0.5 });
    expect(f.cells).toHaveLength(SPERM_CLASS_KEYS.length);
    expect(new Set(f.cells.map((c) => c.classKey))).toEqual(new Set(SPERM_CLASS_KEYS));
    for (const c of f.cells) {
      expect(c.x).toBeGreaterThan(0);
      expect(c.x).toBeLessThan(f.width);
      expect(c.y).toBeGreaterThan(0);
      expect(c.y).toBeLessThan(f.height);
      expect(c.angle).toBeGreaterThanOrEqual(0);
      expect(c.angle).toBeLessThan(360);
    }
    // Every head's footprint has a radius of at least ~1.9 µm and cells keep a 4 µm gap,
    // so two head centres are at least ~7.8 µm apart; 7.5 µm = 30 px here (computed).
    for (let i = 0; i < f.cells.length; i++) {
      for (let j = i + 1; j < f.cells.length; j++) {
        const d = Math.hypot(f.cells[i].x - f.cells[j].x, f.cells[i].y - f.cells[j].y);
        expect(d).toBeGreaterThan(30);
      }
    }
    // Heads are bright (unstained) or pink (eosin) on a dark nigrosin field: red channel high.
    const { data, info } = await sharp(f.image).raw().toBuffer({ resolveWithObject: true });
    const red = (x: number, y: number) => data[(y * info.width + x) * info.channels];
    for (const c of f.cells) {
      let max = 0;
      for (let dy = -4; dy <= 4; dy++) for (let dx = -4; dx <= 4; dx++) max = Math.max(max, red(Math.round(c.x) + dx, Math.round(c.y) + dy));
      expect(max, `${c.classKey} at ${c.x},${c.y}`).toBeGreaterThan(150);
    }
    expect(red(2, 2)).toBeLessThan(110); // a corner is background
  });

  it('weights draw a mix; too many cells for the field is an error', async () => {
    const f = await generateField({ seed: 3, ...small, cells: { total: 8, weights: { detached_head: 1 } } });
    expect(f.cells.map((c) => c.classKey)).toEqual(Array(8).fill('detached_head'));
    await expect(generateField({ seed: 1, width: 300, height: 300, cells: 40 })).rejects.toThrow(RangeError);
  });

  it('writes a 16-bit greyscale TIFF with 12-bit values', async () => {
    const f = await generateField({ seed: 2, width: 400, height: 300, cells: 1, format: 'tiff16' });
    const meta = await sharp(f.image).metadata();
    expect([meta.format, meta.depth, meta.channels, meta.width, meta.height]).toEqual(['tiff', 'ushort', 1, 400, 300]);
    const stats = await sharp(f.image).stats();
    expect(stats.channels[0].max).toBeLessThanOrEqual(4095);
    expect(stats.channels[0].max).toBeGreaterThan(1000);
  });

  it('makes a 12-megapixel JPEG field', { timeout: 30_000 }, async () => {
    const f = await generateField({ seed: 99, width: 4000, height: 3000, cells: 100, format: 'jpeg' });
    const meta = await sharp(f.image).metadata();
    expect([meta.format, meta.width, meta.height]).toEqual(['jpeg', 4000, 3000]);
    expect(f.cells).toHaveLength(100);
  });
});
