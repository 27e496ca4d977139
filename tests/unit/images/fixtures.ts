// Small test images made with sharp at run time (no binary fixtures in the repo).
import { crc32 } from 'node:zlib';
import sharp, { type Sharp } from 'sharp';

/** A gradient so encoders have real content, not one flat colour. */
export async function rgbImage(width: number, height: number): Promise<Sharp> {
  const px = Buffer.alloc(width * height * 3);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const o = (y * width + x) * 3;
      px[o] = (x * 255) / width;
      px[o + 1] = (y * 255) / height;
      px[o + 2] = ((x + y) * 97) % 256;
    }
  }
  return sharp(px, { raw: { width, height, channels: 3 } });
}

export const jpegOf = async (w: number, h: number) => (await rgbImage(w, h)).jpeg({ quality: 90 }).toBuffer();
export const pngOf = async (w: number, h: number) => (await rgbImage(w, h)).png().toBuffer();
export const tiffOf = async (w: number, h: number) => (await rgbImage(w, h)).tiff({ compression: 'lzw' }).toBuffer();
export const webpOf = async (w: number, h: number) => (await rgbImage(w, h)).webp().toBuffer();

/** 16-bit greyscale TIFF whose samples run from `low` to `high` (a 12-bit camera by default). */
export async function grey16Tiff(width: number, height: number, low = 1000, high = 3000): Promise<Buffer> {
  const samples = new Uint16Array(width * height);
  for (let i = 0; i < samples.length; i++) samples[i] = low + Math.round(((high - low) * (i % width)) / (width - 1));
  return sharp(samples, { raw: { width, height, channels: 1 } }).toColourspace('grey16').tiff({ compression: 'lzw' }).toBuffer(); // sharp's default TIFF compression is JPEG, which is 8-bit only
}

/** A valid PNG whose header claims width × height: decoding it would need that many pixels. */
export async function pngClaiming(width: number, height: number): Promise<Buffer> {
  const b = Buffer.from(await sharp({ create: { width: 8, height: 8, channels: 3, background: '#000' } }).png().toBuffer());
  b.writeUInt32BE(width, 16);
  b.writeUInt32BE(height, 20);
  b.writeUInt32BE(crc32(b.subarray(12, 29)), 29); // IHDR CRC covers type + data
  return b;
}
