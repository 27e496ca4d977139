import { createHash } from 'node:crypto';
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ingestImage } from '@/lib/images/ingest';
import { checkHeader } from '@/lib/images/inspect';
import { grey16Tiff, jpegOf, pngClaiming } from './fixtures';

const LIMITS = { maxBytes: 10 * 1024 * 1024, maxPixels: 50_000_000 };
// Expected checksums: SHA-256 of the same bytes with node:crypto (FIPS 180-4).
const sha = (b: Buffer) => createHash('sha256').update(b).digest('hex');

let dir: string;
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'fm-ingest-'));
});
afterAll(() => rm(dir, { recursive: true, force: true }));

describe('ingestImage', () => {
  it('checks, hashes and derives a JPEG from disk', async () => {
    const jpeg = await jpegOf(1000, 700);
    const file = join(dir, 'f.jpg');
    await writeFile(file, jpeg);
    const r = await ingestImage(file, LIMITS);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.sha256).toBe(sha(jpeg));
    expect(r.info).toMatchObject({ format: 'jpeg', width: 1000, height: 700, bytes: jpeg.length, sha256: sha(jpeg) });
    expect([r.display.width, r.display.height]).toEqual([1000, 700]);
    // 1000 × 700 → 320 × 224 (computed).
    expect([r.thumbnail.width, r.thumbnail.height]).toEqual([320, 224]);
    expect((await sharp(r.thumbnail.buffer).metadata()).format).toBe('jpeg');
  });

  it('stretches a 16-bit greyscale TIFF', async () => {
    const tiff = await grey16Tiff(500, 300, 200, 4000);
    const r = await ingestImage(tiff, LIMITS);
    expect(r).toMatchObject({ ok: true, levels: { low: 200, high: 4000 }, info: { bitDepth: 16, format: 'tiff' } });
    if (r.ok) expect(r.display.channels).toBe(1);
  });

  it('refuses a truncated JPEG as corrupt although its header is fine', async () => {
    const jpeg = await jpegOf(600, 400);
    const half = jpeg.subarray(0, jpeg.length >> 1);
    expect((await checkHeader(half, LIMITS)).ok).toBe(true);
    expect(await ingestImage(half, LIMITS)).toMatchObject({ ok: false, code: 'corrupt' });
  });

  it('refuses without decoding: text, empty, pixel bomb, too large', async () => {
    expect(await ingestImage(Buffer.from('hello'), LIMITS)).toMatchObject({ ok: false, code: 'not_an_image' });
    expect(await ingestImage(Buffer.alloc(0), LIMITS)).toMatchObject({ ok: false, code: 'empty' });
    expect(await ingestImage(await pngClaiming(20000, 20000), LIMITS)).toMatchObject({ ok: false, code: 'too_many_pixels' });
    expect(await ingestImage(await jpegOf(100, 100), { ...LIMITS, maxBytes: 10 })).toMatchObject({ ok: false, code: 'too_large' });
  });

  it('throws, rather than blaming the file, when the path does not exist', async () => {
    await expect(ingestImage(join(dir, 'missing.jpg'), LIMITS)).rejects.toThrow();
  });
});
