/**
 * The feedback PDF embeds one font subset prepared once per process (lib/pdf/fonts.ts) and falls
 * back to pdf-lib's own per-document subset, about ten times slower, when the text has a character
 * outside it. Everything Oscillab writes in its own words must therefore be inside the shared
 * subset; only students' and staff's own text (a name in another script, say) may fall back.
 */
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import fontkit from '@pdf-lib/fontkit';
import { PDFDocument } from 'pdf-lib';
import { QUANTITIES, SLIPS, speciesDisplay } from '@/lib/grading';
import { VERDICT_INFO } from '@/lib/marking/verdict';
import { SPECTRUM_VERDICT } from '@/lib/submissions/spectrum-analysis-view';
import { coversText, embedFonts, isSharedFont } from '@/lib/pdf/fonts';

const uncovered = async (texts: string[]) => {
  const missing = new Set<string>();
  for (const text of texts)
    for (const ch of text) if (!(await coversText(ch))) missing.add(`${ch} (U+${ch.codePointAt(0)!.toString(16).toUpperCase()})`);
  return [...missing];
};

describe('the shared font subset', () => {
  it("covers every word Oscillab prints itself: quantity names and units, slips, verdicts, species and the PDF's template", async () => {
    const template = fs.readFileSync(path.resolve('templates/pdf/feedback.txt'), 'utf8');
    const texts = [
      template,
      ...Object.values(QUANTITIES).flatMap((q) => [q.label, q.displayUnit, q.siUnit]),
      ...Object.values(SLIPS).flatMap((s) => [s.title, s.explanation, s.formula]),
      ...Object.values(VERDICT_INFO).flatMap((v) => [v.word, v.symbol]),
      ...Object.values(SPECTRUM_VERDICT).flatMap((v) => [v.word, v.symbol]),
      ...['H35Cl', 'H37Cl', 'D35Cl', 'D37Cl', 'H79Br', 'H81Br', 'D79Br', '12C16O', '13C16O', 'H127I'].map(speciesDisplay),
    ];
    expect(await uncovered(texts)).toEqual([]);
  });

  it('is used for a document in those words, and a name outside it falls back to a per-document subset', async () => {
    const shared = await PDFDocument.create();
    const words = `${QUANTITIES.Be.label}, ${QUANTITIES.re.label}: Zoë Ångström-Łukasiewicz`;
    expect(isSharedFont((await embedFonts(shared, ['regular'], words)).regular)).toBe(true);
    const other = await PDFDocument.create();
    other.registerFontkit(fontkit);
    expect(isSharedFont((await embedFonts(other, ['regular'], `${words}, 王小明`)).regular)).toBe(false);
  });
});
