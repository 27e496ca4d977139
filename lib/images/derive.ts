// Browser copies of a field image: a full-resolution display copy for the scoring
// canvas (browsers cannot show TIFF, nor 16-bit samples) and a small thumbnail.
//
// Display copy: baseline JPEG, quality 90, mozjpeg's trellis/scan optimisations off.
// JPEG because every browser decodes it quickly and a 12-megapixel field stays at a
// few MB (PNG would be 15–30 MB and its zlib encode is several times slower; WebP
// encodes 3–5× slower than libjpeg at this size). Quality 90 keeps head outlines,
// vacuoles and droplets free of visible artefacts. The mozjpeg options shave ~10 %
// off the file for 2–3× the encode time; the copy can always be remade from the
// untouched original, so speed wins. PNG stays available for labs that want a
// lossless copy.
import sharp, { type Sharp, type SharpOptions } from 'sharp';
import { FAIL_ON, type ImageInfo, type ImageInput } from './inspect';

export type DerivativeFormat = 'jpeg' | 'png';

export interface Derivative {
  buffer: Buffer;
  format: DerivativeFormat;
  contentType: 'image/jpeg' | 'image/png';
  width: number;
  height: number;
  channels: number;
  bytes: number;
}

export interface DerivativeOptions {
  displayFormat?: DerivativeFormat;
  /** JPEG quality of the display copy (default 90). */
  displayQuality?: number;
  /** Longest side of the thumbnail in pixels (default 320). */
  thumbnailSize?: number;
  thumbnailQuality?: number;
  /** Safety net handed to sharp; the header check normally refuses larger images first. */
  maxPixels?: number;
  /** Header facts already read by checkHeader, to skip a second metadata read. */
  info?: Pick<ImageInfo, 'bitDepth' | 'channels' | 'space' | 'hasAlpha'> & { format: string };
}

/** Sample values mapped to black and white when a 16-bit image is brought to 8 bits. */
export interface Levels {
  low: number;
  high: number;
}

export interface Derivatives {
  display: Derivative;
  thumbnail: Derivative;
  /** Set when 16-bit samples were stretched to 8 bits. */
  levels: Levels | null;
}

export const DEFAULT_DERIVATIVE_OPTIONS = {
  displayFormat: 'jpeg',
  displayQuality: 90,
  thumbnailSize: 320,
  thumbnailQuality: 80,
} as const satisfies DerivativeOptions;

/**
 * Share of samples allowed to clip at each end when stretching 16-bit data. Cameras
 * often fill only 10–14 of the 16 bits, so a plain ÷256 would give a near-black copy;
 * stretching between the darkest and brightest values is right except for a few hot
 * or dead pixels, which this fraction ignores (1 in 10 000, ~1 200 pixels at 12 MP,
 * far fewer than one sperm head covers).
 */
export const CLIP_FRACTION = 1e-4;

/** Black and white points of 16-bit samples, ignoring `clip` of them at each end. */
export function stretchLevels(samples: Uint16Array, clip = CLIP_FRACTION): Levels {
  const hist = new Uint32Array(65536);
  for (let i = 0; i < samples.length; i++) hist[samples[i]]++;
  const skip = Math.floor(samples.length * clip);
  let low = 0;
  for (let seen = 0; low < 65535; low++) {
    seen += hist[low];
    if (seen > skip) break;
  }
  let high = 65535;
  for (let seen = 0; high > 0; high--) {
    seen += hist[high];
    if (seen > skip) break;
  }
  return { low, high };
}

/** Maps 16-bit samples linearly so `low` → 0 and `high` → 255 (clipped outside). */
export function to8Bit(samples: Uint16Array, { low, high }: Levels): Buffer {
  const lut = new Uint8Array(65536);
  if (high > low) {
    const scale = 255 / (high - low);
    for (let v = 0; v < 65536; v++) lut[v] = v <= low ? 0 : v >= high ? 255 : Math.round((v - low) * scale);
  } else {
    // A flat image: keep its absolute brightness instead of inventing contrast.
    for (let v = 0; v < 65536; v++) lut[v] = v >> 8;
  }
  const out = Buffer.allocUnsafe(samples.length);
  for (let i = 0; i < samples.length; i++) out[i] = lut[samples[i]];
  return out;
}

function encode(pipeline: Sharp, format: DerivativeFormat, quality: number): Promise<Derivative> {
  const p =
    format === 'png'
      ? pipeline.png({ compressionLevel: 6, adaptiveFiltering: false })
      : pipeline.jpeg({ quality, mozjpeg: false, chromaSubsampling: '4:2:0' });
  return p.toBuffer({ resolveWithObject: true }).then(({ data, info }) => ({
    buffer: data,
    format,
    contentType: format === 'png' ? 'image/png' : 'image/jpeg',
    width: info.width,
    height: info.height,
    channels: info.channels,
    bytes: data.length,
  }));
}

function thumbnailOf(pipeline: Sharp, size: number, quality: number): Promise<Derivative> {
  // 'inside' keeps the aspect ratio; never enlarge a field smaller than the thumbnail.
  return encode(pipeline.resize(size, size, { fit: 'inside', withoutEnlargement: true }), 'jpeg', quality);
}

const isGrey = (info: { channels: number; space: string }) =>
  info.channels <= 2 || info.space === 'b-w' || info.space === 'grey16';

/**
 * Makes the display copy (full resolution, orientation applied) and the thumbnail.
 * Decodes the original fully and fails on a truncated or damaged file, so callers can
 * use it as the decode check (ingestImage does).
 */
export async function makeDerivatives(input: ImageInput, opts: DerivativeOptions = {}): Promise<Derivatives> {
  const o = { ...DEFAULT_DERIVATIVE_OPTIONS, ...opts };
  let info: NonNullable<DerivativeOptions['info']>;
  if (opts.info) info = opts.info;
  else {
    const m = await sharp(input, { limitInputPixels: false }).metadata();
    const bitDepth = m.depth === 'ushort' || m.depth === 'short' ? 16 : 8;
    info = { format: m.format, bitDepth, channels: m.channels, space: m.space, hasAlpha: m.hasAlpha };
  }
  const inputOptions: SharpOptions = { failOn: FAIL_ON, limitInputPixels: o.maxPixels ?? true };
  const grey = isGrey(info);

  if (info.bitDepth === 16) {
    // One decode to 16-bit raw, our own stretch, then both copies from the 8-bit pixels.
    let p = sharp(input, inputOptions).rotate();
    if (info.hasAlpha) p = p.removeAlpha();
    const { data, info: raw } = await p
      .toColourspace(grey ? 'grey16' : 'rgb16')
      .raw({ depth: 'ushort' })
      .toBuffer({ resolveWithObject: true });
    const samples =
      data.byteOffset % 2 === 0
        ? new Uint16Array(data.buffer, data.byteOffset, data.length / 2)
        : new Uint16Array(Uint8Array.from(data).buffer);
    const levels = stretchLevels(samples);
    const pixels = to8Bit(samples, levels);
    const base = sharp(pixels, { raw: { width: raw.width, height: raw.height, channels: raw.channels } });
    if (grey) base.toColourspace('b-w');
    const [display, thumbnail] = await Promise.all([
      encode(base.clone(), o.displayFormat, o.displayQuality),
      thumbnailOf(base.clone(), o.thumbnailSize, o.thumbnailQuality),
    ]);
    return { display, thumbnail, levels };
  }

  const base = sharp(input, inputOptions).rotate();
  // A JPEG cannot carry transparency; microscope exports with alpha are opaque anyway.
  if (info.hasAlpha) base.flatten({ background: '#ffffff' });
  // Keep greyscale fields single-channel (sharp would otherwise widen them to sRGB).
  if (grey) base.toColourspace('b-w');
  // JPEG and WebP shrink on load (a JPEG by DCT scaling), so their thumbnail costs a
  // few ms from the original and runs beside the display encode on the other core.
  // PNG and TIFF have no such shortcut: a second decode would cost as much as the
  // first, so their thumbnail comes from the finished display JPEG instead.
  if (info.format === 'jpeg' || info.format === 'webp' || o.displayFormat !== 'jpeg') {
    const [display, thumbnail] = await Promise.all([
      encode(base.clone(), o.displayFormat, o.displayQuality),
      thumbnailOf(base.clone(), o.thumbnailSize, o.thumbnailQuality),
    ]);
    return { display, thumbnail, levels: null };
  }
  const display = await encode(base.clone(), o.displayFormat, o.displayQuality);
  const thumbnail = await thumbnailOf(sharp(display.buffer), o.thumbnailSize, o.thumbnailQuality);
  return { display, thumbnail, levels: null };
}
