/**
 * Release: per submission, in one transaction, write the feedback PDF and its row, mark the
 * submission released and queue the e-mail that carries the PDF. If anything fails the
 * transaction rolls back and the file is removed, so a release is all or nothing; the outbox
 * then delivers at most once per dedupe key.
 *
 * A batch is a pipeline: the next submissions are read while earlier PDFs render on the worker
 * threads (lib/pdf/pool.ts) and finished ones are committed one transaction each, in the order
 * their PDFs come back. Progress is reported per submission.
 */
import crypto from 'node:crypto';
import fs from 'node:fs/promises';
import { sequelize } from '@/lib/db';
import { audit } from '@/lib/audit';
import { HttpError } from '@/lib/http';
import { queueEmail } from '@/lib/mail/outbox';
import { queueReleaseScores } from '@/lib/lti/scores';
import { feedbackPath } from '@/lib/storage';
import { renderEmail } from '@/lib/templates';
import { pdfWorkerCount, renderFeedbackPdf } from '@/lib/pdf/pool';
import { cohortName } from '@/lib/display';
import { models } from '@/models';
import { loadMarkingView } from './view';
import { feedbackInputFromView } from './feedback-input';

export function appUrl(): string {
  return (process.env.APP_ORIGIN || process.env.NEXTAUTH_URL || 'http://localhost:3000').replace(/\/$/, '');
}

export type ReleaseOutcome = { submissionId: number; ok: boolean; message?: string; feedbackDocumentId?: number };
/** POST /api/release's answer (the last line when it streams). */
export type ReleaseSummary = { results: ReleaseOutcome[]; released: number };
/** One line of POST /api/release's stream per submission, as it is released. */
export type ReleaseProgress = { done: number; total: number; submissionId: number; ok: boolean };

/** Where the time of a release went (ms, summed over submissions; wall is the whole batch). */
export type ReleaseTimings = { load: number; render: number; commit: number; wall: number };

type Loaded = Awaited<ReturnType<typeof loadMarkingView>>;

async function commitRelease(actorId: number, submissionId: number, view: Loaded, pdf: Uint8Array): Promise<ReleaseOutcome> {
  const storedName = `${crypto.randomBytes(16).toString('hex')}.pdf`;
  const file = feedbackPath(storedName);
  const { Submission, FeedbackDocument } = models();
  try {
    return await sequelize().transaction(async (t) => {
      await fs.writeFile(file, pdf);
      const [count] = await Submission.update(
        { status: 'released', releasedAt: new Date(), version: sequelize().literal('version + 1') as unknown as number },
        { where: { id: submissionId, status: 'marked', version: view.submission.version }, transaction: t },
      );
      if (count !== 1) throw new HttpError(409, 'The submission changed while it was being released; reload and try again.');
      const n = (await FeedbackDocument.count({ where: { submissionId }, transaction: t })) + 1;
      const doc = await FeedbackDocument.create(
        { submissionId, storedName, sha256: crypto.createHash('sha256').update(pdf).digest('hex'), size: pdf.byteLength },
        { transaction: t },
      );
      const mail = renderEmail('feedback-released', {
        student: view.student.name,
        practical: view.practical.title,
        course: `${view.course.code} ${view.course.title}`,
        cohort: cohortName(view.cohort),
        total: view.submission.awardedTotal ?? '—',
        max: view.marks.reduce((s, m) => s + m.maxMarks, 0),
        // Straight to the released attempt on the practical's page (sign-in first brings them back here).
        link: `${appUrl()}/student/practicals/${view.practical.id}#attempt-${submissionId}`,
      });
      await queueEmail(
        {
          dedupeKey: `release:${submissionId}:${n}`,
          to: view.student.email,
          subject: mail.subject,
          text: mail.text,
          submissionId,
          feedbackDocumentId: doc.id,
        },
        t,
      );
      // The score for the learning platform's gradebook, if the course is connected to one.
      await queueReleaseScores(view, n, t);
      await audit(
        {
          actorId,
          action: 'submission.release',
          entityType: 'submission',
          entityId: submissionId,
          before: { status: 'marked' },
          after: { status: 'released', feedbackDocumentId: doc.id },
        },
        t,
      );
      return { submissionId, ok: true, feedbackDocumentId: doc.id };
    });
  } catch (error) {
    await fs.rm(file, { force: true });
    if (error instanceof HttpError) return { submissionId, ok: false, message: error.message };
    throw error;
  }
}

async function releaseWith(actorId: number, submissionId: number, batchSize: number, timings?: ReleaseTimings): Promise<ReleaseOutcome> {
  let t0 = performance.now();
  const view = await loadMarkingView(submissionId);
  if (timings) timings.load += performance.now() - t0;
  if (view.submission.status === 'released') return { submissionId, ok: false, message: 'Already released.' };
  if (view.submission.status !== 'marked')
    return { submissionId, ok: false, message: 'Only marked submissions can be released: finish marking first.' };
  t0 = performance.now();
  const pdf = await renderFeedbackPdf(feedbackInputFromView(view), batchSize);
  if (timings) timings.render += performance.now() - t0;
  t0 = performance.now();
  const outcome = await commitRelease(actorId, submissionId, view, pdf);
  if (timings) timings.commit += performance.now() - t0;
  return outcome;
}

export async function releaseOne(actorId: number, submissionId: number): Promise<ReleaseOutcome> {
  return releaseWith(actorId, submissionId, 1);
}

/** How many releases of a batch are under way at once (each may be inside its own transaction). */
export function releaseLanes(): number {
  return 4 * Math.max(1, pdfWorkerCount());
}

/**
 * Release a batch. Several submissions are under way at once (four per PDF thread, so a thread
 * never waits for the reads and commits of this thread); outcomes come back in the order asked.
 * onProgress is called after each one.
 */
export async function releaseMany(
  actorId: number,
  submissionIds: number[],
  options: { onProgress?: (done: number, total: number, outcome: ReleaseOutcome) => void; timings?: ReleaseTimings } = {},
): Promise<ReleaseOutcome[]> {
  const ids = [...new Set(submissionIds)];
  const wall = performance.now();
  const out: ReleaseOutcome[] = new Array(ids.length);
  const lanes = Math.min(ids.length, releaseLanes());
  let next = 0;
  let done = 0;
  await Promise.all(
    Array.from({ length: lanes }, async () => {
      while (next < ids.length) {
        const i = next++;
        out[i] = await releaseWith(actorId, ids[i], ids.length, options.timings);
        options.onProgress?.(++done, ids.length, out[i]);
      }
    }),
  );
  if (options.timings) options.timings.wall += performance.now() - wall;
  return out;
}
