import fs from 'node:fs';
import path from 'node:path';
import * as fontkit from 'fontkit';
import { describe, expect, it } from 'vitest';
import { pdfFontDir } from '@/lib/reports/pdf/fonts';
import { woffToSfnt } from '@/lib/reports/pdf/woff';

// fontkit (the font engine inside react-pdf, from the registry) reads both forms: the converted
// font must be the same font, glyph for glyph.
describe('WOFF to SFNT', () => {
  for (const file of ['inter-latin-400-normal.woff', 'inter-greek-600-normal.woff', 'inter-cyrillic-700-normal.woff']) {
    it(`keeps every glyph of ${file}`, () => {
      const woffBytes = fs.readFileSync(path.join(pdfFontDir(), file));
      const woff = fontkit.create(woffBytes) as fontkit.Font;
      const sfnt = fontkit.create(woffToSfnt(woffBytes)) as fontkit.Font;
      expect(woff.type).toBe('WOFF');
      expect(sfnt.type).toBe('TTF');
      expect(sfnt.numGlyphs).toBe(woff.numGlyphs);
      expect(sfnt.postscriptName).toBe(woff.postscriptName);
      expect(sfnt.characterSet).toEqual(woff.characterSet);
      for (let id = 0; id < woff.numGlyphs; id++) {
        const a = woff.getGlyph(id);
        const b = sfnt.getGlyph(id);
        expect(b.advanceWidth).toBe(a.advanceWidth);
        expect(b.path.toSVG()).toBe(a.path.toSVG());
      }
      const text = 'Thistlewick Lantern 30.8 %';
      expect(sfnt.layout(text).glyphs.map((g) => g.id)).toEqual(woff.layout(text).glyphs.map((g) => g.id));
    }, 20_000);
  }

  it('refuses what is not a WOFF file', () => {
    expect(() => woffToSfnt(Buffer.from('not a font at all, just some text here to pass the length check'))).toThrow(/not a WOFF/);
    const woff = fs.readFileSync(path.join(pdfFontDir(), 'inter-latin-400-normal.woff'));
    expect(() => woffToSfnt(woff.subarray(0, 60))).toThrow(/cut short|outside/);
  });
});
