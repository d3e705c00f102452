/**
 * Reads an uploaded spectrum (JCAMP-DX via jcampconverter, or two-column CSV via
 * papaparse) into a Spectrum: wavenumber ascending in cm⁻¹, absorbance or
 * transmittance as a fraction. Never throws; a failure comes back as a message that
 * can be shown to the student as it is.
 */
import { convert } from 'jcampconverter';
import Papa from 'papaparse';
import type { Spectrum, YKind } from './types';

export type { Spectrum, YKind } from './types';

export const SPECTRUM_MAX_POINTS = 200_000;
const MIN_POINTS = 10;
/** A CSV row of a spectrum is two numbers; a row this long is not one (and papaparse would build it whole). */
export const CSV_MAX_LINE_CHARS = 1_000;
/** Heading and comment rows allowed on top of the points. */
const CSV_EXTRA_ROWS = 1_000;

export type SpectrumParse = { ok: true; spectrum: Spectrum; warnings: string[] } | { ok: false; message: string };

export interface ParseSpectrumOptions {
  maxPoints?: number;
}

function maxOf(v: ArrayLike<number>): number {
  let m = -Infinity;
  for (let i = 0; i < v.length; i++) if (v[i] > m) m = v[i];
  return m;
}

const fail = (message: string): SpectrumParse => ({ ok: false, message });

type XUnit = 'wavenumber' | 'micrometre' | 'nanometre';

function xUnitOf(text: string | undefined): XUnit | null {
  const t = (text ?? '').trim().toUpperCase().replace(/\s+/g, '');
  if (t === '' || /^(1\/CM|CM-1|CM\^-1|CM⁻¹|\/CM|WAVENUMBERS?(\(1\/CM\)|\(CM-1\))?|WAVENUMBER\/CM-1)$/.test(t)) return 'wavenumber';
  if (/^(MICROMETERS?|MICRONS?|UM|µM|ΜM)$/.test(t)) return 'micrometre';
  if (/^(NANOMETERS?|NM)$/.test(t)) return 'nanometre';
  return null;
}

type YUnit = { kind: YKind; percent: boolean } | null;

function yUnitOf(text: string | undefined): YUnit {
  const t = (text ?? '').trim().toUpperCase();
  if (t === '') return null;
  if (/ABSORBANCE|^A$|^ABS$/.test(t)) return { kind: 'absorbance', percent: false };
  if (/%|PERCENT/.test(t) && /T/.test(t)) return { kind: 'transmittance', percent: true };
  if (/TRANSMITTANCE|^T$/.test(t)) return { kind: 'transmittance', percent: false };
  return null;
}

/**
 * Infers absorbance or transmittance from the values when the file does not say.
 * Absorption lines rise from a baseline near 0 in absorbance and dip from a baseline
 * near 1 (or 100 %) in transmittance; the median sits on the baseline.
 */
function inferY(y: number[]): { kind: YKind; percent: boolean } {
  const sorted = Float64Array.from(y).sort();
  const median = sorted[Math.floor(sorted.length / 2)];
  const max = sorted[sorted.length - 1];
  if (median > 50 && max <= 105) return { kind: 'transmittance', percent: true };
  if (median > 0.5 && max <= 1.05) return { kind: 'transmittance', percent: false };
  return { kind: 'absorbance', percent: false };
}

/** Puts the data in the shape Oscillab uses: cm⁻¹ ascending, fraction transmittance. */
function finish(
  xIn: ArrayLike<number>,
  yIn: ArrayLike<number>,
  xUnit: XUnit,
  yUnit: { kind: YKind; percent: boolean },
  title: string,
  warnings: string[],
  maxPoints: number,
): SpectrumParse {
  const n = xIn.length;
  if (n !== yIn.length) return fail(`The spectrum has ${n} wavenumbers but ${yIn.length} intensities.`);
  if (n > maxPoints) return fail(`The spectrum has ${n} points; at most ${maxPoints} are accepted. Export it at a coarser spacing.`);
  if (n < MIN_POINTS) return fail(`The spectrum has only ${n} point${n === 1 ? '' : 's'}; a band needs at least ${MIN_POINTS}.`);
  const x = new Array<number>(n);
  const y = new Array<number>(n);
  for (let i = 0; i < n; i++) {
    const xi = xIn[i];
    const yi = yIn[i];
    if (!Number.isFinite(xi) || !Number.isFinite(yi)) return fail(`Point ${i + 1} of the spectrum is not a finite number.`);
    if (xUnit !== 'wavenumber' && xi <= 0) return fail(`Point ${i + 1} has a wavelength ≤ 0, which cannot be converted to a wavenumber.`);
    x[i] = xUnit === 'micrometre' ? 1e4 / xi : xUnit === 'nanometre' ? 1e7 / xi : xi;
    y[i] = yUnit.percent ? yi / 100 : yi;
  }
  if (xUnit !== 'wavenumber') warnings.push(`Wavelengths were converted to wavenumbers (cm⁻¹).`);
  let ascending = true;
  let descending = true;
  for (let i = 1; i < n; i++) {
    if (x[i] <= x[i - 1]) ascending = false;
    if (x[i] >= x[i - 1]) descending = false;
  }
  if (!ascending) {
    if (descending) {
      x.reverse();
      y.reverse();
    } else {
      const order = x.map((_, i) => i).sort((a, b) => x[a] - x[b]);
      const xs = order.map((i) => x[i]);
      const ys = order.map((i) => y[i]);
      for (let i = 1; i < n; i++) {
        if (xs[i] === xs[i - 1]) return fail(`The wavenumber ${xs[i]} cm⁻¹ appears twice in the spectrum.`);
      }
      warnings.push('The points were not in wavenumber order and have been sorted.');
      for (let i = 0; i < n; i++) {
        x[i] = xs[i];
        y[i] = ys[i];
      }
    }
  }
  if (x[0] <= 0) return fail('The spectrum has wavenumbers ≤ 0 cm⁻¹.');
  let ymin = Infinity;
  let ymax = -Infinity;
  for (const v of y) {
    if (v < ymin) ymin = v;
    if (v > ymax) ymax = v;
  }
  if (ymax === ymin) return fail('Every point of the spectrum has the same intensity; there is no band to read.');
  if (yUnit.kind === 'transmittance' && ymin < -0.05) warnings.push('Some transmittance values are below 0.');
  return { ok: true, spectrum: { x, y, yKind: yUnit.kind, title }, warnings };
}

/** Characters the JCAMP-DX ASDF and AFFN forms may use inside ##XYDATA (after $$ comments are cut). */
const XYDATA_ALPHABET = /^[0-9+\-., \t@A-Za-s%?]*$/;

function xydataProblem(text: string): string | null {
  const m = /##XYDATA\s*=[^\n]*\n([\s\S]*?)(?=##)/i.exec(text);
  if (!m) return null;
  const body = m[1].split(/\r\n|\r|\n/);
  const start = text.slice(0, m.index).split('\n').length + 1;
  for (let i = 0; i < body.length; i++) {
    const row = body[i].replace(/\$\$.*$/, '');
    if (!XYDATA_ALPHABET.test(row)) {
      return `Line ${start + i} of the JCAMP-DX file is not spectrum data: "${row.trim().slice(0, 40)}".`;
    }
  }
  return null;
}

/** Labels whose records hold numbers that the converter expands (ASDF compression included). */
const DATA_LABEL = /^##\s*(XYDATA|XYPOINTS|PEAK\s*TABLE|DATA\s*TABLE|PEAKTABLE)\s*=/i;
/**
 * One token of a JCAMP-DX data line: SQZ or DIF value (a letter and its digits), DUP count (S–Z, s
 * and digits), an AFFN number, or "?" for a missing value.
 */
const ASDF_TOKEN = /([@A-Ia-i%J-Rj-r])[\d.]*|([S-Zs])(\d*)|[+-]?(?:\d+\.?\d*|\.\d+)(?:[Ee][+-]?\d+)?|\?/g;
const DUP_DIGIT: Record<string, number> = { S: 1, T: 2, U: 3, V: 4, W: 5, X: 6, Y: 7, Z: 8, s: 9 };

/**
 * Counts the values the data records will expand to, without expanding them. DUP compression lets
 * one short line stand for any number of points ("A0T00000000" is 200 million zeros), and the
 * converter builds every point before its length could be checked; so the count comes first, and
 * stops as soon as it passes `limit`. Each line's first token is its abscissa and is not counted;
 * the Y-check value that repeats across DIF lines is counted, so this errs on the high side by at
 * most one point per line.
 */
export function countJcampValues(text: string, limit: number): number {
  let total = 0;
  let inData = false;
  let start = 0;
  while (start <= text.length) {
    let end = text.indexOf('\n', start);
    if (end === -1) end = text.length;
    const line = text.slice(start, end);
    start = end + 1;
    const t = line.trimStart();
    if (t.startsWith('##')) {
      inData = DATA_LABEL.test(t);
      continue;
    }
    if (!inData) continue;
    const row = line.replace(/\$\$.*$/, '');
    let first = true;
    ASDF_TOKEN.lastIndex = 0;
    for (let m = ASDF_TOKEN.exec(row); m; m = ASDF_TOKEN.exec(row)) {
      if (m[0] === '') {
        ASDF_TOKEN.lastIndex++;
        continue;
      }
      if (first) {
        first = false;
        continue;
      }
      if (m[2] !== undefined) {
        // DUP: the previous value appears this many times in all, so count - 1 more.
        const digits = m[3].replace(/^0+(?=\d)/, '');
        const count = digits.length > 12 ? Infinity : Number(`${DUP_DIGIT[m[2]]}${m[3]}`);
        total += Math.max(0, count - 1);
      } else {
        total += 1;
      }
      if (total > limit) return total;
    }
  }
  return total;
}

function headerValue(text: string, label: string): string | undefined {
  // [ \t]* rather than \s*: a pattern that may cross newlines turns quadratic on blank-line padding.
  const m = new RegExp(String.raw`^[ \t]*##[ \t]*${label}[ \t]*=[ \t]*(.*)$`, 'im').exec(text);
  return m ? m[1].trim() : undefined;
}

/** A single spectrum has a few dozen labelled records; more means a damaged or hostile file. */
const JCAMP_MAX_RECORDS = 1000;

function parseJcamp(raw: string, maxPoints: number): SpectrumParse {
  // Blank-line runs carry nothing in JCAMP-DX, and jcampconverter slows down badly on them.
  const text = raw.replace(/\r\n?/g, '\n').replace(/\n[ \t]*(?=\n)/g, '');
  let records = 0;
  for (let i = text.indexOf('##'); i !== -1; i = text.indexOf('##', i + 2)) {
    if (i === 0 || text.charCodeAt(i - 1) === 10) records++;
  }
  if (records > JCAMP_MAX_RECORDS) {
    return fail(`The JCAMP-DX file has ${records} labelled records; a single spectrum has a few dozen. Export one spectrum only.`);
  }
  if (!/^\s*##\s*TITLE\s*=/i.test(text.replace(/^\uFEFF/, ''))) return fail('This is not a JCAMP-DX file: it must start with ##TITLE=.');
  // Refuse oversized files before the converter expands them.
  const declared = Number(headerValue(text, 'NPOINTS'));
  if (Number.isFinite(declared) && declared > maxPoints) {
    return fail(`The spectrum declares ${declared} points (##NPOINTS); at most ${maxPoints} are accepted.`);
  }
  if (/##\s*(XYPOINTS|PEAK\s*TABLE)\s*=/i.test(text) && !/##\s*XYDATA\s*=/i.test(text)) {
    return fail('The JCAMP-DX file holds a peak table or point list, not a full spectrum (##XYDATA=). Export the whole spectrum.');
  }
  if (/##\s*(NTUPLES|DATA\s*TABLE)\s*=/i.test(text)) {
    return fail('The JCAMP-DX file holds a multi-dimensional data table (##NTUPLES); export a single infrared spectrum with ##XYDATA.');
  }
  const bad = xydataProblem(raw); // line numbers as in the file the student has
  if (bad) return fail(bad);
  // The data lines' own count, before anything is expanded (a checked Y value may repeat per line).
  const lines = text.split('\n').length;
  const counted = countJcampValues(text, maxPoints + lines);
  if (counted > maxPoints + lines) {
    return fail(
      `The spectrum's data expand to more than ${maxPoints} points (JCAMP-DX compression); at most ${maxPoints} are accepted. Export it at a coarser spacing.`,
    );
  }
  let result;
  try {
    result = convert(text);
  } catch (e) {
    return fail(`The JCAMP-DX file could not be read (${e instanceof Error ? e.message : 'unknown error'}).`);
  }
  const warnings: string[] = [];
  const entries = result.flatten.filter((e) => e.spectra.some((s) => s.isXYdata && s.data?.x?.length > 0));
  if (entries.length === 0) return fail('The JCAMP-DX file has no ##XYDATA spectrum in it.');
  if (entries.length > 1) warnings.push(`The file holds ${entries.length} spectra; the first was used.`);
  const entry = entries[0];
  const sp = entry.spectra.find((s) => s.isXYdata && s.data.x.length > 0)!;
  const n = sp.data.x.length;
  if (typeof sp.nbPoints === 'number' && sp.nbPoints !== n) {
    return fail(
      `The JCAMP-DX file declares ${sp.nbPoints} points (##NPOINTS) but its data holds ${n}; the data are damaged or incomplete.`,
    );
  }
  const xu = xUnitOf(sp.xUnits);
  if (!xu) return fail(`The x axis is in ${sp.xUnits}; Oscillab reads infrared spectra in 1/CM (or micrometres).`);
  let yu = yUnitOf(sp.yUnits);
  if (!yu) {
    yu = inferY(sp.data.y);
    warnings.push(
      `The y units "${sp.yUnits ?? ''}" are not absorbance or transmittance; read as ${yu.percent ? 'percent ' : ''}${yu.kind} from the values.`,
    );
  } else if (yu.kind === 'transmittance' && !yu.percent) {
    // Many instruments write YUNITS=TRANSMITTANCE with values in percent.
    if (maxOf(sp.data.y) > 1.5) yu = { kind: 'transmittance', percent: true };
  }
  const title = String(entry.title ?? headerValue(text, 'TITLE') ?? '').trim();
  return finish(sp.data.x, sp.data.y, xu, yu, title, warnings, maxPoints);
}

function readCsvNumber(cell: string, decimalComma: boolean): number {
  let t = (cell ?? '').trim();
  if (decimalComma) t = t.replace(',', '.');
  return /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/.test(t) ? Number(t) : NaN;
}

/** Refuses, before any splitting, a file with rows too long or too many to be a spectrum. */
function csvShapeProblem(body: string, maxPoints: number): string | null {
  const maxRows = maxPoints + CSV_EXTRA_ROWS;
  let rows = 0;
  let start = 0;
  // One pass over the characters (searching for \r and \n separately would rescan the rest of the file per line).
  for (let i = 0; i <= body.length; i++) {
    const c = i < body.length ? body.charCodeAt(i) : 10;
    if (c !== 10 && c !== 13) continue;
    if (i === body.length && start === i) break;
    rows++;
    if (i - start > CSV_MAX_LINE_CHARS) {
      return `Line ${rows} of the CSV file is ${i - start} characters long; a spectrum row is two numbers (at most ${CSV_MAX_LINE_CHARS} characters).`;
    }
    if (rows > maxRows)
      return `The CSV file has more than ${maxRows} lines; a spectrum of at most ${maxPoints} points needs fewer. Export it at a coarser spacing.`;
    if (c === 13 && body.charCodeAt(i + 1) === 10) i++;
    start = i + 1;
  }
  return null;
}

function parseCsv(text: string, maxPoints: number): SpectrumParse {
  const body = text.replace(/^\uFEFF/, '');
  const shape = csvShapeProblem(body, maxPoints);
  if (shape) return fail(shape);
  // The separator is read from data rows only: headings and comments may hold any punctuation.
  const probe = body
    .slice(0, 16384)
    .split(/\r\n|\r|\n/)
    .filter((r) => /^\s*"?[+-]?[\d.]/.test(r))
    .slice(0, 50)
    .join('\n');
  const delimiter = probe.includes('\t') ? '\t' : probe.includes(';') ? ';' : probe.includes(',') ? ',' : ' ';
  let rows: string[][];
  if (delimiter === ' ') {
    rows = body
      .split(/\r\n|\r|\n/)
      .map((r) => r.trim())
      .filter((r) => r !== '')
      .map((r) => r.split(/\s+/));
  } else {
    const roughRows = body.length / 8; // a refusal for absurd files before papaparse builds them
    if (roughRows > maxPoints * 20) return fail(`The file is far larger than a spectrum of ${maxPoints} points.`);
    const parsed = Papa.parse<string[]>(body, { delimiter, skipEmptyLines: 'greedy', comments: '#' });
    rows = parsed.data;
  }
  const decimalComma = delimiter !== ',';
  const x: number[] = [];
  const y: number[] = [];
  const heading: string[] = [];
  let usedDecimalComma = false;
  let rowNo = 0;
  for (const row of rows) {
    rowNo++;
    const cells = row.map((c) => c.trim()).filter((c, i) => c !== '' || i < 2);
    if (cells.length === 0 || (cells[0] ?? '').startsWith('#')) continue;
    const a = readCsvNumber(cells[0], decimalComma);
    const b = readCsvNumber(cells[1] ?? '', decimalComma);
    if (Number.isNaN(a) || Number.isNaN(b)) {
      if (x.length === 0 && heading.length < 20) {
        heading.push(cells.join(' '));
        continue;
      }
      return fail(`Row ${rowNo} of the CSV file is not two numbers: "${cells.join(delimiter === '\t' ? ' ' : delimiter).slice(0, 40)}".`);
    }
    if (decimalComma && (cells[0].includes(',') || (cells[1] ?? '').includes(','))) usedDecimalComma = true;
    x.push(a);
    y.push(b);
    if (x.length > maxPoints)
      return fail(`The spectrum has more than ${maxPoints} points; at most ${maxPoints} are accepted. Export it at a coarser spacing.`);
  }
  if (x.length === 0) return fail('The CSV file holds no rows of two numbers (wavenumber, intensity).');
  const warnings: string[] = [];
  if (usedDecimalComma) warnings.push('Decimal commas were read as decimal points.');
  const head = heading.join(' ');
  let xu: XUnit = 'wavenumber';
  if (/µm|μm|\bum\b|micro/i.test(head)) xu = 'micrometre';
  else if (/\bnm\b|nanomet/i.test(head)) xu = 'nanometre';
  let yu: YUnit = null;
  if (/%\s*T|percent/i.test(head)) yu = { kind: 'transmittance', percent: true };
  else if (/transmitt/i.test(head)) yu = { kind: 'transmittance', percent: false };
  else if (/absorb|\bA\b/i.test(head)) yu = { kind: 'absorbance', percent: false };
  if (!yu) {
    yu = inferY(y);
    warnings.push(
      `The file does not say whether it holds absorbance or transmittance; read as ${yu.percent ? 'percent ' : ''}${yu.kind} from the values.`,
    );
  } else if (yu.kind === 'transmittance' && !yu.percent && maxOf(y) > 1.5) {
    yu = { kind: 'transmittance', percent: true };
  }
  const titleLine = heading.find((h) => !/wavenumber|cm-1|cm\^-1|absorb|transmitt/i.test(h));
  return finish(x, y, xu, yu, titleLine ?? '', warnings, maxPoints);
}

/** Reads a spectrum whose kind came from sniffUpload. */
export function parseSpectrumFile(text: string, kind: 'jcamp' | 'csv', options: ParseSpectrumOptions = {}): SpectrumParse {
  const maxPoints = options.maxPoints ?? SPECTRUM_MAX_POINTS;
  if (typeof text !== 'string' || text.trim() === '') return fail('The spectrum file is empty.');
  if (kind === 'jcamp') return parseJcamp(text, maxPoints);
  if (kind === 'csv') return parseCsv(text, maxPoints);
  return fail('Only JCAMP-DX and CSV spectra can be read.');
}
