/**
 * Writers for spectra: JCAMP-DX 4.24 (the open IUPAC exchange format, McDonald & Wilks,
 * Appl. Spectrosc. 42, 151 (1988)) with ##XYDATA=(X++(Y..Y)) in plain AFFN numbers,
 * and a two-column CSV. Both read back through parseSpectrumFile.
 */
import type { Spectrum } from './types';

export interface JcampMeta {
  title: string;
  /** ##ORIGIN and ##OWNER are required by JCAMP-DX 4.24. */
  origin?: string;
  owner?: string;
  /** Written as ##$OSCILLAB NOTE= records (user-defined labels start with ##$). */
  notes?: string[];
  /** Further user-defined records, written as ##$KEY=value. */
  custom?: Record<string, string | number>;
  /** Y scale; integers in the data are y / yFactor. Chosen from the data when omitted. */
  yFactor?: number;
  /** Longest data line, characters (the standard asks for at most 80). */
  maxLineLength?: number;
}

/** Shortest decimal text for a number, without floating-point dust beyond 9 significant digits. */
function num(v: number): string {
  if (v === 0) return '0';
  const s = String(Number(v.toPrecision(12)));
  return s.replace('e', 'E');
}

/** A power of ten that keeps about six significant digits for the largest |y|. */
export function defaultYFactor(y: ArrayLike<number>): number {
  let max = 0;
  for (let i = 0; i < y.length; i++) max = Math.max(max, Math.abs(y[i]));
  if (max === 0 || !Number.isFinite(max)) return 1;
  const exp = Math.ceil(Math.log10(max)) - 6;
  return Number(`1e${exp}`);
}

/** Point spacing when the grid is even (to 1 part in 10⁴ of the step), else null. */
export function evenSpacing(x: ArrayLike<number>): number | null {
  const n = x.length;
  if (n < 2) return null;
  const dx = (x[n - 1] - x[0]) / (n - 1);
  if (!(Math.abs(dx) > 0)) return null;
  for (let i = 1; i < n; i++) {
    if (Math.abs(x[i] - (x[0] + i * dx)) > 1e-4 * Math.abs(dx)) return null;
  }
  return dx;
}

/** One labelled record; long text values continue on following lines to keep lines within 80 characters. */
function record(label: string, value: string | number, maxLen = 80): string {
  const text = String(value)
    .replace(/[\r\n]+/g, ' ')
    .replace(/##/g, '# #')
    .replace(/\$\$/g, '$ $');
  const head = `##${label}=`;
  if (head.length + text.length <= maxLen) return head + text;
  const lines: string[] = [];
  let current = head;
  for (const word of text.split(' ')) {
    if (current.length > head.length && current.length + 1 + word.length > maxLen) {
      lines.push(current);
      current = word;
    } else current = current === head ? head + word : `${current} ${word}`;
  }
  lines.push(current);
  return lines.join('\n');
}

/** Writes a JCAMP-DX 4.24 infrared spectrum. Throws when the points are not evenly spaced. */
export function toJcampDx(spectrum: Spectrum, meta: JcampMeta): string {
  const { x, y } = spectrum;
  const n = x.length;
  if (n !== y.length || n < 2) throw new RangeError('toJcampDx: x and y must have the same length (≥ 2).');
  const dx = evenSpacing(x);
  if (dx === null) throw new RangeError('toJcampDx: (X++(Y..Y)) needs evenly spaced wavenumbers.');
  const yFactor = meta.yFactor ?? defaultYFactor(y);
  const maxLen = meta.maxLineLength ?? 80;
  const ints = Array.from(y, (v) => Math.round(v / yFactor));
  const out: string[] = [
    record('TITLE', meta.title, Infinity),
    record('JCAMP-DX', '4.24'),
    record('DATA TYPE', 'INFRARED SPECTRUM'),
    record('ORIGIN', meta.origin ?? 'Oscillab'),
    record('OWNER', meta.owner ?? 'Oscillab'),
  ];
  for (const note of meta.notes ?? []) out.push(record('$OSCILLAB NOTE', note));
  for (const [k, v] of Object.entries(meta.custom ?? {})) out.push(record(`$${k.toUpperCase()}`, v));
  out.push(
    record('XUNITS', '1/CM'),
    record('YUNITS', spectrum.yKind === 'absorbance' ? 'ABSORBANCE' : 'TRANSMITTANCE'),
    record('XFACTOR', '1'),
    record('YFACTOR', num(yFactor)),
    record('FIRSTX', num(x[0])),
    record('LASTX', num(x[n - 1])),
    record('DELTAX', num(dx)),
    record('NPOINTS', n),
    record('FIRSTY', num(ints[0] * yFactor)),
    record('XYDATA', '(X++(Y..Y))'),
  );
  let i = 0;
  while (i < n) {
    let line = num(x[0] + i * dx);
    let count = 0;
    while (i < n) {
      const piece = ` ${ints[i]}`;
      if (count > 0 && line.length + piece.length > maxLen) break;
      line += piece;
      i++;
      count++;
    }
    out.push(line);
  }
  out.push('##END=');
  return `${out.join('\n')}\n`;
}

export interface CsvOptions {
  /** Lines written first, each prefixed with "# ". */
  comments?: string[];
  /** Significant digits for y (x keeps up to 6 decimals). */
  digits?: number;
}

/** Two-column CSV with a header: wavenumber (cm-1), then absorbance or transmittance. */
export function toCsv(spectrum: Spectrum, options: CsvOptions = {}): string {
  const digits = options.digits ?? 7;
  const out = (options.comments ?? []).map((c) => `# ${c.replace(/[\r\n]+/g, ' ')}`);
  out.push(`wavenumber (cm-1),${spectrum.yKind}`);
  for (let i = 0; i < spectrum.x.length; i++) {
    out.push(`${String(Math.round(spectrum.x[i] * 1e6) / 1e6)},${String(Number(spectrum.y[i].toPrecision(digits)))}`);
  }
  return `${out.join('\n')}\n`;
}
