/**
 * Files without a row. A file is written before the transaction that records it commits (an upload
 * is moved into place, a feedback PDF written), so a process killed in between leaves a file that
 * nothing refers to; never the reverse. The sweep removes such files once they are older than a
 * grace period long enough for any upload or release still in progress. Only names Oscillab
 * itself gives (random hex, or a formidable `.part`) are considered; anything else is left alone.
 */
import 'server-only';
import { log, withRun, type Logger } from '@/lib/log';
import fs from 'node:fs';
import path from 'node:path';
import { models } from '@/models';
import { feedbackDir, isStoredName, uploadDir } from '@/lib/storage';
import { uploadTimeouts } from '@/lib/submissions/uploads';

export function sweepGraceMs(): number {
  return Math.max(60 * 60_000, 2 * uploadTimeouts().totalMs);
}

export type SweepReport = { removed: string[]; kept: number };

export function sweepOrphanFiles(options: { now?: Date; graceMs?: number } = {}): Promise<SweepReport> {
  return withRun('storage-sweep', (logger) => sweep(logger, options));
}

async function sweep(logger: Logger, options: { now?: Date; graceMs?: number }): Promise<SweepReport> {
  const now = (options.now ?? new Date()).getTime();
  const grace = options.graceMs ?? sweepGraceMs();
  const { Upload, FeedbackDocument } = models();
  const referenced = new Set<string>([
    ...(await Upload.findAll({ attributes: ['storedName'], raw: true })).map((u) => u.storedName),
    ...(await FeedbackDocument.findAll({ attributes: ['storedName'], raw: true })).map((d) => d.storedName),
  ]);
  const removed: string[] = [];
  let kept = 0;
  for (const dir of [uploadDir(), feedbackDir()]) {
    for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
      if (!entry.isFile()) continue;
      const name = entry.name;
      if (!isStoredName(name)) continue;
      const file = path.join(dir, name);
      let age: number;
      try {
        age = now - fs.statSync(file).mtimeMs;
      } catch {
        continue; // removed meanwhile
      }
      if (referenced.has(name) || age < grace) {
        kept++;
        continue;
      }
      fs.rmSync(file, { force: true });
      removed.push(path.relative(uploadDir(), file));
    }
  }
  logger[removed.length ? 'warn' : 'info'](
    { removed, kept },
    removed.length ? `storage sweep removed ${removed.length} file(s) without a row` : 'storage sweep found nothing to remove',
  );
  return { removed, kept };
}

let timer: NodeJS.Timeout | null = null;

/** Sweep a minute after start and then every six hours (started by instrumentation.ts). */
export function startStorageSweeper(intervalMs = 6 * 60 * 60_000): void {
  if (timer) return;
  const run = () => sweepOrphanFiles().catch((error) => log().error({ err: error }, 'storage sweep failed'));
  setTimeout(run, 60_000).unref?.();
  timer = setInterval(run, intervalMs);
  timer.unref?.();
}
