/**
 * WOFF 1.0 → plain SFNT (TrueType/OpenType) in memory, following the W3C WOFF File Format 1.0
 * Recommendation (2012), sections 3–5: a 44-byte header, a 20-byte directory entry per table, each
 * table zlib-compressed unless its compressed length equals its original length.
 *
 * Why: fontkit (inside react-pdf) inflates a WOFF's whole `glyf` table again for every glyph it
 * reads, which made a three-page report take seconds. Handing it the SFNT once removes that.
 * Written here because no well-known package does just this; the test compares every glyph's
 * metrics of the result with the WOFF as fontkit reads it.
 */
import { inflateSync } from 'node:zlib';

const WOFF_SIGNATURE = 0x774f4646; // 'wOFF'
const WOFF_HEADER = 44;
const WOFF_ENTRY = 20;
const SFNT_HEADER = 12;
const SFNT_ENTRY = 16;

const pad4 = (n: number) => (n + 3) & ~3;

export function woffToSfnt(woff: Buffer): Buffer {
  if (woff.length < WOFF_HEADER || woff.readUInt32BE(0) !== WOFF_SIGNATURE) throw new Error('not a WOFF 1.0 font');
  const flavor = woff.readUInt32BE(4);
  const numTables = woff.readUInt16BE(12);
  if (woff.length < WOFF_HEADER + numTables * WOFF_ENTRY) throw new Error('WOFF table directory is cut short');

  const tables: { tag: number; checksum: number; data: Buffer }[] = [];
  for (let i = 0; i < numTables; i++) {
    const at = WOFF_HEADER + i * WOFF_ENTRY;
    const tag = woff.readUInt32BE(at);
    const offset = woff.readUInt32BE(at + 4);
    const compLength = woff.readUInt32BE(at + 8);
    const origLength = woff.readUInt32BE(at + 12);
    const checksum = woff.readUInt32BE(at + 16);
    if (offset + compLength > woff.length) throw new Error('WOFF table lies outside the file');
    const raw = woff.subarray(offset, offset + compLength);
    const data = compLength < origLength ? inflateSync(raw) : Buffer.from(raw);
    if (data.length !== origLength) throw new Error('WOFF table has the wrong length after decompression');
    tables.push({ tag, checksum, data });
  }

  // The SFNT directory wants its tables sorted by tag (OpenType spec, "Table Directory").
  tables.sort((a, b) => a.tag - b.tag);
  const entrySelector = Math.floor(Math.log2(numTables));
  const searchRange = 2 ** entrySelector * 16;
  let size = SFNT_HEADER + numTables * SFNT_ENTRY;
  for (const t of tables) size += pad4(t.data.length);

  const out = Buffer.alloc(size);
  out.writeUInt32BE(flavor, 0);
  out.writeUInt16BE(numTables, 4);
  out.writeUInt16BE(searchRange, 6);
  out.writeUInt16BE(entrySelector, 8);
  out.writeUInt16BE(numTables * 16 - searchRange, 10);
  let offset = SFNT_HEADER + numTables * SFNT_ENTRY;
  tables.forEach((t, i) => {
    const at = SFNT_HEADER + i * SFNT_ENTRY;
    out.writeUInt32BE(t.tag, at);
    out.writeUInt32BE(t.checksum, at + 4);
    out.writeUInt32BE(offset, at + 8);
    out.writeUInt32BE(t.data.length, at + 12);
    t.data.copy(out, offset);
    offset += pad4(t.data.length);
  });
  return out;
}
