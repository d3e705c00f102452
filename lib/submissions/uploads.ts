/**
 * Spectrum and report uploads. The content decides the type (sniffUpload), never the name; a
 * spectrum must also parse. Files are stored under uploadDir() with a random name, with their
 * sha256. Whatever is refused leaves nothing on disk and nothing in the database.
 */
import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { Readable } from 'node:stream';
import type { IncomingMessage } from 'node:http';
import formidable from 'formidable';
import { HttpError } from '@/lib/http';
import { uploadDir, uploadPath } from '@/lib/storage';
import type { UploadKind as SniffKind } from '@/lib/spectrum/sniff';
import { readUploadOffThread } from '@/lib/spectrum/worker';
import type { UploadKind } from '@/lib/schemas/submission';

const MB = 1024 * 1024;

const positive = (v: string | undefined, d: number) => (v && Number.isFinite(Number(v)) && Number(v) > 0 ? Number(v) : d);

export function uploadLimits() {
  return { spectrum: positive(process.env.SPECTRUM_MAX_BYTES, 5 * MB), report: positive(process.env.REPORT_MAX_BYTES, 20 * MB) };
}

/**
 * How long an upload may take: a body that sends nothing for `idleMs`, or is still arriving after
 * `totalMs`, is cut off with 408 (a stalled or deliberately slow client would otherwise hold a
 * connection and a half-written file). The defaults allow a 20 MB report over a slow link.
 */
export function uploadTimeouts() {
  return { idleMs: positive(process.env.UPLOAD_IDLE_MS, 30_000), totalMs: positive(process.env.UPLOAD_TOTAL_MS, 300_000) };
}

class UploadTimeout extends Error {
  constructor(readonly why: 'idle' | 'total') {
    super(`upload ${why} timeout`);
  }
}

/** The request body as a Node stream that fails with UploadTimeout when the client stalls or takes too long. */
function timedBody(body: ReadableStream<Uint8Array>, { idleMs, totalMs }: { idleMs: number; totalMs: number }): Readable {
  const reader = body.getReader();
  const deadline = Date.now() + totalMs;
  return new Readable({
    async read() {
      let timer: NodeJS.Timeout | undefined;
      const untilDeadline = deadline - Date.now();
      const why = untilDeadline < idleMs ? 'total' : 'idle';
      const timeout = new Promise<never>((_, reject) => {
        timer = setTimeout(() => reject(new UploadTimeout(why)), Math.max(0, Math.min(idleMs, untilDeadline)));
      });
      try {
        const chunk = await Promise.race([reader.read(), timeout]);
        this.push(chunk.done ? null : Buffer.from(chunk.value));
      } catch (error) {
        this.destroy(error as Error);
      } finally {
        clearTimeout(timer);
      }
    },
    destroy(error, callback) {
      reader.cancel().catch(() => undefined);
      callback(error);
    },
  });
}

const CONTENT_TYPES: Record<Exclude<SniffKind, 'unknown'>, { type: string; ext: string }> = {
  pdf: { type: 'application/pdf', ext: '.pdf' },
  jcamp: { type: 'chemical/x-jcamp-dx', ext: '.jdx' },
  csv: { type: 'text/csv', ext: '.csv' },
};

export interface ReceivedFile {
  tempPath: string;
  originalName: string;
  size: number;
}

/** Streams a multipart request through formidable into the upload directory; temp files are removed on any failure. */
export async function receiveMultipart(
  request: Request,
  maxBytes: number,
): Promise<{ fields: Record<string, string>; file: ReceivedFile | null; cleanup: () => void }> {
  const type = request.headers.get('content-type') ?? '';
  if (!type.toLowerCase().startsWith('multipart/form-data')) throw new HttpError(415, 'Send the file as multipart/form-data.');
  const declared = Number(request.headers.get('content-length') ?? 0);
  if (declared > maxBytes + 64 * 1024) throw new HttpError(413, `The file is too large (limit ${formatBytes(maxBytes)}).`);
  if (!request.body) throw new HttpError(400, 'No file was sent.');
  let dir: string;
  try {
    dir = uploadDir();
  } catch (e) {
    throw storageRefusal(e) ?? e;
  }
  const created: string[] = [];
  const streams: fs.WriteStream[] = [];
  const cleanup = () => {
    for (const p of created) fs.rmSync(p, { force: true });
  };
  const timeouts = uploadTimeouts();
  const stream = timedBody(request.body, timeouts) as unknown as IncomingMessage;
  const headers: Record<string, string> = Object.fromEntries(request.headers.entries());
  // Without a length formidable assumes an empty body; a streamed body is chunked.
  if (headers['content-length'] === undefined) headers['transfer-encoding'] = 'chunked';
  Object.assign(stream, { headers });
  const form = formidable({
    uploadDir: dir,
    maxFiles: 1,
    maxFields: 10,
    maxFieldsSize: 64 * 1024,
    maxFileSize: maxBytes,
    maxTotalFileSize: maxBytes,
    allowEmptyFiles: true,
    minFileSize: 0,
    filename: () => `${crypto.randomBytes(16).toString('hex')}.part`,
    // Our own write streams, so a refused upload can wait for them to close before removing the file.
    fileWriteStreamHandler: ((file: { filepath: string }) => {
      const ws = fs.createWriteStream(file.filepath);
      ws.on('error', () => undefined); // read from ws.errored below
      streams.push(ws);
      return ws;
    }) as never,
  });
  form.on('fileBegin', (_name, file) => {
    created.push(file.filepath);
  });
  try {
    const [fields, files] = await form.parse(stream);
    // formidable can finish the form before a failed disk write reaches it (the write stream's
    // 'error' comes after 'end'), which would leave a truncated file looking complete.
    await Promise.all(streams.map((ws) => (ws.closed ? null : new Promise<void>((resolve) => ws.once('close', () => resolve())))));
    const failedWrite = streams.find((ws) => ws.errored)?.errored;
    if (failedWrite) throw failedWrite;
    const flat: Record<string, string> = {};
    for (const [k, v] of Object.entries(fields)) if (v && v.length) flat[k] = String(v[0]);
    const list = Object.values(files).flat().filter(Boolean) as formidable.File[];
    const f = list[0];
    return { fields: flat, file: f ? { tempPath: f.filepath, originalName: f.originalFilename ?? '', size: f.size } : null, cleanup };
  } catch (e) {
    // A file may still be opening when formidable gives up (e.g. a second file): removing it
    // before its stream has closed would let the open create it again afterwards.
    await Promise.all(
      streams.map((ws) => (ws.closed ? null : new Promise<void>((resolve) => ws.once('close', () => resolve()).destroy()))),
    );
    cleanup();
    if (e instanceof UploadTimeout) {
      throw new HttpError(
        408,
        e.why === 'idle'
          ? `The upload stalled (nothing arrived for ${formatDuration(timeouts.idleMs)}) and was stopped; nothing was saved. Try again on a steadier connection.`
          : `The upload took longer than ${formatDuration(timeouts.totalMs)} and was stopped; nothing was saved. Try again on a faster connection.`,
      );
    }
    const refusal = storageRefusal(e) ?? storageRefusal(streams.find((ws) => ws.errored)?.errored);
    if (refusal) throw refusal;
    const err = e as { httpCode?: number; code?: number; message?: string };
    if (err.httpCode === 413 || /maxFileSize|maxTotalFileSize|exceeded/i.test(err.message ?? ''))
      throw new HttpError(413, `The file is too large (limit ${formatBytes(maxBytes)}).`);
    if (/maxFiles/i.test(err.message ?? '')) throw new HttpError(400, 'Send one file at a time.');
    throw new HttpError(400, 'The upload could not be read as multipart form data.');
  }
}

const STORAGE_FULL = new Set(['ENOSPC', 'EDQUOT', 'EFBIG']);
const STORAGE_UNAVAILABLE = new Set(['EACCES', 'EPERM', 'EROFS', 'ENOTDIR', 'EEXIST', 'EIO', 'ENOENT']);
const UNCHANGED = 'Your draft and earlier submissions are unchanged; try again later, or tell your instructor if it keeps happening.';

/** A failure of the upload storage itself (disk full, folder unwritable) as a clear refusal, not a 500 and not the student's fault. */
export function storageRefusal(error: unknown): HttpError | null {
  const code = (error as { code?: unknown } | null | undefined)?.code;
  if (typeof code !== 'string') return null;
  if (STORAGE_FULL.has(code))
    return new HttpError(507, `The server has no room left to store files, so your file was not saved. ${UNCHANGED}`);
  if (STORAGE_UNAVAILABLE.has(code))
    return new HttpError(503, `File storage is unavailable right now, so your file was not saved. ${UNCHANGED}`);
  return null;
}

const formatDuration = (ms: number) =>
  ms < 1000 ? `${ms} ms` : ms < 120_000 ? `${+(ms / 1000).toFixed(1)} s` : `${+(ms / 60_000).toFixed(1)} minutes`;

export function formatBytes(n: number): string {
  return n >= MB ? `${+(n / MB).toFixed(1)} MB` : `${Math.ceil(n / 1024)} kB`;
}

/** A file name as the student's computer named it; refused if it tries to name folders or control characters. */
export function checkOriginalName(name: string): string {
  const trimmed = name.trim();
  if (!trimmed) throw new HttpError(400, 'The file has no name.');
  if (/[\\/]/.test(trimmed) || trimmed.split(/[\\/]/).includes('..') || trimmed === '..' || trimmed.startsWith('.')) {
    throw new HttpError(400, 'The file name must be a plain name, without folders or a leading dot.');
  }
  // eslint-disable-next-line no-control-regex -- refusing control characters is the point of this pattern
  if (/[\u0000-\u001f\u007f]/.test(trimmed)) throw new HttpError(400, 'The file name contains control characters.');
  if (trimmed.length > 200) throw new HttpError(400, 'The file name is too long (at most 200 characters).');
  return trimmed;
}

export interface AcceptedFile {
  storedName: string;
  sha256: string;
  size: number;
  contentType: string;
  originalName: string;
  finalPath: string;
  warnings: string[];
}

/**
 * Checks the received bytes for the kind asked for and moves the file to its final random name.
 * The content is read in a worker thread with its own memory and time limits (lib/spectrum/worker.ts),
 * so no file can stall or end the process that serves everyone else.
 */
/** POST /api/uploads's answer. */
export type UploadAccepted = {
  id: number;
  kind: string;
  sample: string | null;
  originalName: string;
  size: number;
  version: number;
  warnings: string[];
};

export async function acceptFile(file: ReceivedFile, kind: UploadKind): Promise<AcceptedFile> {
  const limits = uploadLimits();
  const originalName = checkOriginalName(file.originalName);
  if (file.size > limits[kind])
    throw new HttpError(
      413,
      `A ${kind === 'report' ? 'report' : 'spectrum'} may be at most ${formatBytes(limits[kind])}; this file is ${formatBytes(file.size)}.`,
    );
  const bytes = fs.readFileSync(file.tempPath);
  if (bytes.length === 0) throw new HttpError(400, 'The file is empty (0 bytes).');
  const read = await readUploadOffThread(new Uint8Array(bytes), originalName, kind === 'spectrum');
  if (!read.ok) {
    if (read.reason === 'failed')
      throw new HttpError(
        422,
        'The file could not be read; check that it is a PDF report or a JCAMP-DX or CSV spectrum and upload it again.',
      );
    throw new HttpError(
      422,
      `${read.message} A ${kind === 'report' ? 'report PDF' : 'spectrum'} should read in well under a second; ${kind === 'report' ? 'save the report again as a plain PDF' : 'export the spectrum again at a coarser spacing'}.`,
    );
  }
  const { sniff, parsed } = read.reading;
  if (!sniff.ok) throw new HttpError(415, sniff.problems.join(' '));
  const warnings: string[] = [];
  if (kind === 'report' && sniff.kind !== 'pdf') throw new HttpError(415, 'The report must be a PDF document.');
  if (kind === 'spectrum') {
    if (sniff.kind !== 'jcamp' && sniff.kind !== 'csv')
      throw new HttpError(415, 'The spectrum must be a JCAMP-DX (.jdx, .dx) or two-column CSV file.');
    if (!parsed) throw new HttpError(422, 'The spectrum could not be read.');
    if (!parsed.ok) throw new HttpError(422, `The spectrum could not be read: ${parsed.message}`);
    warnings.push(...parsed.warnings);
  }
  const ct = CONTENT_TYPES[sniff.kind as Exclude<SniffKind, 'unknown'>];
  const storedName = `${crypto.randomBytes(16).toString('hex')}${ct.ext}`;
  const finalPath = uploadPath(storedName);
  try {
    fs.renameSync(file.tempPath, finalPath);
  } catch (e) {
    throw storageRefusal(e) ?? e;
  }
  return {
    storedName,
    sha256: crypto.createHash('sha256').update(bytes).digest('hex'),
    size: bytes.length,
    contentType: ct.type,
    originalName: path.basename(originalName),
    finalPath,
    warnings,
  };
}
