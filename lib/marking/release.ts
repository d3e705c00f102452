/**
 * Release: per submission, write the feedback PDF, then in one savepoint record its row, mark the
 * submission released and queue the e-mail that carries the PDF. If anything fails the savepoint
 * (or the whole group's transaction) rolls back and the file is removed, so a release is all or
 * nothing; the outbox then delivers at most once per dedupe key.
 *
 * A batch is a pipeline: the next submissions are read while earlier PDFs render on the worker
 * threads (lib/pdf/pool.ts), and finished ones are committed in groups (GroupCommitter), each
 * release in its own savepoint of the group's transaction. Progress is reported per submission.
 */
import crypto from 'node:crypto';
import fs from 'node:fs/promises';
import type { Transaction } from 'sequelize';
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
import { loadFeedbackViews, type FeedbackView } from './view';
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

/** A release whose PDF is rendered and written to its file, waiting for its transaction. */
type Rendered = { submissionId: number; view: FeedbackView; pdf: Uint8Array; storedName: string };

/** Groups of at most this many releases share one transaction (one savepoint each). */
const MAX_GROUP = 16;

/**
 * The database side of one release, inside its own savepoint of the group's transaction: mark the
 * submission released (only if nobody changed it since it was read), record the document, queue
 * the e-mail and the learning platform's score, audit. Throws HttpError (409) when it changed.
 */
async function recordRelease(actorId: number, r: Rendered, t: Transaction): Promise<ReleaseOutcome> {
  const { submissionId, view, pdf, storedName } = r;
  const { Submission, FeedbackDocument } = models();
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
}

/**
 * Commits a batch's rendered releases, a group at a time: whatever has finished rendering while
 * the previous group committed goes into the next transaction, each release in its own savepoint.
 * A release that changed under us (409) rolls back its savepoint alone; any other failure rolls
 * back the whole group and reaches every caller in it. Files of releases that did not commit are
 * removed. One transaction per group rather than per release: SQLite has one writer, and the
 * work every transaction does once (BEGIN, the kept statistics, COMMIT) is then shared.
 */
class GroupCommitter {
  private waiting: { r: Rendered; settle: (o: ReleaseOutcome | Error) => void }[] = [];
  private running = false;

  constructor(
    private readonly actorId: number,
    private readonly afterCommit?: () => void,
  ) {}

  commit(r: Rendered): Promise<ReleaseOutcome> {
    return new Promise((resolve, reject) => {
      this.waiting.push({ r, settle: (o) => (o instanceof Error ? reject(o) : resolve(o)) });
      void this.drain();
    });
  }

  private async drain(): Promise<void> {
    if (this.running) return;
    this.running = true;
    try {
      while (this.waiting.length) await this.commitGroup(this.waiting.splice(0, MAX_GROUP));
    } finally {
      this.running = false;
    }
  }

  private async commitGroup(group: { r: Rendered; settle: (o: ReleaseOutcome | Error) => void }[]): Promise<void> {
    const outcomes: ReleaseOutcome[] = [];
    try {
      await sequelize().transaction(async (t) => {
        for (const { r } of group) {
          try {
            outcomes.push(await sequelize().transaction({ transaction: t }, (savepoint) => recordRelease(this.actorId, r, savepoint)));
          } catch (error) {
            if (!(error instanceof HttpError)) throw error;
            outcomes.push({ submissionId: r.submissionId, ok: false, message: error.message });
          }
        }
      });
    } catch (error) {
      await Promise.all(group.map(({ r }) => fs.rm(feedbackPath(r.storedName), { force: true })));
      for (const { settle } of group) settle(error instanceof Error ? error : new Error(String(error)));
      return;
    }
    if (outcomes.some((o) => o.ok)) this.afterCommit?.();
    for (const [i, { r, settle }] of group.entries()) {
      if (!outcomes[i].ok) await fs.rm(feedbackPath(r.storedName), { force: true });
      settle(outcomes[i]);
    }
  }
}

/** Submissions are read this many at a time, a statement per table for each chunk. */
const READ_CHUNK = 16;

/**
 * Reads a batch's feedback views a chunk at a time, and the next chunk while the releases of
 * this one render, so the reads keep ahead of the PDF threads without holding the whole batch.
 */
class ViewReader {
  private chunks = new Map<number, Promise<Map<number, FeedbackView>>>();

  constructor(private readonly ids: number[]) {}

  read(index: number): Promise<FeedbackView | undefined> {
    const chunk = Math.floor(index / READ_CHUNK);
    const views = this.chunk(chunk);
    this.chunk(chunk + 1);
    this.chunks.delete(chunk - 2);
    return views.then((m) => m.get(this.ids[index]));
  }

  private chunk(n: number): Promise<Map<number, FeedbackView>> {
    let views = this.chunks.get(n);
    if (!views) {
      const ids = this.ids.slice(n * READ_CHUNK, (n + 1) * READ_CHUNK);
      views = ids.length ? loadFeedbackViews(ids) : Promise.resolve(new Map());
      // A read ahead that fails is reported to the release that needs it, not as an unhandled rejection.
      views.catch(() => undefined);
      this.chunks.set(n, views);
    }
    return views;
  }
}

async function releaseWith(
  committer: GroupCommitter,
  reader: ViewReader,
  index: number,
  submissionId: number,
  batchSize: number,
  timings?: ReleaseTimings,
): Promise<ReleaseOutcome> {
  let t0 = performance.now();
  const view = await reader.read(index);
  if (timings) timings.load += performance.now() - t0;
  if (!view) return { submissionId, ok: false, message: 'Not found.' };
  if (view.submission.status === 'released') return { submissionId, ok: false, message: 'Already released.' };
  if (view.submission.status !== 'marked')
    return { submissionId, ok: false, message: 'Only marked submissions can be released: finish marking first.' };
  t0 = performance.now();
  const pdf = await renderFeedbackPdf(feedbackInputFromView(view), batchSize);
  // The file is written before the transaction (outside SQLite's one writer turn) and removed
  // again if the release does not commit.
  const storedName = `${crypto.randomBytes(16).toString('hex')}.pdf`;
  await fs.writeFile(feedbackPath(storedName), pdf);
  if (timings) timings.render += performance.now() - t0;
  t0 = performance.now();
  const outcome = await committer.commit({ submissionId, view, pdf, storedName });
  if (timings) timings.commit += performance.now() - t0;
  return outcome;
}

export async function releaseOne(actorId: number, submissionId: number): Promise<ReleaseOutcome> {
  return (await releaseMany(actorId, [submissionId]))[0];
}

/** How many releases of a batch are under way at once (reading, rendering or waiting for their group's commit). */
export function releaseLanes(): number {
  return 4 * Math.max(1, pdfWorkerCount());
}

/**
 * Release a batch. Several submissions are under way at once (four per PDF thread, so a thread
 * never waits for the reads and commits of this thread); outcomes come back in the order asked.
 * onProgress is called after each one, afterCommit after each group of releases is committed
 * (the release route starts sending their e-mails there).
 */
export async function releaseMany(
  actorId: number,
  submissionIds: number[],
  options: {
    onProgress?: (done: number, total: number, outcome: ReleaseOutcome) => void;
    afterCommit?: () => void;
    timings?: ReleaseTimings;
  } = {},
): Promise<ReleaseOutcome[]> {
  const ids = [...new Set(submissionIds)];
  const wall = performance.now();
  const out: ReleaseOutcome[] = new Array(ids.length);
  const lanes = Math.min(ids.length, releaseLanes());
  const committer = new GroupCommitter(actorId, options.afterCommit);
  const reader = new ViewReader(ids);
  let next = 0;
  let done = 0;
  await Promise.all(
    Array.from({ length: lanes }, async () => {
      while (next < ids.length) {
        const i = next++;
        out[i] = await releaseWith(committer, reader, i, ids[i], ids.length, options.timings);
        options.onProgress?.(++done, ids.length, out[i]);
      }
    }),
  );
  if (options.timings) options.timings.wall += performance.now() - wall;
  return out;
}
