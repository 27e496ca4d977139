// Checks an uploaded field image by its content, never by its name or MIME type.
//
// Accepted formats: JPEG, PNG, TIFF (8- or 16-bit per sample, greyscale or RGB,
// first page of a multi-page file) and WebP. Everything else is refused: other
// picture formats with `unsupported_format`, anything else with `not_an_image`.
import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';
import { open, stat } from 'node:fs/promises';
import sharp, { type Metadata } from 'sharp';

export const ACCEPTED_FORMATS = ['jpeg', 'png', 'tiff', 'webp'] as const;
export type ImageFormat = (typeof ACCEPTED_FORMATS)[number];

/** A file path (uploads are streamed to disk first) or, in tests, a Buffer. */
export type ImageInput = string | Buffer;

export interface ImageLimits {
  /** Largest accepted file, in bytes. */
  maxBytes: number;
  /** Largest accepted width × height. */
  maxPixels: number;
}

export type InspectFailureCode =
  | 'empty'
  | 'too_large'
  | 'not_an_image'
  | 'unsupported_format'
  | 'too_many_pixels'
  | 'corrupt';

export interface InspectFailure {
  ok: false;
  code: InspectFailureCode;
  /** Says what is wrong and what to do; the caller prefixes the file name. */
  message: string;
}

export interface ImageInfo {
  format: ImageFormat;
  /** Pixel size as displayed, i.e. after the EXIF/TIFF orientation is applied. */
  width: number;
  height: number;
  /** Pixel size as stored in the file. */
  storedWidth: number;
  storedHeight: number;
  /** 1–8, 1 when the file has no orientation tag. */
  orientation: number;
  /** File size in bytes. */
  bytes: number;
  /** Bits per sample: 8 or 16 for the accepted formats (32 for float TIFF). */
  bitDepth: number;
  /** Samples per pixel including alpha. */
  channels: number;
  /** Colour interpretation as sharp names it: 'srgb', 'b-w', 'grey16', 'rgb16', 'cmyk' … */
  space: string;
  hasAlpha: boolean;
  /** Pages in the file (multi-page TIFF); only the first is used. */
  pages: number;
}

export type HeaderResult = { ok: true; info: ImageInfo } | InspectFailure;
export type InspectResult = ({ ok: true; sha256: string } & ImageInfo) | InspectFailure;

// libvips stops on a truncated file; 'warning' would also refuse files with
// harmless quirks (extra bytes before a JPEG marker, unknown TIFF tags) that
// microscope software writes and every viewer opens.
export const FAIL_ON = 'truncated' as const;

const MAGIC_READ = 32;

export function fail(code: InspectFailureCode, message: string): InspectFailure {
  return { ok: false, code, message };
}

function formatBytes(n: number): string {
  if (n >= 1024 * 1024) return `${(n / (1024 * 1024)).toFixed(1)} MB`;
  if (n >= 1024) return `${(n / 1024).toFixed(1)} kB`;
  return `${n} bytes`;
}

function formatMegapixels(n: number): string {
  return `${(n / 1e6).toFixed(n < 1e7 ? 1 : 0)} megapixels`;
}

type Sniffed = { kind: 'accepted'; format: ImageFormat } | { kind: 'other-image'; name: string } | { kind: 'unknown' };

/** Identifies the format from the first bytes of the file. */
export function sniffFormat(head: Uint8Array): Sniffed {
  const b = head;
  const at = (i: number, ...bytes: number[]) => bytes.every((v, k) => b[i + k] === v);
  const ascii = (i: number, s: string) => at(i, ...Array.from(s, (c) => c.charCodeAt(0)));
  if (at(0, 0xff, 0xd8, 0xff)) return { kind: 'accepted', format: 'jpeg' };
  if (at(0, 0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a)) return { kind: 'accepted', format: 'png' };
  // Classic TIFF and BigTIFF, both byte orders.
  if (at(0, 0x49, 0x49, 0x2a, 0x00) || at(0, 0x4d, 0x4d, 0x00, 0x2a)) return { kind: 'accepted', format: 'tiff' };
  if (at(0, 0x49, 0x49, 0x2b, 0x00) || at(0, 0x4d, 0x4d, 0x00, 0x2b)) return { kind: 'accepted', format: 'tiff' };
  if (ascii(0, 'RIFF') && ascii(8, 'WEBP')) return { kind: 'accepted', format: 'webp' };
  if (ascii(0, 'GIF87a') || ascii(0, 'GIF89a')) return { kind: 'other-image', name: 'GIF' };
  if (ascii(0, 'BM')) return { kind: 'other-image', name: 'BMP' };
  if (ascii(4, 'ftyp')) {
    const brand = String.fromCharCode(...b.subarray(8, 12));
    if (/^(heic|heix|hevc|hevx|mif1|msf1)$/.test(brand)) return { kind: 'other-image', name: 'HEIC' };
    if (/^(avif|avis)$/.test(brand)) return { kind: 'other-image', name: 'AVIF' };
  }
  if (at(0, 0x00, 0x00, 0x00, 0x0c, 0x6a, 0x50, 0x20, 0x20) || at(0, 0xff, 0x4f, 0xff, 0x51)) {
    return { kind: 'other-image', name: 'JPEG 2000' };
  }
  if (ascii(0, '8BPS')) return { kind: 'other-image', name: 'Photoshop (PSD)' };
  if (at(0, 0xff, 0x0a) || ascii(0, '\u0000\u0000\u0000\u000cJXL ')) return { kind: 'other-image', name: 'JPEG XL' };
  const text = new TextDecoder('utf-8', { fatal: false }).decode(b).trimStart().toLowerCase();
  if (text.startsWith('<svg') || (text.startsWith('<?xml') && text.includes('<svg'))) {
    return { kind: 'other-image', name: 'SVG' };
  }
  return { kind: 'unknown' };
}

async function readHead(input: ImageInput): Promise<Uint8Array> {
  if (Buffer.isBuffer(input)) return input.subarray(0, MAGIC_READ);
  const fh = await open(input, 'r');
  try {
    const buf = Buffer.alloc(MAGIC_READ);
    const { bytesRead } = await fh.read(buf, 0, MAGIC_READ, 0);
    return buf.subarray(0, bytesRead);
  } finally {
    await fh.close();
  }
}

async function sizeOf(input: ImageInput): Promise<number> {
  return Buffer.isBuffer(input) ? input.length : (await stat(input)).size;
}

/** SHA-256 (hex) of the original bytes; a path is streamed, never read whole. */
export async function sha256Of(input: ImageInput): Promise<string> {
  const hash = createHash('sha256');
  if (Buffer.isBuffer(input)) return hash.update(input).digest('hex');
  const stream = createReadStream(input, { highWaterMark: 1024 * 1024 });
  for await (const chunk of stream) hash.update(chunk as Buffer);
  return hash.digest('hex');
}

const BITS: Record<string, number> = {
  uchar: 8, char: 8, ushort: 16, short: 16, uint: 32, int: 32, float: 32, double: 64, complex: 64, dpcomplex: 128,
};

/** Whether an error came from decoding the file rather than from the machine (missing file, no memory …). */
export function isDecodeError(err: unknown): err is Error {
  if (!(err instanceof Error)) return false;
  const code = (err as NodeJS.ErrnoException).code;
  if (typeof code === 'string' && /^E[A-Z]+$/.test(code)) return false;
  return !/Input file is missing|out of memory/i.test(err.message);
}

/** Maps a sharp error raised while reading an accepted format to a failure. */
export function decodeFailure(err: unknown, format: ImageFormat | string, limits?: ImageLimits): InspectFailure {
  const msg = err instanceof Error ? err.message : String(err);
  if (/pixel limit/i.test(msg)) {
    return fail(
      'too_many_pixels',
      `The image is larger than the limit of ${limits ? formatMegapixels(limits.maxPixels) : 'the lab allows'}. Export a smaller field or crop it, then upload again.`,
    );
  }
  return fail(
    'corrupt',
    `The file starts like a ${format.toUpperCase()} image but its picture data is damaged or incomplete (often an interrupted copy). Copy it again from the microscope computer and upload it again.`,
  );
}

/**
 * The cheap checks: size, magic bytes, header dimensions. Does not decode the pixels,
 * so a truncated file can still pass; decoding (inspectImage or ingestImage) catches it.
 */
export async function checkHeader(input: ImageInput, limits: ImageLimits): Promise<HeaderResult> {
  const bytes = await sizeOf(input);
  if (bytes === 0) return fail('empty', 'The file is empty (0 bytes). Check the export on the microscope computer and upload it again.');
  if (bytes > limits.maxBytes) {
    return fail(
      'too_large',
      `The file is ${formatBytes(bytes)}, over the ${formatBytes(limits.maxBytes)} limit. Save it with compression (e.g. LZW TIFF or JPEG) or crop the field, then upload again.`,
    );
  }
  const sniffed = sniffFormat(await readHead(input));
  if (sniffed.kind === 'other-image') {
    return fail(
      'unsupported_format',
      `The file is a ${sniffed.name} image; Fieldmark accepts JPEG, PNG, TIFF and WebP. Export the field from the microscope software as TIFF or JPEG.`,
    );
  }
  if (sniffed.kind === 'unknown') {
    return fail(
      'not_an_image',
      'The file is not a picture: its contents are not JPEG, PNG, TIFF or WebP, whatever its name says. Check that the right file was chosen.',
    );
  }
  const format = sniffed.format;

  // Header only: no pixels are decoded, so reading the true size of a pixel bomb is safe,
  // and the refusal can name it.
  let meta: Metadata;
  try {
    meta = await sharp(input, { limitInputPixels: false }).metadata();
  } catch (err) {
    if (!isDecodeError(err)) throw err;
    return decodeFailure(err, format, limits);
  }
  if (meta.format !== format) return decodeFailure(new Error(`header says ${meta.format}`), format, limits);
  const pixels = meta.width * meta.height;
  if (!(pixels > 0)) return decodeFailure(new Error('no dimensions'), format, limits);
  if (pixels > limits.maxPixels) {
    return fail(
      'too_many_pixels',
      `The image is ${meta.width} × ${meta.height} pixels (${formatMegapixels(pixels)}), over the limit of ${formatMegapixels(limits.maxPixels)}. Export a smaller field or crop it, then upload again.`,
    );
  }
  const orientation = meta.orientation ?? 1;
  return {
    ok: true,
    info: {
      format,
      width: meta.autoOrient?.width ?? meta.width,
      height: meta.autoOrient?.height ?? meta.height,
      storedWidth: meta.width,
      storedHeight: meta.height,
      orientation,
      bytes,
      bitDepth: BITS[meta.depth] ?? 8,
      channels: meta.channels,
      space: meta.space,
      hasAlpha: meta.hasAlpha,
      pages: meta.pages ?? 1,
    },
  };
}

/**
 * Full check of one upload: header checks, a complete decode (a JPEG cut in half
 * passes the header and fails only here) and the checksum of the original bytes.
 * ingestImage does the same checks but shares the decode with the display copy.
 */
export async function inspectImage(input: ImageInput, limits: ImageLimits): Promise<InspectResult> {
  const header = await checkHeader(input, limits);
  if (!header.ok) return header;
  const decode = sharp(input, { failOn: FAIL_ON, limitInputPixels: limits.maxPixels })
    .raw()
    .toBuffer()
    .then(
      () => null,
      (err: unknown) => {
        if (!isDecodeError(err)) throw err;
        return decodeFailure(err, header.info.format, limits);
      },
    );
  const [decodeResult, sha256] = await Promise.all([decode, sha256Of(input)]);
  if (decodeResult) return decodeResult;
  return { ok: true, ...header.info, sha256 };
}

// Bidi overrides and zero-width characters can make a name display as something else.
const INVISIBLE = /[\u200b-\u200f\u202a-\u202e\u2060-\u2069\ufeff]/g;
const CONTROL = /[\u0000-\u001f\u007f-\u009f]/g;
const RESERVED = /[<>:"|?*]/g;
const MAX_NAME = 180;

/**
 * A display name for an uploaded file: the last path part only, without control,
 * invisible or reserved characters, never empty, at most 180 characters (extension kept).
 * It is for showing and for download names; storage keys never use it.
 */
export function sanitizeFileName(name: string): string {
  let base = String(name ?? '').normalize('NFC').replace(CONTROL, '').replace(INVISIBLE, '');
  base = base.split(/[\\/]/).pop() ?? '';
  base = base.replace(/^[A-Za-z]:/, ''); // "C:y.png", a drive-relative Windows path
  base = base.replace(RESERVED, '_').replace(/\s+/g, ' ').trim();
  base = base.replace(/^[.\s]+/, ''); // no "..", no hidden dot-files
  base = base.replace(/[.\s]+$/, '');
  const chars = Array.from(base); // code points, so a cut never splits a surrogate pair
  if (chars.length > MAX_NAME) {
    const dot = base.lastIndexOf('.');
    const ext = dot > 0 && base.length - dot <= 10 ? base.slice(dot) : '';
    base = chars.slice(0, MAX_NAME - ext.length).join('').trimEnd() + ext;
  }
  return base || 'image';
}
