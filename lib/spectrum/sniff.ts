/**
 * Decides what an uploaded file is from its bytes, never from its name, and lists
 * every reason not to accept it. The caller rejects the upload when `problems` is
 * not empty; the name is only checked against the content.
 */
import { inflateSync } from 'node:zlib';

export type UploadKind = 'pdf' | 'jcamp' | 'csv' | 'unknown';

export interface SniffResult {
  /** What the content is; 'unknown' when it is none of the accepted kinds. */
  kind: UploadKind;
  /** What the file name's extension claims, when it names an accepted kind. */
  declaredKind: UploadKind | null;
  /** Human-readable reasons to refuse the file; empty when it may be accepted. */
  problems: string[];
  ok: boolean;
}

/** What each accepted extension may hold; ".txt" is used for both kinds of spectrum text. */
const EXTENSION_KINDS: Record<string, UploadKind[]> = {
  pdf: ['pdf'],
  jdx: ['jcamp'],
  dx: ['jcamp'],
  jcamp: ['jcamp'],
  jcm: ['jcamp'],
  csv: ['csv'],
  tsv: ['csv'],
  txt: ['csv', 'jcamp'],
};

const KIND_NAME: Record<UploadKind, string> = {
  pdf: 'a PDF document',
  jcamp: 'a JCAMP-DX spectrum',
  csv: 'a two-column CSV spectrum',
  unknown: 'not a file type Oscillab accepts',
};

/** Markup or script at the start of a file means it could be rendered as something else. */
const ACTIVE_CONTENT_RE = /<\s*(?:!doctype|html|head|body|script|iframe|svg|object|embed|meta|\?xml)\b/i;
const HEAD_BYTES = 1024;
const TAIL_BYTES = 1024;
/** How much of a text file is inspected for binary bytes and CSV structure. */
const TEXT_PROBE_BYTES = 64 * 1024;

function latin1(bytes: Uint8Array, from = 0, to = bytes.length): string {
  let s = '';
  const end = Math.min(to, bytes.length);
  for (let i = Math.max(0, from); i < end; i += 8192) {
    s += String.fromCharCode(...bytes.subarray(i, Math.min(end, i + 8192)));
  }
  return s;
}

function indexOfAscii(bytes: Uint8Array, needle: string): number {
  const first = needle.charCodeAt(0);
  const n = needle.length;
  outer: for (let i = bytes.indexOf(first); i !== -1 && i <= bytes.length - n; i = bytes.indexOf(first, i + 1)) {
    for (let k = 1; k < n; k++) if (bytes[i + k] !== needle.charCodeAt(k)) continue outer;
    return i;
  }
  return -1;
}

/** Basename's extension, lower case, without the dot; '' when there is none. */
export function extensionOf(name: string): string {
  const base = (name ?? '').split(/[\\/]/).pop() ?? '';
  const dot = base.lastIndexOf('.');
  return dot > 0 ? base.slice(dot + 1).toLowerCase() : '';
}

/** True when the bytes hold control characters that text files never contain. */
function looksBinary(bytes: Uint8Array): boolean {
  const n = Math.min(bytes.length, TEXT_PROBE_BYTES);
  let odd = 0;
  for (let i = 0; i < n; i++) {
    const b = bytes[i];
    if (b === 0) return true;
    // Allowed: tab, LF, VT, FF, CR; everything else below 0x20 (and DEL) is suspicious.
    if ((b < 0x20 && b !== 9 && b !== 10 && b !== 11 && b !== 12 && b !== 13) || b === 0x7f) odd++;
  }
  return odd > n * 0.001;
}

/** Decodes as UTF-8 when valid, else Latin-1 (old instruments write Latin-1 "°"). */
export function decodeText(bytes: Uint8Array): string {
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(bytes).replace(/^\uFEFF/, '');
  } catch {
    return latin1(bytes);
  }
}

const NUMBER_CELL = /^"?[+-]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+-]?\d+)?"?$/;

/** True when a row starts with two numbers. Tokenised without backtracking patterns, so long rows stay linear. */
function startsWithTwoNumbers(row: string): boolean {
  const t = row.replace(/\s+/g, ' ').trim();
  const cells = t.split(/ ?[;,] ?| /, 3);
  if (cells.length < 2) return false;
  return cells[0].length <= 40 && cells[1].length <= 40 && NUMBER_CELL.test(cells[0]) && NUMBER_CELL.test(cells[1]);
}

/** Two numeric columns on nearly every data row, after at most a few heading or comment rows. */
export function looksLikeNumericColumns(text: string): boolean {
  const rows = text.slice(0, TEXT_PROBE_BYTES).split(/\r\n|\r|\n/);
  if (text.length > TEXT_PROBE_BYTES) rows.pop(); // the probe may cut the last row short
  let numeric = 0;
  let other = 0;
  let leading = 0;
  for (const row of rows) {
    const t = row.trim();
    if (t === '' || t.startsWith('#')) continue;
    if (startsWithTwoNumbers(t)) numeric++;
    else if (numeric === 0 && leading < 10) leading++;
    else other++;
  }
  return numeric >= 2 && other <= Math.max(0, Math.floor(numeric * 0.01));
}

function sniffPdf(bytes: Uint8Array, problems: string[]): boolean {
  const head = latin1(bytes, 0, HEAD_BYTES);
  const tail = latin1(bytes, bytes.length - TAIL_BYTES);
  if (!tail.includes('%%EOF')) {
    problems.push('The file starts like a PDF but has no end-of-file marker (%%EOF); it may be truncated or damaged.');
    return false;
  }
  if (ACTIVE_CONTENT_RE.test(head)) {
    problems.push(
      'The PDF carries HTML or script markup at its start, so it could be read as a web page; save the report again as a plain PDF.',
    );
  }
  if (/##\s*TITLE\s*=/i.test(head)) {
    problems.push('The PDF also carries a JCAMP-DX header at its start; one file cannot be both.');
  }
  const active = activePdfName(bytes);
  if (active) {
    problems.push(
      `The PDF contains ${active === 'Launch' ? 'a launch action' : active === 'RichMedia' ? 'embedded media' : 'embedded JavaScript'}; save the report again as a plain PDF.`,
    );
  }
  return true;
}

/** PDF names that make a document act rather than show: scripts, launching programs, embedded media. */
const ACTIVE_PDF_NAMES = new Set(['JavaScript', 'JS', 'Launch', 'RichMedia']);
/** Bytes that end a PDF name: white space and delimiters (PDF 32000-1, 7.2.2). */
const PDF_NAME_END = new Set([0, 9, 10, 12, 13, 32, 0x28, 0x29, 0x3c, 0x3e, 0x5b, 0x5d, 0x7b, 0x7d, 0x2f, 0x25]);
/** How much an object stream may inflate to in all while it is searched (a compression bomb stops there). */
const PDF_INFLATE_BUDGET = 64 * 1024 * 1024;
const hexDigit = (b: number) => (b >= 48 && b <= 57 ? b - 48 : b >= 65 && b <= 70 ? b - 55 : b >= 97 && b <= 102 ? b - 87 : -1);

/**
 * The first active name in the bytes, with #xx escapes decoded first: "/Java#53cript" is the same
 * name as "/JavaScript" to a PDF reader (PDF 32000-1, 7.3.5), so it must be to this check too.
 */
function activeNameIn(bytes: Uint8Array): string | null {
  for (let i = bytes.indexOf(0x2f); i !== -1; i = bytes.indexOf(0x2f, i + 1)) {
    let name = '';
    let j = i + 1;
    for (; j < bytes.length && !PDF_NAME_END.has(bytes[j]) && name.length <= 12; j++) {
      const b = bytes[j];
      if (b === 0x23 && j + 2 < bytes.length && hexDigit(bytes[j + 1]) >= 0 && hexDigit(bytes[j + 2]) >= 0) {
        name += String.fromCharCode(hexDigit(bytes[j + 1]) * 16 + hexDigit(bytes[j + 2]));
        j += 2;
      } else {
        name += String.fromCharCode(b);
      }
    }
    if (ACTIVE_PDF_NAMES.has(name)) return name;
  }
  return null;
}

/**
 * Searches the file, and the inside of its compressed object streams (where objects, scripts
 * included, can be stored out of sight of a plain byte search), for active names. Inflation is
 * bounded, so a stream that expands without end is only read up to the budget.
 */
function activePdfName(bytes: Uint8Array): string | null {
  const plain = activeNameIn(bytes);
  if (plain) return plain;
  let budget = PDF_INFLATE_BUDGET;
  for (let at = indexOfAscii(bytes, 'stream'); at !== -1 && budget > 0;) {
    const dictStart = Math.max(0, at - 512);
    const dict = latin1(bytes, dictStart, at);
    let dataStart = at + 6;
    if (bytes[dataStart] === 13) dataStart++;
    if (bytes[dataStart] === 10) dataStart++;
    const end = indexOfAsciiFrom(bytes, 'endstream', dataStart);
    if (end === -1) break;
    if (/\/ObjStm\b/.test(dict.slice(dict.lastIndexOf('<<'))) && /\/FlateDecode\b/.test(dict.slice(dict.lastIndexOf('<<')))) {
      try {
        const inflated = inflateSync(bytes.subarray(dataStart, end), { maxOutputLength: budget });
        budget -= inflated.length;
        const found = activeNameIn(inflated);
        if (found) return found;
      } catch (e) {
        // Past the budget the stream is not searched further; a damaged stream is left to the reader.
        if ((e as { code?: string }).code === 'ERR_BUFFER_TOO_LARGE') return null;
      }
    }
    at = indexOfAsciiFrom(bytes, 'stream', end + 9);
  }
  return null;
}

function indexOfAsciiFrom(bytes: Uint8Array, needle: string, from: number): number {
  const i = indexOfAscii(bytes.subarray(from), needle);
  return i === -1 ? -1 : i + from;
}

function sniffText(text: string, problems: string[]): UploadKind {
  const start = text.replace(/^[\s\uFEFF]+/, '');
  if (/^%PDF-/.test(start)) {
    problems.push('The file holds a PDF header after leading text; it is not a well-formed PDF.');
    return 'unknown';
  }
  const head = start.slice(0, HEAD_BYTES);
  if (ACTIVE_CONTENT_RE.test(head)) {
    problems.push('The file contains HTML or script markup; upload the spectrum as JCAMP-DX or CSV.');
    return 'unknown';
  }
  if (/^##\s*TITLE\s*=/i.test(start)) {
    if (!/##\s*END\s*=/i.test(start)) {
      problems.push('The JCAMP-DX file has no ##END= record; it may be truncated.');
      return 'unknown';
    }
    if (/%PDF-/.test(start)) problems.push('The JCAMP-DX file also embeds a PDF; one file cannot be both.');
    return 'jcamp';
  }
  if (/^##/.test(start)) {
    problems.push('The file looks like JCAMP-DX but does not start with ##TITLE= as the standard requires.');
    return 'unknown';
  }
  if (looksLikeNumericColumns(start)) return 'csv';
  return 'unknown';
}

/**
 * Inspects an upload. `declaredName` is the client's file name, used only to report a
 * mismatch between what it claims and what the bytes are.
 */
export function sniffUpload(bytes: Uint8Array, declaredName: string): SniffResult {
  const problems: string[] = [];
  const ext = extensionOf(declaredName);
  const allowed = ext ? EXTENSION_KINDS[ext] : undefined;
  const declaredKind = allowed ? allowed[0] : null;
  const finish = (kind: UploadKind): SniffResult => {
    if (ext && !allowed) {
      problems.push(`Files ending in ".${ext}" are not accepted; upload a PDF report, or a JCAMP-DX (.jdx, .dx) or CSV spectrum.`);
    } else if (allowed && kind !== 'unknown' && !allowed.includes(kind)) {
      problems.push(`The file is named ".${ext}" but its content is ${KIND_NAME[kind]}.`);
    }
    if (kind === 'unknown' && problems.length === 0) {
      problems.push(
        declaredKind
          ? `The file is named ".${ext}" but its content is not ${KIND_NAME[declaredKind]}.`
          : 'The file is not a PDF, JCAMP-DX or two-column CSV file.',
      );
    }
    return { kind, declaredKind, problems, ok: problems.length === 0 };
  };

  if (!bytes || bytes.length === 0) {
    problems.push('The file is empty (0 bytes).');
    return { kind: 'unknown', declaredKind, problems, ok: false };
  }
  if (latin1(bytes, 0, 5) === '%PDF-') {
    return finish(sniffPdf(bytes, problems) ? 'pdf' : 'unknown');
  }
  if (looksBinary(bytes)) {
    problems.push('The file contains binary data, not text; spectra must be JCAMP-DX or CSV text files.');
    return finish('unknown');
  }
  return finish(sniffText(decodeText(bytes), problems));
}
