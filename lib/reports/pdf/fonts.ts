/**
 * The app's own typeface (Inter) for the PDF. react-pdf reads TTF and WOFF, not WOFF2, so the
 * files come from @fontsource/inter's .woff files. Fontsource splits Inter by script; each subset
 * is registered as its own family and the PDF's font stack lists them all, so react-pdf takes a
 * glyph the Latin file lacks (a Polish or Czech owner's name, Greek, Cyrillic, Vietnamese) from the
 * next file. Scripts outside these (e.g. Chinese) have no glyphs here and would print blank.
 *
 * The files are read from node_modules at run time by path: @react-pdf/renderer is a server
 * external package in next.config.mjs, so Next neither bundles it nor moves these files, and the
 * same path works under tsx, vitest and `next start` (all run from the project folder). Set
 * FIELDMARK_PDF_FONT_DIR to serve them from elsewhere.
 */
import fs from 'node:fs';
import path from 'node:path';
import { Font } from '@react-pdf/renderer';
import { woffToSfnt } from './woff';

const SUBSETS = ['latin', 'latin-ext', 'greek', 'cyrillic', 'cyrillic-ext', 'vietnamese'] as const;
/** Regular for text, semibold for labels and headings, bold for the title. */
export const PDF_FONT_WEIGHTS = [400, 600, 700] as const;

/** The font stack every text style uses (first family first). */
export const PDF_FONT_FAMILY: string[] = SUBSETS.map((s) => `Inter ${s}`);

const fileName = (subset: string, weight: number) => `inter-${subset}-${weight}-normal.woff`;

/** Where the .woff files are; throws a message a person can act on when they are missing. */
export function pdfFontDir(): string {
  const candidates = [process.env.FIELDMARK_PDF_FONT_DIR, path.join(process.cwd(), 'node_modules', '@fontsource', 'inter', 'files')].filter(
    (d): d is string => !!d,
  );
  for (const dir of candidates) {
    if (fs.existsSync(path.join(dir, fileName('latin', 400)))) return dir;
  }
  throw new Error(`The PDF fonts were not found (looked in ${candidates.join(', ')}): run npm ci, or set FIELDMARK_PDF_FONT_DIR to the folder of @fontsource/inter's .woff files`);
}

let registered = false;

/** Registers the fonts once per process (react-pdf keeps them in a global store). */
export function registerPdfFonts(): void {
  if (registered) return;
  const dir = pdfFontDir();
  for (const subset of SUBSETS) {
    Font.register({
      family: `Inter ${subset}`,
      // As SFNT in memory (see woff.ts): fontkit reads a WOFF's glyphs many times more slowly.
      fonts: PDF_FONT_WEIGHTS.map((fontWeight) => ({
        src: `data:font/ttf;base64,${woffToSfnt(fs.readFileSync(path.join(dir, fileName(subset, fontWeight)))).toString('base64')}`,
        fontWeight,
      })),
    });
  }
  // Names, class names and codes must never be split with a hyphen.
  Font.registerHyphenationCallback((word) => [word]);
  registered = true;
}
