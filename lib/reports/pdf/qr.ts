import QRCode from 'qrcode';

/** Quiet zone around the symbol, in modules (ISO/IEC 18004 asks for 4). */
export const QR_QUIET_ZONE = 4;

/**
 * The QR symbol for `text` as one SVG path of its dark modules, for
 * react-pdf's <Path>. Vector, so it prints sharp at any size. Error correction M (15 %) survives
 * a crease or a smudge on a printed report.
 */
export function qrPath(text: string): { size: number; d: string } {
  const { modules } = QRCode.create(text, { errorCorrectionLevel: 'M' });
  const n = modules.size;
  const parts: string[] = [];
  // One rectangle per run of dark modules in a row: fewer path segments and no seams inside a run.
  for (let row = 0; row < n; row++) {
    let col = 0;
    while (col < n) {
      if (!modules.get(row, col)) {
        col++;
        continue;
      }
      const start = col;
      while (col < n && modules.get(row, col)) col++;
      const run = col - start;
      parts.push(`M${start + QR_QUIET_ZONE} ${row + QR_QUIET_ZONE}h${run}v1h-${run}z`);
    }
  }
  return { size: n + 2 * QR_QUIET_ZONE, d: parts.join('') };
}
