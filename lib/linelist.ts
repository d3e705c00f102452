/**
 * Line lists as students paste them from a spreadsheet or an instrument's peak table.
 *
 * Accepts tab-, semicolon-, comma- or whitespace-separated text, with or without a
 * header row; an assignment as two columns (branch, J), one label column ("P(3)",
 * "R 0", "p3"), or a running index m (header "m"); or just a column of positions
 * (unassigned peaks). Pure: text in, plain data out.
 */

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
  format: { delimiter: LineListDelimiter; header: boolean };
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
const KNOWN_OTHER_HEADER = /\b(intensity|absorbance|transmittance|height|area|width|fwhm|no|number|index|#|peak|isotope|isotopologue|species|y|%t)\b/i;

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

function splitRow(row: string, delimiter: LineListDelimiter): string[] {
  switch (delimiter) {
    case 'tab':
      return row.split('\t').map((f) => f.trim());
    case 'semicolon':
      return row.split(';').map((f) => f.trim());
    case 'comma':
      return row.split(',').map((f) => f.trim());
    case 'whitespace':
      return row.trim().split(/\s+/);
  }
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

function roleOfHeader(cell: string): Role {
  const words = normaliseHeaderCell(cell);
  const joined = words.join(' ');
  if (words.length === 0) return 'ignore';
  if (/^(branch|br|p\/r|branch p\/r)$/.test(joined)) return 'branch';
  if (/^(j|j''|j"|j″|j_lower|jlower|j lower|j initial|lower j|j0|j_0)$/.test(joined)) return 'J';
  if (/^(m|running index|running index m|index m)$/.test(joined)) return 'm';
  if (/^(line|assignment|label|transition|line assignment)$/.test(joined)) return 'label';
  const wnWords = new Set([
    'wavenumber', 'wavenumbers', 'wave-number', 'nu', 'ν', 'ν̃', 'ṽ', 'v~', 'nu~', 'position',
    'positions', 'peak', 'cm-1', 'cm^-1', 'cm⁻¹', '/cm', '1/cm', 'frequency', 'freq', 'centre', 'center',
  ]);
  if (joined.includes('wave number') || words.some((w) => wnWords.has(w))) {
    // "peak number" / "peak no" is an index column, not a position.
    if (/\b(number|no\.?|#|index|nr)\b/.test(joined) && !/wave ?number/.test(joined)) return 'ignore';
    if (words.length === 1 && words[0] === 'peak') return 'wavenumber';
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
    if (bad) return { error: bad };
  }
  const plausible = numbers.filter((v) => wavenumberProblem(v) === null);
  if (plausible.length === 0) {
    if (numbers.length === 0) return { error: `no wavenumber found in ${quote(raw)}.` };
    const problem = wavenumberProblem(numbers[numbers.length - 1]);
    return { error: `no wavenumber in cm⁻¹ found: ${problem}` };
  }
  const entry: LineListEntry = { wavenumber: plausible[0], raw, line: lineNo };
  if (branch !== undefined) {
    entry.branch = branch;
    entry.J = J;
  }
  const result: RowResult = { entry, decimalComma };
  if (plausible.length > 1) {
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
  const wProblem = wavenumberProblem(wn.n.value);
  if (wProblem) return { error: wProblem };
  const entry: LineListEntry = { wavenumber: wn.n.value, raw, line: lineNo };
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
}

function attempt(rows: { text: string; line: number }[], delimiter: LineListDelimiter): Attempt {
  const allowDecimalComma = delimiter !== 'comma';
  const lines: LineListEntry[] = [];
  const warnings: LineListIssue[] = [];
  const errors: LineListIssue[] = [];
  const decimalCommaRows: number[] = [];
  let cols: Columns | null = null;
  let header = false;
  let start = 0;
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
      delimiter !== 'whitespace' ||
      (c?.m !== undefined && headerFields.length === splitRow(rows[start].text, delimiter).length);
    if (c && c.wavenumber !== undefined && aligned) cols = c;
    else if (c && c.wavenumber === undefined && delimiter !== 'whitespace') {
      warnings.push({
        line: rows[start - 1].line,
        message: 'The header names no wavenumber column; the positions were found from the values.',
      });
    }
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
      ? parseRowByColumns(fields, cols, allowDecimalComma, raw, line)
      : parseRowByContent(tokensOf(fields), allowDecimalComma, raw, line);
    if (res.error) {
      errors.push({ line, message: `Line ${line}: ${res.error}` });
      continue;
    }
    if (res.warning) warnings.push({ line, message: `Line ${line}: ${res.warning}` });
    if (res.decimalComma) decimalCommaRows.push(line);
    if (res.entry) lines.push(res.entry);
  }
  return { delimiter, result: { lines, warnings, errors, format: { delimiter, header } }, decimalCommaRows };
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
export function parseLineList(text: string, options: { maxRows?: number } = {}): LineListParse {
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
    const a = attempt(rows, d);
    if (!best || a.result.errors.length < best.result.errors.length) best = a;
  }
  const chosen = best!;
  const { result } = chosen;
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
