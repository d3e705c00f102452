/**
 * Reads an upload off the request thread. Sniffing and parsing a file are CPU work on input a
 * student controls; in a worker thread with its own heap limit and a deadline, a file that would
 * take too long or too much memory ends that worker only, and other users' requests go on.
 * Each file gets a fresh worker (uploads are rare next to other requests, and a worker that was
 * stopped or ran out of memory must not be reused).
 */
import fs from 'node:fs';
import path from 'node:path';
import { Worker } from 'node:worker_threads';
import type { UploadReading } from './read-upload';
import { log } from '@/lib/log';

export interface WorkerLimits {
  /** Wall-clock limit for one file, start-up included. */
  timeoutMs: number;
  /** Old-generation heap of the worker, in MB. */
  maxMemoryMb: number;
}

const positive = (v: string | undefined, d: number) => (v && Number.isFinite(Number(v)) && Number(v) > 0 ? Number(v) : d);

/** UPLOAD_PARSE_MS / UPLOAD_PARSE_MB, defaults 15 s and 256 MB (a 5 MB spectrum of 200 000 points needs far less). */
export function uploadParseLimits(): WorkerLimits {
  return { timeoutMs: positive(process.env.UPLOAD_PARSE_MS, 15_000), maxMemoryMb: positive(process.env.UPLOAD_PARSE_MB, 256) };
}

export type OffThreadReading =
  { ok: true; reading: UploadReading } | { ok: false; reason: 'timeout' | 'memory' | 'failed'; message: string };

/**
 * Which file the worker runs. Under `next start` (production): the compiled copy `npm run build`
 * writes into the build folder (scripts/build-worker.mjs), plain JavaScript that starts quickly
 * and needs no TypeScript loader. Otherwise (next dev, tests, scripts), or when that copy is missing
 * because the app was built with a bare `next build`: upload-worker.mjs beside the sources, which
 * runs them through tsx. The app runs from the repository root (next start, tests); the paths are
 * marked so the bundler leaves them alone.
 */
export function uploadWorkerEntry(): string {
  const root = /* turbopackIgnore: true */ process.cwd();
  if (process.env.NODE_ENV === 'production') {
    const compiled = path.resolve(/* turbopackIgnore: true */ root, process.env.NEXT_DIST_DIR || '.next', 'oscillab', 'upload-worker.mjs');
    if (fs.existsSync(/* turbopackIgnore: true */ compiled)) return compiled;
  }
  return path.join(/* turbopackIgnore: true */ root, 'lib', 'spectrum', 'upload-worker.mjs');
}

export function readUploadOffThread(
  bytes: Uint8Array,
  name: string,
  wantSpectrum: boolean,
  limits: WorkerLimits = uploadParseLimits(),
): Promise<OffThreadReading> {
  return new Promise((resolve) => {
    // A copy the worker owns: the caller keeps its bytes (it hashes and stores them afterwards).
    const copy = new Uint8Array(bytes);
    const worker = new Worker(/* turbopackIgnore: true */ uploadWorkerEntry(), {
      workerData: { bytes: copy, name, wantSpectrum },
      transferList: [copy.buffer as ArrayBuffer],
      resourceLimits: { maxOldGenerationSizeMb: limits.maxMemoryMb, maxYoungGenerationSizeMb: 32, stackSizeMb: 4 },
      stdout: false,
      stderr: false,
    });
    let settled = false;
    const finish = (result: OffThreadReading) => {
      if (settled) return;
      settled = true;
      clearTimeout(timer);
      resolve(result);
      worker.terminate().catch(() => undefined);
    };
    const timer = setTimeout(
      () =>
        finish({
          ok: false,
          reason: 'timeout',
          message: `Reading the file took longer than ${limits.timeoutMs < 1000 ? `${limits.timeoutMs} ms` : `${Math.round(limits.timeoutMs / 100) / 10} s`} and was stopped.`,
        }),
      limits.timeoutMs,
    );
    worker.once('message', (reading: UploadReading) => finish({ ok: true, reading }));
    worker.once('error', (error: Error & { code?: string }) => {
      if (error.code === 'ERR_WORKER_OUT_OF_MEMORY')
        finish({
          ok: false,
          reason: 'memory',
          message: `Reading the file needed more than ${limits.maxMemoryMb} MB of memory and was stopped.`,
        });
      else {
        log().error({ err: error, file: name }, 'upload reader failed');
        finish({ ok: false, reason: 'failed', message: 'The file could not be read.' });
      }
    });
    worker.once('exit', () => finish({ ok: false, reason: 'failed', message: 'The file could not be read.' }));
  });
}
