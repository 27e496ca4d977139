import { createHash } from 'node:crypto';
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { checkHeader, inspectImage, sanitizeFileName, sniffFormat } from '@/lib/images/inspect';
import { grey16Tiff, jpegOf, pngClaiming, pngOf, tiffOf, webpOf } from './fixtures';

const LIMITS = { maxBytes: 10 * 1024 * 1024, maxPixels: 50_000_000 };
// Expected checksums are computed with node:crypto over the same bytes (SHA-256, FIPS 180-4).
const sha = (b: Buffer) => createHash('sha256').update(b).digest('hex');

let dir: string;
let jpeg: Buffer;
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'fm-inspect-'));
  jpeg = await jpegOf(240, 160);
});
afterAll(() => rm(dir, { recursive: true, force: true }));

describe('inspectImage accepts', () => {
  it.each([
    ['jpeg', () => jpegOf(240, 160)],
    ['png', () => pngOf(240, 160)],
    ['tiff', () => tiffOf(240, 160)],
    ['webp', () => webpOf(240, 160)],
  ] as const)('%s, with size and checksum of the original bytes', async (format, make) => {
    const buf = await make();
    const r = await inspectImage(buf, LIMITS);
    expect(r).toMatchObject({ ok: true, format, width: 240, height: 160, bytes: buf.length, bitDepth: 8, channels: 3 });
    if (r.ok) expect(r.sha256).toBe(sha(buf));
  });

  it('a 16-bit greyscale TIFF', async () => {
    const buf = await grey16Tiff(200, 100);
    const r = await inspectImage(buf, LIMITS);
    expect(r).toMatchObject({ ok: true, format: 'tiff', width: 200, height: 100, bitDepth: 16, channels: 1, space: 'grey16' });
  });

  it('a file path, streaming the checksum from disk', async () => {
    const file = join(dir, 'field.jpg');
    await writeFile(file, jpeg);
    const r = await inspectImage(file, LIMITS);
    expect(r).toMatchObject({ ok: true, format: 'jpeg', bytes: jpeg.length, sha256: sha(jpeg) });
  });

  it('reports the displayed size of an EXIF-rotated JPEG', async () => {
    const rotated = await sharp(await jpegOf(240, 160)).withMetadata({ orientation: 6 }).jpeg().toBuffer();
    const r = await inspectImage(rotated, LIMITS);
    expect(r).toMatchObject({ ok: true, orientation: 6, width: 160, height: 240, storedWidth: 240, storedHeight: 160 });
  });
});

describe('inspectImage refuses', () => {
  it('text renamed to .png', async () => {
    const r = await inspectImage(Buffer.from('Collection notes, stallion 4, not a picture\n'), LIMITS);
    expect(r).toMatchObject({ ok: false, code: 'not_an_image' });
    if (!r.ok) expect(r.message).toMatch(/not a picture/);
  });

  it('an empty file', async () => {
    expect(await inspectImage(Buffer.alloc(0), LIMITS)).toMatchObject({ ok: false, code: 'empty' });
    const file = join(dir, 'empty.tif');
    await writeFile(file, Buffer.alloc(0));
    expect(await inspectImage(file, LIMITS)).toMatchObject({ ok: false, code: 'empty' });
  });

  it('a JPEG cut in half, which passes the header check and fails on decode', async () => {
    const half = jpeg.subarray(0, Math.floor(jpeg.length / 2));
    expect((await checkHeader(half, LIMITS)).ok).toBe(true);
    const r = await inspectImage(half, LIMITS);
    expect(r).toMatchObject({ ok: false, code: 'corrupt' });
    if (!r.ok) expect(r.message).toMatch(/damaged or incomplete/);
  });

  it('a TIFF cut in half', async () => {
    const tiff = await tiffOf(240, 160);
    expect(await inspectImage(tiff.subarray(0, tiff.length >> 1), LIMITS)).toMatchObject({ ok: false, code: 'corrupt' });
  });

  it('a pixel bomb: a tiny PNG declaring 20000 × 20000 pixels', async () => {
    const bomb = await pngClaiming(20000, 20000);
    expect(bomb.length).toBeLessThan(200);
    const r = await inspectImage(bomb, LIMITS);
    expect(r).toMatchObject({ ok: false, code: 'too_many_pixels' });
    // 20000 × 20000 = 400 megapixels (computed).
    if (!r.ok) expect(r.message).toContain('20000 × 20000 pixels (400 megapixels)');
  });

  it('a real image over a low pixel limit', async () => {
    const solid = await sharp({ create: { width: 3000, height: 3000, channels: 3, background: '#443355' } }).png().toBuffer();
    expect(solid.length).toBeLessThan(27_000_000 / 100); // 27 MB of pixels in a tiny file: only the pixel limit catches it
    expect(await inspectImage(solid, { maxBytes: LIMITS.maxBytes, maxPixels: 1_000_000 })).toMatchObject({
      ok: false,
      code: 'too_many_pixels',
    });
  });

  it('a file over the byte limit', async () => {
    const r = await inspectImage(jpeg, { maxBytes: 1000, maxPixels: LIMITS.maxPixels });
    expect(r).toMatchObject({ ok: false, code: 'too_large' });
    if (!r.ok) expect(r.message).toMatch(/over the 1000 bytes limit/);
  });

  it('a GIF, naming the format', async () => {
    const gif = await sharp({ create: { width: 20, height: 20, channels: 3, background: '#fff' } }).gif().toBuffer();
    const r = await inspectImage(gif, LIMITS);
    expect(r).toMatchObject({ ok: false, code: 'unsupported_format' });
    if (!r.ok) expect(r.message).toMatch(/GIF/);
  });
});

describe('sniffFormat', () => {
  it('reads magic bytes, not names', () => {
    expect(sniffFormat(Buffer.from([0xff, 0xd8, 0xff, 0xe0]))).toEqual({ kind: 'accepted', format: 'jpeg' });
    expect(sniffFormat(Buffer.from('MM\u0000*', 'latin1'))).toEqual({ kind: 'accepted', format: 'tiff' });
    expect(sniffFormat(Buffer.from('BM6\u0000\u0000\u0000', 'latin1'))).toEqual({ kind: 'other-image', name: 'BMP' });
    expect(sniffFormat(Buffer.from('<svg xmlns="http://www.w3.org/2000/svg">'))).toEqual({ kind: 'other-image', name: 'SVG' });
    expect(sniffFormat(Buffer.from('%PDF-1.7'))).toEqual({ kind: 'unknown' });
  });
});

describe('sanitizeFileName', () => {
  it.each([
    ['../../etc/passwd', 'passwd'],
    ['C:\\x\\y.png', 'y.png'],
    ['C:y.png', 'y.png'],
    ['field\u0000 01\u0007.tif', 'field 01.tif'],
    ['line\nbreak\r.jpg', 'linebreak.jpg'],
    ['evil\u202Egnp.exe', 'evilgnp.exe'],
    ['..', 'image'],
    ['', 'image'],
    ['  .hidden.jpg ', 'hidden.jpg'],
    ['a<b>c:d|e?.png', 'a_b_c_d_e_.png'],
    ['Feld Ü 03 – Quillfield.JPG', 'Feld Ü 03 – Quillfield.JPG'],
  ])('%j → %j', (input, expected) => {
    expect(sanitizeFileName(input)).toBe(expected);
  });

  it('caps long names and keeps the extension', () => {
    const out = sanitizeFileName('x'.repeat(400) + '.tiff');
    expect(out).toHaveLength(180);
    expect(out.endsWith('.tiff')).toBe(true);
  });
});
