/**
 * Line lists as students paste them from a spreadsheet or an instrument's peak table.
 *
 * Accepts tab-, semicolon-, comma- or whitespace-separated text (fields split by papaparse,
 * so quoted fields such as "2906,25" keep their decimal comma), with or without a header
 * row in English, German, French, Spanish, Italian or Dutch; an assignment as two columns
 * (branch, J), one label column ("P(3)", "R 0", "p3"), or a running index m (header "m"); or
 * just a column of positions (unassigned peaks). Without a header naming it, the position
 * column is the one whose values lie in the wavenumber range (a "peak, intensity, position"
 * table is read right). Positions in µm or nm are converted to cm⁻¹ when the header says so,
 * and refused ("these look like wavelengths") when it does not. Pure: text in, plain data out.
 */
import Papa from 'papaparse';

export type Branch = 'P' | 'R';

export interface LineListEntry {
  branch?: Branch;
  J?: number;
  /** Position in cm⁻¹. */
  wavenumber: number;
  /** The row as pasted (trimmed). */
  raw: string;
  /** 1-based row number in the pasted text (blank rows count). */
  line: number;
}

export interface LineListIssue {
  /** 1-based row number in the pasted text; 0 when it concerns the whole list. */
  line: number;
  message: string;
}

export type LineListDelimiter = 'tab' | 'semicolon' | 'comma' | 'whitespace';

export interface LineListParse {
  lines: LineListEntry[];
  warnings: LineListIssue[];
  errors: LineListIssue[];
  format: { delimiter: LineListDelimiter; header: boolean; unit?: PositionUnit };
}

/** The unit the positions were given in (they are always returned in cm⁻¹). */
export type PositionUnit = 'cm-1' | 'µm' | 'nm';

export interface ParseLineListOptions {
  maxRows?: number;
  /**
   * Where the lines of the practical's bands lie, cm⁻¹ (e.g. 1900–5900 for HCl/DCl with
   * overtones). Positions outside it whose wavelength reading falls inside are refused as
   * wavelengths; nothing else depends on it.
   */
  expected?: { from: number; to: number };
}

/** More rows than any band has lines (both isotopes, both branches, overtone): a paste gone wrong. */
export const LINE_LIST_MAX_ROWS = 2000;
/** Characters; generous for 2000 rows of a few columns each. */
export const LINE_LIST_MAX_CHARS = 400_000;
/** Characters in one row. */
export const LINE_LIST_MAX_ROW_CHARS = 1000;
/** Plausible positions for the bands Oscillab marks (fundamentals and overtones). */
export const WAVENUMBER_MIN = 200;
export const WAVENUMBER_MAX = 15000;
const J_MAX = 200;
/** Header words for columns that are read past (intensities, peak numbers). */
const KNOWN_OTHER_HEADER =
  /\b(intensity|absorbance|transmittance|height|area|width|fwhm|no|number|index|#|peak|isotope|isotopologue|species|y|%t|intensität|intensitaet|höhe|fläche|breite|absorbanz|transmission|intensité|hauteur|aire|largeur|intensidad|altura|área|anchura|intensità|altezza|intensiteit|hoogte|oppervlak|nr|nummer|numéro|número|numero)\b/i;

type Role = 'branch' | 'J' | 'm' | 'label' | 'wavenumber' | 'ignore';

interface Columns {
  branch?: number;
  J?: number;
  m?: number;
  label?: number;
  wavenumber?: number;
}

interface NumberRead {
  value: number;
  decimalComma: boolean;
}

interface RowResult {
  entry?: LineListEntry;
  error?: string;
  warning?: string;
  decimalComma?: boolean;
  /** The numbers of a row read by content (for choosing the position column). */
  numbers?: number[];
}

/** How positions are read: the column to take (by content) and the unit they are in. */
interface Reading {
  pick?: number;
  unit: PositionUnit;
}

/** cm⁻¹ from a position in the given unit: ν̃ = 10⁴/λ(µm) = 10⁷/λ(nm). */
function toWavenumber(v: number, unit: PositionUnit): number {
  return unit === 'µm' ? 1e4 / v : unit === 'nm' ? 1e7 / v : v;
}

const LABEL_PATTERN = /^([PpRr])\s*(?:\(\s*([+-]?\d+)\s*\)|\[\s*([+-]?\d+)\s*\]|([+-]?\d+))$/;
/** Labels are short; the length guard keeps the pattern's backtracking bounded on hostile input. */
const LABEL_RE = {
  test: (s: string) => s.length <= 24 && LABEL_PATTERN.test(s),
  exec: (s: string) => (s.length <= 24 ? LABEL_PATTERN.exec(s) : null),
};
const BRANCH_RE = /^(?:[PpRr])$/;
const UNIT_RE = /^(?:cm-1|cm\^-1|cm⁻¹|\/cm|1\/cm|cm\^\{-1\})$/i;
const PLAIN_NUMBER_RE = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const DECIMAL_COMMA_RE = /^[+-]?\d+,\d+$/;
const THOUSANDS_DOT_COMMA_RE = /^[+-]?\d{1,3}(?:\.\d{3})+,\d+$/; // 2.906,25
const THOUSANDS_COMMA_DOT_RE = /^[+-]?\d{1,3}(?:,\d{3})+\.\d+$/; // 2,906.25

/** Reads one numeric token; `allowDecimalComma` is false when commas separate fields. */
function readNumber(token: string, allowDecimalComma: boolean): NumberRead | null {
  let t = token.trim().replace(/\u2212/g, '-'); // typographic minus
  // A comma still inside a field of a comma-separated row was quoted: a decimal comma after all.
  if (!allowDecimalComma && t.includes(',') && !t.includes('.')) allowDecimalComma = true;
  if (t.length > 40) return null; // no number is this long; also keeps the patterns below cheap
  const unit = /(?:cm-1|cm\^-1|cm⁻¹|\/cm)$/i.exec(t);
  if (unit) t = t.slice(0, unit.index).trimEnd();
  if (PLAIN_NUMBER_RE.test(t)) return { value: Number(t), decimalComma: false };
  if (allowDecimalComma) {
    if (DECIMAL_COMMA_RE.test(t)) return { value: Number(t.replace(',', '.')), decimalComma: true };
    if (THOUSANDS_DOT_COMMA_RE.test(t)) {
      return { value: Number(t.replace(/\./g, '').replace(',', '.')), decimalComma: true };
    }
    if (THOUSANDS_COMMA_DOT_RE.test(t)) return { value: Number(t.replace(/,/g, '')), decimalComma: false };
  }
  return null;
}

/**
 * Splits one row into fields. Delimited rows go through papaparse, so a quoted field keeps
 * its delimiter ("2906,25" in a comma-separated row is one number with a decimal comma).
 */
function splitRow(row: string, delimiter: LineListDelimiter): string[] {
  if (delimiter === 'whitespace') return row.trim().split(/\s+/).map(unquote);
  const ch = delimiter === 'tab' ? '\t' : delimiter === 'semicolon' ? ';' : ',';
  if (!row.includes('"')) return row.split(ch).map((f) => f.trim());
  const parsed = Papa.parse<string[]>(row, { delimiter: ch, quoteChar: '"', escapeChar: '"' });
  const fields = parsed.data[0] ?? [];
  return fields.map((f) => f.trim());
}

function unquote(f: string): string {
  return f.length >= 2 && f.startsWith('"') && f.endsWith('"') ? f.slice(1, -1) : f;
}

/** Splits delimited fields further on whitespace unless a field is one assignment label ("R 0"). */
function tokensOf(fields: string[]): string[] {
  const out: string[] = [];
  for (const f of fields) {
    if (f === '') continue;
    if (LABEL_RE.test(f)) out.push(f);
    // A stray separator left on a token ("R(2)," in a space-separated row) is dropped.
    else {
      for (const t of f.split(/\s+/)) {
        const clean = t.replace(/[,;]$/, '');
        if (clean) out.push(clean);
      }
    }
  }
  return out;
}

function normaliseHeaderCell(cell: string): string[] {
  return cell
    .toLowerCase()
    .replace(/[()[\]{}:]/g, ' ')
    .split(/\s+/)
    .filter(Boolean);
}

/** Header words, by role, in the lab languages met most (en, de, fr, es, it, pt, nl). */
const BRANCH_HEADERS = /^(branch|br|p\/r|branch p\/r|zweig|ast|branche|rama|ramo|tak)$/;
const LABEL_HEADERS =
  /^(line|lines|assignment|label|transition|line assignment|linie|zuordnung|übergang|raie|attribution|transition attribuée|línea|linea|asignación|asignacion|transición|riga|assegnazione|lijn|toekenning)$/;
const WAVENUMBER_WORDS = new Set([
  'wavenumber',
  'wavenumbers',
  'wave-number',
  'nu',
  'ν',
  'ν̃',
  'ṽ',
  'v~',
  'nu~',
  'position',
  'positions',
  'peak',
  'cm-1',
  'cm^-1',
  'cm⁻¹',
  '/cm',
  '1/cm',
  'frequency',
  'freq',
  'centre',
  'center',
  // de, fr, es, it, pt, nl
  'wellenzahl',
  'wellenzahlen',
  'lage',
  'frequenz',
  'fréquence',
  'frecuencia',
  'frequenza',
  'frequência',
  'posición',
  'posicion',
  'posizione',
  'posição',
  'positie',
  'golfgetal',
  'pic',
  'pico',
  'picco',
  'piek',
]);
const WAVENUMBER_PHRASES = /wave ?number|nombre d.onde|número de onda|numero de onda|numero d.onda|número de onda/;
const WAVELENGTH_WORDS =
  /wavelength|wellenlänge|wellenlaenge|longueur d.onde|longitud de onda|lunghezza d.onda|comprimento de onda|golflengte|^λ$|\bλ\b|lambda/;

/** The position unit a header cell states, if any. */
function unitOfHeader(cell: string): PositionUnit | 'wavelength' | undefined {
  const t = cell.toLowerCase();
  if (/(µm|μm|\bum\b|micron|mikrometer|micromet|micrómet)/.test(t)) return 'µm';
  if (/(\bnm\b|nanomet)/.test(t)) return 'nm';
  if (/(cm-1|cm\^-1|cm⁻¹|\/cm|1\/cm|cm\^\{-1\})/.test(t)) return 'cm-1';
  if (WAVELENGTH_WORDS.test(t)) return 'wavelength';
  return undefined;
}

function roleOfHeader(cell: string): Role {
  const words = normaliseHeaderCell(cell);
  const joined = words.join(' ');
  if (words.length === 0) return 'ignore';
  if (BRANCH_HEADERS.test(joined)) return 'branch';
  if (/^(j|j''|j"|j″|j_lower|jlower|j lower|j initial|lower j|j0|j_0|j unten|j inférieur|j inferior)$/.test(joined)) return 'J';
  if (/^(m|running index|running index m|index m|laufindex|indice courant)$/.test(joined)) return 'm';
  if (LABEL_HEADERS.test(joined)) return 'label';
  const unit = unitOfHeader(cell);
  if (unit === 'µm' || unit === 'nm' || unit === 'wavelength') return 'wavenumber';
  if (WAVENUMBER_PHRASES.test(joined) || words.some((w) => WAVENUMBER_WORDS.has(w))) {
    // "peak number" / "peak no" is an index column, not a position.
    if (/\b(number|no\.?|#|index|nr|nummer|numéro|número|numero|n°)\b/.test(joined) && !WAVENUMBER_PHRASES.test(joined)) return 'ignore';
    return 'wavenumber';
  }
  return 'ignore';
}

function looksLikeHeader(fields: string[], allowDecimalComma: boolean): boolean {
  const cells = fields.filter((f) => f !== '');
  if (cells.length === 0) return false;
  for (const c of cells) {
    if (readNumber(c, allowDecimalComma)) return false;
    if (LABEL_RE.test(c)) return false;
  }
  // "R" alone could be a data row's branch cell only if a number follows, which it does not here.
  return cells.some((c) => /[A-Za-zνṽ]/.test(c));
}

function columnsFromHeader(fields: string[]): Columns | null {
  const cols: Columns = {};
  fields.forEach((f, i) => {
    const role = roleOfHeader(f);
    if (role === 'ignore') return;
    if (cols[role] === undefined) cols[role] = i;
  });
  return Object.keys(cols).length > 0 ? cols : null;
}

function checkAssignment(branch: Branch, J: number): string | null {
  if (!Number.isInteger(J) || J < 0) return `J must be a whole number ≥ 0 (read ${J}).`;
  if (J > J_MAX) return `J = ${J} is beyond any observable line (J ≤ ${J_MAX}).`;
  if (branch === 'P' && J === 0) return 'P(0) does not exist: the P branch starts at P(1).';
  return null;
}

function wavenumberProblem(v: number): string | null {
  if (!Number.isFinite(v)) return `"${v}" is not a finite number.`;
  if (v >= WAVENUMBER_MIN && v <= WAVENUMBER_MAX) return null;
  if (v > WAVENUMBER_MAX && v / 100 >= WAVENUMBER_MIN && v / 100 <= WAVENUMBER_MAX) {
    return `${v} is outside ${WAVENUMBER_MIN}–${WAVENUMBER_MAX} cm⁻¹; is it in m⁻¹? Enter positions in cm⁻¹.`;
  }
  return `${v} is outside the expected range ${WAVENUMBER_MIN}–${WAVENUMBER_MAX} cm⁻¹.`;
}

function quote(s: string): string {
  const short = s.length > 60 ? `${s.slice(0, 57)}…` : s;
  return `"${short}"`;
}

/** Parses a row by content when no usable header tells us which column is which. */
function parseRowByContent(
  tokens: string[],
  allowDecimalComma: boolean,
  raw: string,
  lineNo: number,
  reading: Reading = { unit: 'cm-1' },
): RowResult {
  let branch: Branch | undefined;
  let J: number | undefined;
  let decimalComma = false;
  const numbers: number[] = [];
  for (let i = 0; i < tokens.length; i++) {
    const tok = tokens[i];
    const label = LABEL_RE.exec(tok);
    if (label) {
      if (branch !== undefined) return { error: `more than one assignment in ${quote(raw)}.` };
      branch = label[1].toUpperCase() as Branch;
      J = Number(label[2] ?? label[3] ?? label[4]);
      continue;
    }
    if (BRANCH_RE.test(tok)) {
      if (branch !== undefined) return { error: `more than one assignment in ${quote(raw)}.` };
      const next = tokens[i + 1];
      const n = next === undefined ? null : readNumber(next, allowDecimalComma);
      if (!n || !Number.isInteger(n.value) || n.decimalComma) {
        return { error: `branch "${tok}" is not followed by a whole-number J in ${quote(raw)}.` };
      }
      branch = tok.toUpperCase() as Branch;
      J = n.value;
      i++;
      continue;
    }
    if (UNIT_RE.test(tok)) continue;
    const n = readNumber(tok, allowDecimalComma);
    if (n) {
      numbers.push(n.value);
      decimalComma ||= n.decimalComma;
      continue;
    }
    return { error: tok === raw ? `could not read ${quote(raw)}.` : `could not read ${quote(tok)} in ${quote(raw)}.` };
  }
  if (branch !== undefined && J !== undefined) {
    const bad = checkAssignment(branch, J);
    if (bad) return { error: bad, numbers };
  }
  const converted = numbers.map((v) => (v > 0 ? toWavenumber(v, reading.unit) : v));
  const picked = reading.pick !== undefined ? converted[reading.pick] : undefined;
  const plausible = converted.filter((v) => wavenumberProblem(v) === null);
  if (picked !== undefined && wavenumberProblem(picked) !== null) {
    return { error: `the position ${numbers[reading.pick!]} is not a wavenumber in cm⁻¹: ${wavenumberProblem(picked)}`, numbers };
  }
  if (plausible.length === 0) {
    if (numbers.length === 0) return { error: `no wavenumber found in ${quote(raw)}.`, numbers };
    const problem = wavenumberProblem(converted[converted.length - 1]);
    return { error: `no wavenumber in cm⁻¹ found: ${problem}`, numbers };
  }
  const position = picked ?? plausible[0];
  const entry: LineListEntry = { wavenumber: position, raw, line: lineNo };
  if (branch !== undefined) {
    entry.branch = branch;
    entry.J = J;
  }
  const result: RowResult = { entry, decimalComma, numbers };
  if (picked === undefined && plausible.length > 1) {
    result.warning = `more than one wavenumber-like value (${plausible.join(', ')}); used the first, ${plausible[0]}.`;
  }
  return result;
}

/** Parses a row using the header's column roles. */
function parseRowByColumns(
  fields: string[],
  cols: Columns,
  allowDecimalComma: boolean,
  raw: string,
  lineNo: number,
  unit: PositionUnit = 'cm-1',
): RowResult {
  let decimalComma = false;
  const num = (idx: number | undefined): { n: NumberRead | null; cell: string } | undefined => {
    if (idx === undefined) return undefined;
    const cell = (fields[idx] ?? '').trim();
    const n = readNumber(cell, allowDecimalComma);
    if (n) decimalComma ||= n.decimalComma;
    return { n, cell };
  };
  const wn = num(cols.wavenumber)!;
  if (wn.cell === '') return { error: `the wavenumber cell is empty in ${quote(raw)}.` };
  if (!wn.n) return { error: `could not read the wavenumber ${quote(wn.cell)}.` };
  if (unit !== 'cm-1' && !(wn.n.value > 0)) return { error: `the wavelength ${quote(wn.cell)} must be positive.` };
  const position = toWavenumber(wn.n.value, unit);
  const wProblem = wavenumberProblem(position);
  if (wProblem)
    return {
      error: unit === 'cm-1' ? wProblem : `${wn.n.value} ${unit} is ${position.toFixed(2)} cm⁻¹: ${wProblem}`,
      numbers: [wn.n.value],
    };
  const entry: LineListEntry = { wavenumber: position, raw, line: lineNo };
  let warning: string | undefined;

  let branch: Branch | undefined;
  let J: number | undefined;
  const labelCell = cols.label !== undefined ? (fields[cols.label] ?? '').trim() : '';
  // A "Line" column of 1, 2, 3… numbers the rows; it is not an assignment.
  if (labelCell !== '' && !readNumber(labelCell, allowDecimalComma)) {
    const cell = labelCell;
    const m = LABEL_RE.exec(cell);
    if (!m) return { error: `could not read the assignment ${quote(cell)} (expected e.g. P(3) or R(0)).` };
    branch = m[1].toUpperCase() as Branch;
    J = Number(m[2] ?? m[3] ?? m[4]);
  } else if (cols.m !== undefined && (fields[cols.m] ?? '').trim() !== '') {
    const r = num(cols.m)!;
    if (!r.n || !Number.isInteger(r.n.value) || r.n.value === 0) {
      return { error: `the running index m must be a non-zero whole number (read ${quote(r.cell)}).` };
    }
    // m = J + 1 for R(J), m = −J for P(J).
    if (r.n.value > 0) {
      branch = 'R';
      J = r.n.value - 1;
    } else {
      branch = 'P';
      J = -r.n.value;
    }
  } else if (cols.branch !== undefined || cols.J !== undefined) {
    const bCell = cols.branch !== undefined ? (fields[cols.branch] ?? '').trim() : '';
    const jr = num(cols.J);
    const jCell = jr?.cell ?? '';
    if (bCell !== '' || jCell !== '') {
      const lab = LABEL_RE.exec(bCell);
      if (lab && jCell === '') {
        // A label typed into the branch column, e.g. "P(3)".
        branch = lab[1].toUpperCase() as Branch;
        J = Number(lab[2] ?? lab[3] ?? lab[4]);
      } else {
        if (bCell !== '' && !BRANCH_RE.test(bCell)) {
          return { error: `the branch must be P or R (read ${quote(bCell)}).` };
        }
        if (bCell === '') {
          warning = 'J is given without a branch; the line is left unassigned.';
        } else if (jCell === '') {
          return { error: `branch ${bCell.toUpperCase()} is given without J.` };
        } else if (!jr?.n || !Number.isInteger(jr.n.value)) {
          return { error: `J must be a whole number (read ${quote(jCell)}).` };
        } else {
          branch = bCell.toUpperCase() as Branch;
          J = jr.n.value;
        }
      }
    }
  }
  if (branch !== undefined && J !== undefined) {
    const bad = checkAssignment(branch, J);
    if (bad) return { error: bad };
    entry.branch = branch;
    entry.J = J;
  }
  return { entry, decimalComma, warning };
}

interface Attempt {
  delimiter: LineListDelimiter;
  result: LineListParse;
  decimalCommaRows: number[];
  numberRows: number[][];
}

/**
 * The column of a content-read table that holds the positions: the one whose values lie in the
 * wavenumber range (or in the practical's expected range), leaving out a column that counts
 * 1, 2, 3, … (peak numbers). Undefined when every row has one candidate anyway.
 */
function positionColumn(numberRows: number[][], expected?: { from: number; to: number }): number | undefined {
  const lengths = new Map<number, number>();
  for (const r of numberRows) lengths.set(r.length, (lengths.get(r.length) ?? 0) + 1);
  const [width, count] = [...lengths].sort((a, b) => b[1] - a[1])[0] ?? [0, 0];
  if (width < 2 || count < Math.max(2, 0.8 * numberRows.length)) return undefined;
  const rows = numberRows.filter((r) => r.length === width);
  let best: { k: number; score: number } | undefined;
  for (let k = 0; k < width; k++) {
    const col = rows.map((r) => r[k]);
    const counting = col.every((v, i) => Number.isInteger(v) && (i === 0 || v - col[i - 1] === 1 || v - col[i - 1] === -1));
    if (counting) continue;
    const inRange = col.filter((v) => wavenumberProblem(v) === null).length / col.length;
    const inExpected = expected ? col.filter((v) => v >= expected.from && v <= expected.to).length / col.length : 0;
    const score = inRange + inExpected;
    if (inRange >= 0.8 && (!best || score > best.score)) best = { k, score };
  }
  return best?.k;
}

function attempt(rows: { text: string; line: number }[], delimiter: LineListDelimiter, expected?: { from: number; to: number }): Attempt {
  const allowDecimalComma = delimiter !== 'comma';
  const lines: LineListEntry[] = [];
  const warnings: LineListIssue[] = [];
  const errors: LineListIssue[] = [];
  const decimalCommaRows: number[] = [];
  let cols: Columns | null = null;
  let header = false;
  let start = 0;
  let unit: PositionUnit | 'wavelength' | undefined;
  // A title row may sit above the header ("Peak table", then "Branch  J  Position").
  while (start < Math.min(rows.length - 1, 5) && looksLikeHeader(splitRow(rows[start].text, delimiter), allowDecimalComma)) {
    start++;
  }
  if (start > 0) {
    header = true;
    for (let h = 0; h < start; h++) {
      const known = splitRow(rows[h].text, delimiter).some((f) => roleOfHeader(f) !== 'ignore' || KNOWN_OTHER_HEADER.test(f));
      if (!known) {
        warnings.push({
          line: rows[h].line,
          message: `Line ${rows[h].line}: ${quote(rows[h].text.trim())} was taken as a heading and skipped.`,
        });
      }
    }
    const headerFields = splitRow(rows[start - 1].text, delimiter);
    const c = columnsFromHeader(headerFields);
    // With space-separated text, header words and data cells may not line up ("Wavenumber (cm-1)"
    // is two words), so the header is used there only for a running-index column, which the
    // values alone cannot reveal, and only when the counts agree.
    const aligned =
      delimiter !== 'whitespace' || (c?.m !== undefined && headerFields.length === splitRow(rows[start].text, delimiter).length);
    if (c && c.wavenumber !== undefined && aligned) cols = c;
    else if (c && c.wavenumber === undefined && delimiter !== 'whitespace') {
      warnings.push({
        line: rows[start - 1].line,
        message: 'The header names no wavenumber column; the positions were found from the values.',
      });
    }
    // The unit the positions are in: the position column's, or (words not lined up) any the header states.
    if (cols?.wavenumber !== undefined) unit = unitOfHeader(headerFields[cols.wavenumber]);
    if (unit === undefined || unit === 'cm-1') {
      const stated = headerFields.map(unitOfHeader).find((u) => u === 'µm' || u === 'nm' || u === 'wavelength');
      if (stated && (cols === null || cols.wavenumber === undefined || unit === undefined)) unit = stated;
    }
  }
  const data = rows.slice(start).filter((r) => r.text.length <= LINE_LIST_MAX_ROW_CHARS);
  // A wavelength column with no unit: the values tell µm (infrared: 0.7–50) from nm.
  let positionUnit: PositionUnit = unit === 'µm' || unit === 'nm' ? unit : 'cm-1';
  let pick: number | undefined;
  if (!cols) {
    const numberRows = data.map(
      (r) => parseRowByContent(tokensOf(splitRow(r.text, delimiter)), allowDecimalComma, r.text.trim(), r.line).numbers ?? [],
    );
    if (unit === 'wavelength') {
      const all = numberRows.flat().filter((v) => v > 0);
      positionUnit = all.length && all.filter((v) => v < 100).length > 0.5 * all.length ? 'µm' : 'nm';
    }
    if (positionUnit === 'cm-1') pick = positionColumn(numberRows, expected);
    else {
      // The wavelength column: the one whose converted values are wavenumbers.
      const converted = numberRows.map((r) => r.map((v) => (v > 0 ? toWavenumber(v, positionUnit) : v)));
      pick = positionColumn(converted, expected);
    }
  } else if (unit === 'wavelength') {
    const values = data
      .map((r) => readNumber(splitRow(r.text, delimiter)[cols!.wavenumber!] ?? '', allowDecimalComma)?.value ?? NaN)
      .filter((v) => v > 0);
    positionUnit = values.filter((v) => v < 100).length > 0.5 * values.length ? 'µm' : 'nm';
  }
  if (positionUnit !== 'cm-1' && header) {
    warnings.push({
      line: rows[start - 1].line,
      message: `The positions are wavelengths in ${positionUnit}${unit === 'wavelength' ? ' (read from their size; the header names no unit)' : ''}; they were converted to wavenumbers, ν̃/cm⁻¹ = ${positionUnit === 'µm' ? '10⁴ / (λ/µm)' : '10⁷ / (λ/nm)'}.`,
    });
  }
  for (let r = start; r < rows.length; r++) {
    const { text, line } = rows[r];
    if (text.length > LINE_LIST_MAX_ROW_CHARS) {
      errors.push({ line, message: `Line ${line}: the row is ${text.length} characters long; a line-list row has a few short cells.` });
      continue;
    }
    const raw = text.trim();
    const fields = splitRow(text, delimiter);
    const res = cols
      ? parseRowByColumns(fields, cols, allowDecimalComma, raw, line, positionUnit)
      : parseRowByContent(tokensOf(fields), allowDecimalComma, raw, line, { pick, unit: positionUnit });
    if (res.error) {
      errors.push({ line, message: `Line ${line}: ${res.error}` });
      continue;
    }
    if (res.warning) warnings.push({ line, message: `Line ${line}: ${res.warning}` });
    if (res.decimalComma) decimalCommaRows.push(line);
    if (res.entry) lines.push(res.entry);
  }
  return {
    delimiter,
    result: { lines, warnings, errors, format: { delimiter, header, ...(positionUnit !== 'cm-1' ? { unit: positionUnit } : {}) } },
    decimalCommaRows,
    numberRows: collectNumbers(rows.slice(start), delimiter, allowDecimalComma, cols),
  };
}

/** Every data row's candidate position values as typed (for recognising wavelengths given without a unit). */
function collectNumbers(
  rows: { text: string; line: number }[],
  delimiter: LineListDelimiter,
  allowDecimalComma: boolean,
  cols: Columns | null,
): number[][] {
  return rows
    .filter((r) => r.text.length <= LINE_LIST_MAX_ROW_CHARS)
    .map((r) => {
      const fields = splitRow(r.text, delimiter);
      if (cols?.wavenumber !== undefined) {
        const v = readNumber(fields[cols.wavenumber] ?? '', allowDecimalComma)?.value;
        return v === undefined ? [] : [v];
      }
      return parseRowByContent(tokensOf(fields), allowDecimalComma, r.text.trim(), r.line).numbers ?? [];
    });
}

function chooseDelimiters(rows: { text: string }[]): LineListDelimiter[] {
  const any = (ch: string) => rows.some((r) => r.text.includes(ch));
  if (any('\t')) return ['tab'];
  if (any(';')) return ['semicolon'];
  if (any(',')) {
    // "2906,25" alone is a decimal comma; "R,0,2906.25" separates fields. Try both, the
    // reading with fewer errors wins; on a tie the decimal comma wins only when no row
    // has a dot and every comma sits between digits of one number.
    const singleNumber = /^\s*[+-]?\d+,\d+\s*$/;
    const decimalCommaLikely =
      !rows.some((r) => r.text.includes('.')) &&
      rows.filter((r) => r.text.includes(',')).every((r) => singleNumber.test(r.text) || /\s/.test(r.text.trim()));
    return decimalCommaLikely ? ['whitespace', 'comma'] : ['comma', 'whitespace'];
  }
  return ['whitespace'];
}

function countRows(text: string, stopAfter: number): number {
  let count = 0;
  let from = 0;
  while (from <= text.length) {
    const nl = text.indexOf('\n', from);
    const end = nl === -1 ? text.length : nl;
    // A row counts when it holds anything but whitespace.
    for (let i = from; i < end; i++) {
      const c = text.charCodeAt(i);
      if (c !== 32 && c !== 9 && c !== 13) {
        count++;
        break;
      }
    }
    if (count > stopAfter || nl === -1) break;
    from = nl + 1;
  }
  return count;
}

function emptyResult(error: LineListIssue): LineListParse {
  return { lines: [], warnings: [], errors: [error], format: { delimiter: 'whitespace', header: false } };
}

/**
 * Parses a pasted or uploaded line list. Never throws; problems come back as errors
 * (the row is unusable) or warnings (the row was read, but check it), each naming the row.
 */
export function parseLineList(text: string, options: ParseLineListOptions = {}): LineListParse {
  const maxRows = options.maxRows ?? LINE_LIST_MAX_ROWS;
  if (typeof text !== 'string') return emptyResult({ line: 0, message: 'No line list was given.' });
  // Checked before any splitting so a runaway paste fails at once.
  const rowCount = countRows(text, maxRows);
  if (rowCount > maxRows) {
    return emptyResult({
      line: 0,
      message: `The line list has more than ${maxRows} rows; a band has far fewer lines. Check that you pasted the peak positions only.`,
    });
  }
  if (text.length > LINE_LIST_MAX_CHARS) {
    return emptyResult({
      line: 0,
      message: `The line list is too long (${text.length} characters, limit ${LINE_LIST_MAX_CHARS}).`,
    });
  }
  const rows = text
    .replace(/^\uFEFF/, '')
    .split(/\r\n|\r|\n/)
    .map((t, i) => ({ text: t, line: i + 1 }))
    .filter((r) => r.text.trim() !== '');
  if (rows.length === 0) return emptyResult({ line: 0, message: 'The line list is empty.' });

  let best: Attempt | null = null;
  for (const d of chooseDelimiters(rows)) {
    const a = attempt(rows, d, options.expected);
    if (!best || a.result.errors.length < best.result.errors.length) best = a;
  }
  const chosen = best!;
  const { result } = chosen;
  const wavelengths = wavelengthProblem(chosen, options.expected);
  if (wavelengths) return { lines: [], warnings: [], errors: [{ line: 0, message: wavelengths }], format: result.format };
  if (chosen.decimalCommaRows.length > 0) {
    const first = chosen.decimalCommaRows[0];
    const n = chosen.decimalCommaRows.length;
    result.warnings.unshift({
      line: first,
      message: `Decimal commas were read as decimal points (e.g. "2906,25" as 2906.25) on ${n} row${n === 1 ? '' : 's'}, starting at line ${first}. Check the values.`,
    });
  }
  const seen = new Map<string, number>();
  for (const l of result.lines) {
    if (l.branch === undefined) continue;
    const key = `${l.branch}(${l.J})`;
    const prev = seen.get(key);
    if (prev !== undefined) {
      result.warnings.push({ line: l.line, message: `Line ${l.line}: ${key} is also assigned on line ${prev}.` });
    } else seen.set(key, l.line);
  }
  if (result.lines.length === 0 && result.errors.length === 0) {
    result.errors.push({ line: 0, message: 'No line positions were found.' });
  }
  result.warnings.sort((a, b) => a.line - b.line);
  return result;
}

/**
 * Positions given as wavelengths without saying so: infrared wavelengths in µm (0.7–50) cannot
 * be wavenumbers at all; wavelengths in nm can (2000–15000), so they are recognised only when
 * the practical's expected range is known and the values miss it while 10⁷/value hits it.
 */
function wavelengthProblem(a: Attempt, expected?: { from: number; to: number }): string | null {
  if (a.result.format.unit) return null;
  const firsts = a.numberRows.map((r) => r.find((v) => v > 0)).filter((v): v is number => v !== undefined);
  if (firsts.length === 0) return null;
  const example = (v: number[]) =>
    v
      .slice(0, 3)
      .map((x) => String(x))
      .join(', ');
  const advice = (unit: string) =>
    `Give the positions as wavenumbers in cm⁻¹, or write the unit in the header (for example “wavelength (${unit})”) to have them converted.`;
  const lines = a.result.lines;
  const micro = a.numberRows.filter((r) => r.some((v) => v >= 0.7 && v <= 50) && !r.some((v) => wavenumberProblem(v) === null));
  if (lines.length < 0.2 * firsts.length && micro.length >= 0.8 * a.numberRows.length) {
    return `These look like wavelengths in µm (${example(micro.map((r) => r.find((v) => v >= 0.7 && v <= 50)!))}), not wavenumbers. ${advice('µm')}`;
  }
  if (expected && lines.length >= 3) {
    const inside = (v: number) => v >= expected.from - 50 && v <= expected.to + 50;
    const miss = lines.filter((l) => !inside(l.wavenumber));
    if (miss.length >= 0.8 * lines.length && miss.filter((l) => inside(1e7 / l.wavenumber)).length >= 0.8 * miss.length) {
      return `These look like wavelengths in nm (${example(miss.map((l) => l.wavenumber))}), not wavenumbers: the lines of this practical lie at ${Math.round(expected.from)}–${Math.round(expected.to)} cm⁻¹. ${advice('nm')}`;
    }
  }
  return null;
}

/** Assignment label as the trade writes it: "P(3)", "R(0)". */
export function lineLabel(l: { branch?: Branch; J?: number }): string {
  return l.branch !== undefined && l.J !== undefined ? `${l.branch}(${l.J})` : '';
}

/** Writes a line list as CSV that parseLineList reads back unchanged. */
export function formatLineListCsv(lines: { branch?: Branch; J?: number; wavenumber: number }[]): string {
  const out = ['branch,J,wavenumber (cm-1)'];
  for (const l of lines) {
    const assigned = l.branch !== undefined && l.J !== undefined;
    out.push(`${assigned ? l.branch : ''},${assigned ? l.J : ''},${String(l.wavenumber)}`);
  }
  return `${out.join('\n')}\n`;
}
