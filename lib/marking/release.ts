/**
 * Release: per submission, write the feedback PDF, then in its group's transaction mark the
 * submission released, record the document and queue the e-mail that carries the PDF. If the
 * transaction fails it rolls back and the files are removed, so a release is all or nothing; the
 * outbox then delivers at most once per dedupe key.
 *
 * A batch is a pipeline: submissions are read a chunk at a time (ViewReader), rendered on the
 * worker threads (lib/pdf/pool.ts) and committed in groups (GroupCommitter) while the next ones
 * render. Progress is reported per submission, and the route sends each group's e-mails as soon
 * as it commits.
 */
import crypto from 'node:crypto';
import fs from 'node:fs/promises';
import type { Transaction } from 'sequelize';
import { sequelize } from '@/lib/db';
import { auditAll } from '@/lib/audit';
import { queueEmails } from '@/lib/mail/outbox';
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

/** A submission about to be released, and how many times it was released before. */
type ToRelease = { view: FeedbackView; earlierReleases: number };

/** A release whose PDF is rendered and written to its file, waiting for its transaction. */
type Rendered = ToRelease & { submissionId: number; pdf: Uint8Array; storedName: string };

/** Groups of at most this many releases share one transaction. */
const MAX_GROUP = 16;

/** At most this many rendered releases wait for their group's commit (each holds its PDF). */
const MAX_WAITING = 2 * MAX_GROUP;

const CHANGED = 'The submission changed while it was being released; reload and try again.';

/**
 * The database side of a group of releases, in one transaction: mark each submission released
 * (only if nobody changed it since it was read: otherwise it is left out, before anything of it is
 * written) and record its document; then, for those released, queue the e-mails and the learning
 * platform's scores, and audit, a statement each for the whole group.
 */
async function recordGroup(actorId: number, group: Rendered[], t: Transaction): Promise<ReleaseOutcome[]> {
  const { Submission, FeedbackDocument } = models();
  const outcomes: ReleaseOutcome[] = [];
  const released: { r: Rendered; releaseNumber: number; feedbackDocumentId: number }[] = [];
  for (const r of group) {
    const { submissionId, view, earlierReleases, pdf, storedName } = r;
    const [count] = await Submission.update(
      { status: 'released', releasedAt: new Date(), version: sequelize().literal('version + 1') as unknown as number },
      { where: { id: submissionId, status: 'marked', version: view.submission.version }, transaction: t },
    );
    if (count !== 1) {
      outcomes.push({ submissionId, ok: false, message: CHANGED });
      continue;
    }
    const doc = await FeedbackDocument.create(
      { submissionId, storedName, sha256: crypto.createHash('sha256').update(pdf).digest('hex'), size: pdf.byteLength },
      { transaction: t },
    );
    // Counted when the submission was read, and still right: only a release adds a feedback
    // document, every release changes the version, and the update above found the version unchanged.
    released.push({ r, releaseNumber: earlierReleases + 1, feedbackDocumentId: doc.id });
    outcomes.push({ submissionId, ok: true, feedbackDocumentId: doc.id });
  }
  await queueEmails(
    released.map(({ r: { submissionId, view }, releaseNumber, feedbackDocumentId }) => {
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
      return {
        dedupeKey: `release:${submissionId}:${releaseNumber}`,
        to: view.student.email,
        subject: mail.subject,
        text: mail.text,
        submissionId,
        feedbackDocumentId,
      };
    }),
    t,
  );
  // The scores for the learning platform's gradebook, where the course is connected to one.
  await queueReleaseScores(
    released.map(({ r, releaseNumber }) => ({ view: r.view, releaseNumber })),
    t,
  );
  await auditAll(
    released.map(({ r, feedbackDocumentId }) => ({
      actorId,
      action: 'submission.release',
      entityType: 'submission',
      entityId: r.submissionId,
      before: { status: 'marked' },
      after: { status: 'released', feedbackDocumentId },
    })),
    t,
  );
  return outcomes;
}

/**
 * Commits a batch's rendered releases, a group at a time: whatever has finished rendering while
 * the previous group committed goes into the next transaction. A release that changed under us
 * (409) is found by its first statement, before it writes anything, so it is simply left out;
 * any other failure rolls back the whole group and reaches every caller in it. Files of releases
 * that did not commit are removed. One transaction per group rather than per release: SQLite has
 * one writer, and the work every transaction does once (BEGIN, the kept statistics, COMMIT) is
 * then shared.
 */
class GroupCommitter {
  private waiting: { r: Rendered; settle: (o: ReleaseOutcome | Error) => void }[] = [];
  private running: Promise<void> | null = null;
  private group: Promise<void> | null = null;

  constructor(
    private readonly actorId: number,
    private readonly afterCommit?: () => void,
  ) {}

  commit(r: Rendered): Promise<ReleaseOutcome> {
    return new Promise((resolve, reject) => {
      this.waiting.push({ r, settle: (o) => (o instanceof Error ? reject(o) : resolve(o)) });
      this.running ??= this.drain();
    });
  }

  /** Resolves once fewer than `limit` releases are waiting for a commit. */
  async room(limit: number): Promise<void> {
    while (this.waiting.length >= limit && this.group) await this.group;
  }

  private async drain(): Promise<void> {
    try {
      while (this.waiting.length) await (this.group = this.commitGroup(this.waiting.splice(0, MAX_GROUP)));
    } finally {
      this.group = null;
      this.running = null;
    }
  }

  private async commitGroup(group: { r: Rendered; settle: (o: ReleaseOutcome | Error) => void }[]): Promise<void> {
    let outcomes: ReleaseOutcome[];
    try {
      outcomes = await sequelize().transaction((t) =>
        recordGroup(
          this.actorId,
          group.map(({ r }) => r),
          t,
        ),
      );
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
  private chunks = new Map<number, Promise<Map<number, ToRelease>>>();

  constructor(private readonly ids: number[]) {}

  read(index: number): Promise<ToRelease | undefined> {
    const chunk = Math.floor(index / READ_CHUNK);
    const read = this.chunk(chunk);
    this.chunk(chunk + 1);
    this.chunks.delete(chunk - 2);
    return read.then((m) => m.get(this.ids[index]));
  }

  private chunk(n: number): Promise<Map<number, ToRelease>> {
    let read = this.chunks.get(n);
    if (!read) {
      const ids = this.ids.slice(n * READ_CHUNK, (n + 1) * READ_CHUNK);
      read = ids.length ? readChunk(ids) : Promise.resolve(new Map());
      // A read ahead that fails is reported to the release that needs it, not as an unhandled rejection.
      read.catch(() => undefined);
      this.chunks.set(n, read);
    }
    return read;
  }
}

/**
 * The views, then the feedback documents so far. In this order: a release after the views were
 * read can only make the count too high, and then the version changed, so that release's update
 * fails (409) instead of using the count.
 */
async function readChunk(ids: number[]): Promise<Map<number, ToRelease>> {
  const views = await loadFeedbackViews(ids);
  const counts = (await models().FeedbackDocument.count({
    where: { submissionId: [...views.keys()] },
    group: ['submissionId'],
  })) as unknown as { submissionId: number; count: number }[];
  const earlier = new Map(counts.map((c) => [Number(c.submissionId), Number(c.count)]));
  return new Map([...views].map(([id, view]) => [id, { view, earlierReleases: earlier.get(id) ?? 0 }]));
}

/** Read, check and render one release, and write its PDF file: ready for its group's commit, or an outcome that says why not. */
async function prepare(reader: ViewReader, index: number, submissionId: number, batchSize: number, timings?: ReleaseTimings) {
  let t0 = performance.now();
  const toRelease = await reader.read(index);
  if (timings) timings.load += performance.now() - t0;
  if (!toRelease) return { submissionId, ok: false, message: 'Not found.' } satisfies ReleaseOutcome;
  const { view } = toRelease;
  if (view.submission.status === 'released') return { submissionId, ok: false, message: 'Already released.' } satisfies ReleaseOutcome;
  if (view.submission.status !== 'marked')
    return { submissionId, ok: false, message: 'Only marked submissions can be released: finish marking first.' } satisfies ReleaseOutcome;
  t0 = performance.now();
  const pdf = await renderFeedbackPdf(feedbackInputFromView(view), batchSize);
  // The file is written before the transaction (outside SQLite's one writer turn) and removed
  // again if the release does not commit.
  const storedName = `${crypto.randomBytes(16).toString('hex')}.pdf`;
  await fs.writeFile(feedbackPath(storedName), pdf);
  if (timings) timings.render += performance.now() - t0;
  return { ...toRelease, submissionId, pdf, storedName } satisfies Rendered;
}

export async function releaseOne(actorId: number, submissionId: number): Promise<ReleaseOutcome> {
  return (await releaseMany(actorId, [submissionId]))[0];
}

/** How many submissions of a batch are read and rendered at once: two per PDF thread, so a thread always has the next one waiting. */
function renderLanes(): number {
  return 2 * Math.max(1, pdfWorkerCount());
}

/** How many releases of a batch are under way at most: being read or rendered, or rendered (their file written) and waiting for their group's commit. */
export function releaseLanes(): number {
  return renderLanes() + MAX_WAITING;
}

/**
 * Release a batch. Submissions are read and rendered a few at once while those already rendered
 * are committed in groups, so the PDF threads never wait for the database; outcomes come back in
 * the order asked. onProgress is called after each one, afterCommit after each group of releases
 * is committed (the release route starts sending their e-mails there). A failure other than a
 * release that changed under us stops the batch: what was committed stays, and the error is thrown.
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
  const committer = new GroupCommitter(actorId, options.afterCommit);
  const reader = new ViewReader(ids);
  const commits: Promise<void>[] = [];
  let failure: unknown = null;
  let next = 0;
  let done = 0;
  const finish = (i: number, outcome: ReleaseOutcome) => {
    out[i] = outcome;
    options.onProgress?.(++done, ids.length, outcome);
  };
  await Promise.all(
    Array.from({ length: Math.min(ids.length, renderLanes()) }, async () => {
      while (next < ids.length && !failure) {
        const i = next++;
        let prepared: Awaited<ReturnType<typeof prepare>>;
        try {
          prepared = await prepare(reader, i, ids[i], ids.length, options.timings);
        } catch (error) {
          failure ??= error;
          break;
        }
        if (!('pdf' in prepared)) {
          finish(i, prepared);
          continue;
        }
        const t0 = performance.now();
        commits.push(
          committer.commit(prepared).then(
            (outcome) => {
              if (options.timings) options.timings.commit += performance.now() - t0;
              finish(i, outcome);
            },
            (error) => void (failure ??= error),
          ),
        );
        await committer.room(MAX_WAITING);
      }
    }),
  );
  await Promise.all(commits);
  if (options.timings) options.timings.wall += performance.now() - wall;
  if (failure) throw failure;
  return out;
}
