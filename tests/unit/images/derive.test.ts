import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { makeDerivatives, stretchLevels, to8Bit } from '@/lib/images/derive';
import { grey16Tiff, jpegOf, pngOf, tiffOf } from './fixtures';

describe('makeDerivatives', () => {
  it.each([
    ['JPEG', () => jpegOf(800, 600)],
    ['PNG', () => pngOf(800, 600)],
    ['TIFF', () => tiffOf(800, 600)],
  ] as const)('%s: display at full size, thumbnail 320 px on the long side', async (_, make) => {
    const d = await makeDerivatives(await make());
    expect(d.display).toMatchObject({ format: 'jpeg', contentType: 'image/jpeg', width: 800, height: 600, channels: 3 });
    // 800 × 600 scaled to fit 320 × 320 → 320 × 240 (computed).
    expect(d.thumbnail).toMatchObject({ format: 'jpeg', width: 320, height: 240 });
    const meta = await sharp(d.display.buffer).metadata();
    expect([meta.format, meta.width, meta.height, meta.depth]).toEqual(['jpeg', 800, 600, 'uchar']);
    expect(d.levels).toBeNull();
  });

  it('portrait thumbnail keeps the aspect ratio', async () => {
    const d = await makeDerivatives(await jpegOf(600, 900));
    // 600 × 900 → 213.3 × 320, rounded to 213 (computed).
    expect([d.thumbnail.width, d.thumbnail.height]).toEqual([213, 320]);
  });

  it('never enlarges a field smaller than a thumbnail', async () => {
    const d = await makeDerivatives(await pngOf(200, 100));
    expect([d.thumbnail.width, d.thumbnail.height]).toEqual([200, 100]);
  });

  it('applies the EXIF orientation', async () => {
    const rotated = await sharp(await jpegOf(400, 300)).withMetadata({ orientation: 6 }).jpeg().toBuffer();
    const d = await makeDerivatives(rotated);
    expect([d.display.width, d.display.height]).toEqual([300, 400]);
    expect((await sharp(d.display.buffer).metadata()).orientation ?? 1).toBe(1);
  });

  it('16-bit greyscale TIFF becomes an 8-bit greyscale JPEG stretched to full range', async () => {
    const tiff = await grey16Tiff(400, 200, 1000, 3000);
    const d = await makeDerivatives(tiff);
    expect(d.levels).toEqual({ low: 1000, high: 3000 });
    expect(d.display).toMatchObject({ width: 400, height: 200, channels: 1, format: 'jpeg' });
    expect(Math.max(d.thumbnail.width, d.thumbnail.height)).toBe(320);
    const meta = await sharp(d.display.buffer).metadata();
    expect([meta.depth, meta.channels]).toEqual(['uchar', 1]);
    const stats = await sharp(d.display.buffer).stats();
    // The ramp 1000..3000 maps onto 0..255; JPEG may overshoot by a level or two.
    expect(stats.channels[0].min).toBeLessThanOrEqual(3);
    expect(stats.channels[0].max).toBeGreaterThanOrEqual(252);
  });

  it('keeps an 8-bit greyscale PNG single-channel and drops alpha', async () => {
    const grey = await sharp(await pngOf(300, 200)).toColourspace('b-w').png().toBuffer();
    expect((await makeDerivatives(grey)).display.channels).toBe(1);
    const withAlpha = await sharp(await pngOf(300, 200)).ensureAlpha(0.5).png().toBuffer();
    expect((await makeDerivatives(withAlpha)).display.channels).toBe(3);
  });

  it('can write a PNG display copy', async () => {
    const d = await makeDerivatives(await tiffOf(300, 200), { displayFormat: 'png' });
    expect(d.display).toMatchObject({ format: 'png', contentType: 'image/png', width: 300, height: 200 });
    expect((await sharp(d.display.buffer).metadata()).format).toBe('png');
  });

  it('rejects a truncated JPEG (it is the decode check)', async () => {
    const jpeg = await jpegOf(400, 300);
    await expect(makeDerivatives(jpeg.subarray(0, jpeg.length >> 1))).rejects.toThrow();
  });
});

describe('stretchLevels and to8Bit', () => {
  it('finds the darkest and brightest values, ignoring a few hot pixels', () => {
    const s = new Uint16Array(100_000);
    for (let i = 0; i < s.length; i++) s[i] = 500 + (i % 2001); // 500..2500
    expect(stretchLevels(s, 0)).toEqual({ low: 500, high: 2500 });
    s[7] = 65535; // one hot pixel; clip 1e-4 of 100 000 skips up to 10 samples
    s[8] = 0; // one dead pixel
    expect(stretchLevels(s)).toEqual({ low: 500, high: 2500 });
    expect(stretchLevels(s, 0)).toEqual({ low: 0, high: 65535 });
  });

  it('maps low → 0 and high → 255 linearly, clipping outside', () => {
    const out = to8Bit(Uint16Array.from([500, 1000, 2000, 3000, 4000]), { low: 1000, high: 3000 });
    // (v − 1000) × 255 / 2000, rounded: 2000 → 127.5 → 128 (computed).
    expect([...out]).toEqual([0, 0, 128, 255, 255]);
  });

  it('leaves a flat image at its own brightness', () => {
    const out = to8Bit(Uint16Array.from([32768, 32768]), { low: 32768, high: 32768 });
    expect([...out]).toEqual([128, 128]);
  });
});
