/**
 * Decides what an uploaded file is from its bytes, never from its name, and lists
 * every reason not to accept it. The caller rejects the upload when `problems` is
 * not empty; the name is only checked against the content.
 */

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
    problems.push('The PDF carries HTML or script markup at its start, so it could be read as a web page; save the report again as a plain PDF.');
  }
  if (/##\s*TITLE\s*=/i.test(head)) {
    problems.push('The PDF also carries a JCAMP-DX header at its start; one file cannot be both.');
  }
  // Compressed object streams can still hide these, so this is a best effort.
  if (indexOfAscii(bytes, '/JavaScript') >= 0 || indexOfAscii(bytes, '/Launch') >= 0) {
    problems.push('The PDF contains embedded JavaScript or a launch action; save the report again as a plain PDF.');
  }
  return true;
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
