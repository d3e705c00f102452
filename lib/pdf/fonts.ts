/**
 * Fonts prepared once per process (or worker thread) and reused by every PDF it writes.
 *
 * pdf-lib's own embedding (embedFont with subset: true) parses the whole DejaVu font, lays out
 * every string with OpenType shaping and builds, encodes and compresses a new subset in every
 * document — most of the ~180 ms a feedback PDF took. Here each font is parsed once, and one
 * subset is built once for a fixed repertoire that covers what feedback is written in (Latin,
 * Greek, sub- and superscripts, arrows, mathematical operators, the verdict symbols …); its
 * compressed font program, widths and ToUnicode map are kept and written into each document as
 * they are. Text is encoded by a character-to-glyph table (pdf-lib draws glyphs without kerning
 * anyway, so nothing visible changes).
 *
 * A document whose text has a character outside the repertoire (a student's name in another
 * script, say) falls back to pdf-lib's per-document subset: `coversText` says which to use.
 */
import fs from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';
import fontkit from '@pdf-lib/fontkit';
import {
  beginText,
  endText,
  moveText,
  popGraphicsState,
  pushGraphicsState,
  rgb,
  setFillingColor,
  setFontAndSize,
  showText,
  type Color,
  type Rotation,
  CustomFontEmbedder,
  PDFFont,
  PDFHexString,
  PDFNumber,
  PDFRawStream,
  PDFDocument,
  type PDFContext,
  type PDFName,
  type PDFPage,
  type PDFRef,
} from 'pdf-lib';

/** Unicode blocks in the shared subset (only characters the font has are kept). */
const REPERTOIRE: [number, number][] = [
  [0x20, 0x7e], // Basic Latin
  [0xa0, 0x17f], // Latin-1 and Latin Extended-A (names across Europe)
  [0x300, 0x30f], // combining marks (the tilde of ν̃, accents)
  [0x391, 0x3c9], // Greek letters
  [0x2010, 0x2044], // dashes, quotes, bullets, …, ‰, ′, ⁄
  [0x2070, 0x209c], // superscripts and subscripts, digits and letters (the ₑ of Bₑ, rₑ, ωₑ)
  [0x2103, 0x2103],
  [0x2113, 0x2113],
  [0x212b, 0x212b], // ℃ ℓ Å
  [0x2190, 0x2195], // arrows
  [0x2202, 0x221e],
  [0x2248, 0x2248],
  [0x2260, 0x2265], // ∂ … ∞, ≈, ≠ ≤ ≥
  [0x25cb, 0x25d1], // ○ ● ◐ ◑
  [0x2713, 0x2718], // ✓ ✗
];

const inRepertoire = (cp: number) => REPERTOIRE.some(([a, b]) => cp >= a && cp <= b);

type FontkitFont = Awaited<ReturnType<typeof fontkit.create>>;

interface PreparedFont {
  font: FontkitFont;
  /** Code point → glyph id in the shared subset (0 = .notdef). */
  glyph: Map<number, number>;
  /** Code point → advance width at size 1000. */
  advance: Map<number, number>;
  widths: number[];
  widthNumbers?: PDFNumber[];
  fontFile: Uint8Array;
  fontFileLength: number;
  toUnicode: Uint8Array;
}

export type FontName = 'regular' | 'bold' | 'mono';
const FILES: Record<FontName, string> = { regular: 'DejaVuSans.ttf', bold: 'DejaVuSans-Bold.ttf', mono: 'DejaVuSansMono.ttf' };

let bytesCache: Record<FontName, Buffer> | null = null;
export function loadFontBytes(): Record<FontName, Buffer> {
  if (!bytesCache) {
    const dir = path.join(/*turbopackIgnore: true*/ process.cwd(), 'public', 'fonts');
    bytesCache = {
      regular: fs.readFileSync(path.join(dir, FILES.regular)),
      bold: fs.readFileSync(path.join(dir, FILES.bold)),
      mono: fs.readFileSync(path.join(dir, FILES.mono)),
    };
  }
  return bytesCache;
}

const hex4 = (n: number) => n.toString(16).padStart(4, '0');

function toUnicodeCMap(entries: [number, number][]): string {
  const blocks: string[] = [];
  for (let i = 0; i < entries.length; i += 100) {
    const part = entries.slice(i, i + 100);
    blocks.push(`${part.length} beginbfchar\n${part.map(([gid, cp]) => `<${hex4(gid)}> <${hex4(cp)}>`).join('\n')}\nendbfchar`);
  }
  return [
    '/CIDInit /ProcSet findresource begin',
    '12 dict begin',
    'begincmap',
    '/CIDSystemInfo << /Registry (Adobe) /Ordering (UCS) /Supplement 0 >> def',
    '/CMapName /Adobe-Identity-UCS def',
    '/CMapType 2 def',
    '1 begincodespacerange',
    '<0000><ffff>',
    'endcodespacerange',
    ...blocks,
    'endcmap',
    'CMapName currentdict /CIDInit /ProcSet findresource /defineresource pop',
    'end',
    'end',
  ].join('\n');
}

async function prepare(bytes: Buffer): Promise<PreparedFont> {
  const font = fontkit.create(bytes) as FontkitFont;
  const scale = 1000 / font.unitsPerEm;
  const subset = font.createSubset();
  const glyph = new Map<number, number>();
  const advance = new Map<number, number>();
  const widths: number[] = [];
  const cmap: [number, number][] = [];
  for (const cp of font.characterSet.filter(inRepertoire).sort((a, b) => a - b)) {
    const g = font.glyphForCodePoint(cp);
    if (!g || g.id === 0) continue;
    const id = subset.includeGlyph(g) as number;
    glyph.set(cp, id);
    advance.set(cp, g.advanceWidth * scale);
    if (widths[id - 1] === undefined) {
      widths[id - 1] = g.advanceWidth * scale;
      cmap.push([id, cp]);
    }
  }
  const program = await new Promise<Uint8Array>((resolve, reject) => {
    const parts: Uint8Array[] = [];
    const stream = subset.encodeStream() as unknown as NodeJS.EventEmitter;
    stream
      .on('data', (b: Uint8Array) => parts.push(b))
      .on('end', () => resolve(Buffer.concat(parts)))
      .on('error', reject);
  });
  // Glyphs a composite glyph pulled in have ids after ours; they are drawn only as parts.
  for (let i = 0; i < widths.length; i++) widths[i] ??= 0;
  return {
    font,
    glyph,
    advance,
    widths,
    fontFile: zlib.deflateSync(program),
    fontFileLength: program.byteLength,
    toUnicode: zlib.deflateSync(Buffer.from(toUnicodeCMap(cmap), 'latin1')),
  };
}

const prepared = new Map<FontName, Promise<PreparedFont>>();
function preparedFont(name: FontName): Promise<PreparedFont> {
  let p = prepared.get(name);
  if (!p) {
    p = prepare(loadFontBytes()[name]);
    prepared.set(name, p);
  }
  return p;
}

/** pdf-lib's custom-font embedder, fed from the shared subset instead of building one per document. */
class SharedSubsetEmbedder extends CustomFontEmbedder {
  constructor(private readonly p: PreparedFont) {
    // A six-letter tag marks an embedded subset (PDF 32000-1 9.6.4).
    super(
      p.font as never,
      p.fontFile,
      `${Array.from({ length: 6 }, () => String.fromCharCode(65 + Math.floor(Math.random() * 26))).join('')}+${p.font.postscriptName}`,
    );
  }

  encodeText(text: string): PDFHexString {
    let hex = '';
    for (const ch of text) hex += hex4(this.p.glyph.get(ch.codePointAt(0)!) ?? 0);
    return PDFHexString.of(hex);
  }

  widthOfTextAtSize(text: string, size: number): number {
    let w = 0;
    for (const ch of text) w += this.p.advance.get(ch.codePointAt(0)!) ?? 0;
    return (w * size) / 1000;
  }

  protected async embedFontStream(context: PDFContext): Promise<PDFRef> {
    const dict = context.obj({ Filter: 'FlateDecode', Length1: this.p.fontFileLength });
    return context.register(PDFRawStream.of(dict, this.p.fontFile));
  }

  protected embedUnicodeCmap(context: PDFContext): PDFRef {
    return context.register(PDFRawStream.of(context.obj({ Filter: 'FlateDecode' }), this.p.toUnicode));
  }

  // The widths as PDF numbers, made once per font: context.obj keeps PDF objects as they are,
  // where it would format each of a few hundred numbers again in every document.
  protected computeWidths(): (number | number[])[] {
    this.p.widthNumbers ??= this.p.widths.map((w) => PDFNumber.of(w));
    return [PDFNumber.of(1), this.p.widthNumbers] as unknown as (number | number[])[];
  }
}

/** True for a font embedded from the shared subset. */
export function isSharedFont(font: PDFFont): boolean {
  return (font as unknown as { embedder: unknown }).embedder instanceof SharedSubsetEmbedder;
}

let everyFontHas: Promise<Set<number>> | null = null;

/** True when every character of the text is in the shared subset of all three fonts. */
export async function coversText(text: string): Promise<boolean> {
  // Tab and line breaks never reach a page as glyphs.
  everyFontHas ??= Promise.all((Object.keys(FILES) as FontName[]).map(preparedFont)).then((fonts) => {
    const shared = [...fonts[0].glyph.keys()].filter((cp) => fonts.every((f) => f.glyph.has(cp)));
    return new Set([...shared, 0x09, 0x0a, 0x0d]);
  });
  const covered = await everyFontHas;
  for (const ch of text) if (!covered.has(ch.codePointAt(0)!)) return false;
  return true;
}

/** Embed one of the fonts into a document from the shared subset. */
export async function embedSharedFont(doc: PDFDocument, name: FontName): Promise<PDFFont> {
  const embedder = new SharedSubsetEmbedder(await preparedFont(name));
  const ref = doc.context.nextRef();
  const font = PDFFont.of(ref, doc, embedder);
  // What PDFDocument.embedFont does with a font it made: written out when the document is saved.
  (doc as unknown as { fonts: PDFFont[] }).fonts.push(font);
  return font;
}

/**
 * The named fonts embedded into a document: from the shared subset when every character of
 * `text` (all the document will say) is in it, else as pdf-lib's per-document subsets.
 */
export async function embedFonts<N extends FontName>(doc: PDFDocument, names: readonly N[], text: string): Promise<Record<N, PDFFont>> {
  const shared = await coversText(text);
  const bytes = loadFontBytes();
  const out = {} as Record<N, PDFFont>;
  for (const name of names) out[name] = shared ? await embedSharedFont(doc, name) : await doc.embedFont(bytes[name], { subset: true });
  return out;
}

/**
 * Text widths at size 1, cached across documents per font: fontkit's layout is the slow part
 * of pdf-lib, and the same words recur in every document of a batch.
 */
const widthCache = new Map<string, number>();
export function textWidth(text: string, font: PDFFont, size: number): number {
  if (isSharedFont(font)) return font.widthOfTextAtSize(text, size); // a table lookup per character
  const key = `${font.name}|${text}`;
  let w = widthCache.get(key);
  if (w === undefined) {
    w = font.widthOfTextAtSize(text, 1);
    if (widthCache.size > 50_000) widthCache.clear();
    widthCache.set(key, w);
  }
  return w * size;
}

/** A word wider than the line, cut into pieces that fit (the last piece returned on its own). */
function cutWord(word: string, font: PDFFont, size: number, width: number, out: string[]): string {
  let w = word;
  while (textWidth(w, font, size) > width && w.length > 1) {
    let cut = w.length - 1;
    while (cut > 1 && textWidth(w.slice(0, cut), font, size) > width) cut--;
    out.push(w.slice(0, cut));
    w = w.slice(cut);
  }
  return w;
}

/**
 * Text into lines no wider than `width`: each paragraph (split at newlines) on its own, words
 * split at ordinary spaces only, so a no-break space keeps a number with its unit. With
 * `breakWords`, a word longer than the line is cut by characters; otherwise it overflows.
 */
export function wrap(text: string, font: PDFFont, size: number, width: number, options: { breakWords?: boolean } = {}): string[] {
  const out: string[] = [];
  const space = textWidth(' ', font, size);
  for (const para of text.split('\n')) {
    let line = '';
    let lineWidth = 0;
    for (const word of para.split(/[ \t\r\f\v]+/).filter(Boolean)) {
      const ww = textWidth(word, font, size);
      if (line && lineWidth + space + ww <= width) {
        line = `${line} ${word}`;
        lineWidth += space + ww;
        continue;
      }
      if (line) out.push(line);
      line = options.breakWords && ww > width ? cutWord(word, font, size, width, out) : word;
      lineWidth = line === word ? ww : textWidth(line, font, size);
    }
    out.push(line);
  }
  return out;
}

type TextOptions = { font: PDFFont; size: number; x: number; y: number; color?: Color; rotate?: Rotation };
const pageFontNames = new WeakMap<PDFPage, Map<PDFFont, PDFName>>();
const BLACK = rgb(0, 0, 0);

/**
 * Draw one line of text in a font, at (x, y). pdf-lib's drawText({ font }) adds the font to the
 * page's resources under a new name on every call, and once more to restore the font before it,
 * checking each new name against all the names already there: a page with a few hundred table
 * cells spends longer naming fonts than drawing, and carries hundreds of resource entries. Here
 * each font is added to a page once and then used by its name, and a line is written as the few
 * operators it needs (colour, font, position, text) rather than through drawText's general path
 * (line breaking, rotation and skew matrices). Rotated text still goes through drawText. (pdf-lib
 * keeps the current font in the page's private `font` and `fontKey`; pdf-lib is pinned.)
 */
export function drawTextIn(page: PDFPage, text: string, { font, size, x, y, color = BLACK, rotate }: TextOptions): void {
  const current = page as unknown as { font?: PDFFont; fontKey?: PDFName };
  let names = pageFontNames.get(page);
  if (!names) pageFontNames.set(page, (names = new Map()));
  let name = names.get(font);
  if (!name) {
    page.setFont(font);
    names.set(font, (name = current.fontKey!));
  }
  // What drawText does to a line before it draws it: tabs and line separators become spaces.
  const line = text.replace(/\t|\u0085|\u2028|\u2029/g, '    ').replace(/[\b\v\r\n]/g, '');
  if (rotate) {
    current.font = font;
    current.fontKey = name;
    page.drawText(line, { x, y, size, color, rotate });
    return;
  }
  page.pushOperators(
    pushGraphicsState(),
    beginText(),
    setFillingColor(color),
    setFontAndSize(name, size),
    moveText(x, y),
    showText(font.encodeText(line)),
    endText(),
    popGraphicsState(),
  );
}
