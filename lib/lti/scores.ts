/**
 * Scores for the platform's gradebook go through lti_score_outbox, like mail through the e-mail
 * outbox: a row per released submission and connected platform course, queued in the release's own
 * transaction (so a release and its score stand or fall together), claimed by a worker with a
 * conditional update and a lease, retried with back-off while the platform is down, and marked sent
 * once the platform has taken it. The dedupe key makes a release queue its score once; the score's
 * timestamp is fixed when queued, so if a worker dies after the platform took the score but before
 * recording it, the repeat carries the same timestamp and the platform keeps the score once
 * (Assignment and Grade Services: a score not newer than the one held does not replace it).
 */
import { Op, type Transaction } from 'sequelize';
import { QueryTypes } from 'sequelize';
import { sequelize } from '@/lib/db';
import { models } from '@/models';
import { toolOrigin } from './config';
import { PlatformAnswered } from './fetch';
import { lineItemFor, postScore } from './services';
import { log, withRun, type Logger } from '@/lib/log';

const LEASE_MS = 60_000;
const MAX_ATTEMPTS = 12;
export const scoreBackoffMs = (attempts: number) => Math.min(30 * 60_000, 5_000 * 2 ** Math.max(0, attempts - 1));

/** What the release already knows about the submission (lib/marking/view.ts's view). */
export type ReleasedView = {
  submission: { id: number; awardedTotal: number | null; maxTotal?: number | null };
  student: { id: number };
  practical: { id: number };
  course: { id: number };
  marks: { maxMarks: number }[];
};

/**
 * Queue the scores of releases (a release's group) for every platform course connected to each
 * submission's course in which its student is known (linked by their platform user id). Called
 * inside the releases' transaction; one SELECT when there is nothing to queue.
 */
export async function queueReleaseScores(
  releases: { view: ReleasedView; releaseNumber: number }[],
  transaction: Transaction,
): Promise<number> {
  if (!releases.length) return 0;
  const targets = await sequelize().query<{ contextId: number; courseId: number; userId: number; sub: string }>(
    `SELECT c."id" AS "contextId", c."courseId" AS "courseId", l."userId" AS "userId", l."sub" AS "sub" FROM "lti_contexts" c
       JOIN "lti_user_links" l ON l."registrationId" = c."registrationId" AND l."userId" IN (:studentIds)
      WHERE c."courseId" IN (:courseIds) ORDER BY c."id"`,
    {
      replacements: {
        courseIds: [...new Set(releases.map((r) => r.view.course.id))],
        studentIds: [...new Set(releases.map((r) => r.view.student.id))],
      },
      type: QueryTypes.SELECT,
      transaction,
    },
  );
  if (!targets.length) return 0;
  const now = new Date();
  const rows = releases.flatMap(({ view, releaseNumber }) => {
    const scoreMaximum = view.submission.maxTotal ?? view.marks.reduce((s, m) => s + m.maxMarks, 0);
    return targets
      .filter((t) => Number(t.courseId) === view.course.id && Number(t.userId) === view.student.id)
      .map((target) => ({
        dedupeKey: `score:${view.submission.id}:${releaseNumber}:${target.contextId}`,
        ltiContextId: Number(target.contextId),
        practicalId: view.practical.id,
        submissionId: view.submission.id,
        userId: view.student.id,
        platformUserId: target.sub,
        scoreGiven: view.submission.awardedTotal ?? 0,
        scoreMaximum: Math.max(scoreMaximum, 0),
        comment: `Feedback: ${toolOrigin()}/student/practicals/${view.practical.id}`,
        scoredAt: now,
        lineItemUrl: null,
        nextAttemptAt: now,
        lockedUntil: null,
        lastError: null,
        sentAt: null,
      }));
  });
  const { LtiScoreOutbox } = models();
  const existing = rows.length
    ? await LtiScoreOutbox.findAll({ where: { dedupeKey: rows.map((r) => r.dedupeKey) }, attributes: ['dedupeKey'], transaction })
    : [];
  const taken = new Set(existing.map((e) => e.dedupeKey));
  const fresh = rows.filter((r) => !taken.has(r.dedupeKey));
  if (fresh.length) await LtiScoreOutbox.bulkCreate(fresh, { transaction });
  if (fresh.length && process.env.OUTBOX_WORKER !== 'off')
    transaction.afterCommit(() => void deliverScores().catch((e) => log().error({ err: e }, 'score delivery failed')));
  return fresh.length;
}

async function claim(id: number, now: Date): Promise<boolean> {
  const [count] = await models().LtiScoreOutbox.update(
    { status: 'sending', lockedUntil: new Date(now.getTime() + LEASE_MS) },
    {
      where: {
        id,
        [Op.or]: [
          { status: 'queued', nextAttemptAt: { [Op.lte]: now } },
          { status: 'sending', lockedUntil: { [Op.lt]: now } },
        ],
      },
    },
  );
  return count === 1;
}

/** Whether a failure is worth trying again (the platform down or busy) or final (it refused the score). */
function retryable(error: unknown): boolean {
  if (error instanceof PlatformAnswered) return error.status >= 500 || error.status === 429 || error.status === 408 || error.status === 401;
  return true;
}

export type ScoreReport = { sent: number; failed: number; remaining: number };

/** Send every due score once. Safe to run in several processes at the same time. */
export function deliverScores(options: { limit?: number; now?: () => Date } = {}): Promise<ScoreReport> {
  return withRun('score-outbox', (logger) => deliverDueScores(logger, options));
}

async function deliverDueScores(logger: Logger, options: { limit?: number; now?: () => Date }): Promise<ScoreReport> {
  const { LtiScoreOutbox, LtiContext, Practical } = models();
  const now = options.now ?? (() => new Date());
  const due = await LtiScoreOutbox.findAll({
    where: {
      [Op.or]: [
        { status: 'queued', nextAttemptAt: { [Op.lte]: now() } },
        { status: 'sending', lockedUntil: { [Op.lt]: now() } },
      ],
    },
    order: [['id', 'ASC']],
    limit: options.limit ?? 200,
  });
  let sent = 0;
  let failed = 0;
  for (const row of due) {
    if (!(await claim(row.id, now()))) continue;
    const attempts = row.attempts + 1;
    try {
      const ctx = await LtiContext.findByPk(row.ltiContextId);
      const practical = await Practical.findByPk(row.practicalId);
      if (!ctx || !practical) throw new PlatformAnswered('-', 410, 'the course connection or the practical no longer exists');
      const lineItemUrl = row.lineItemUrl ?? (await lineItemFor(ctx, practical));
      await postScore(ctx, lineItemUrl, {
        userId: row.platformUserId,
        scoreGiven: row.scoreGiven,
        scoreMaximum: row.scoreMaximum,
        comment: row.comment ?? undefined,
        timestamp: new Date(row.scoredAt).toISOString(),
        activityProgress: 'Completed',
        gradingProgress: 'FullyGraded',
      });
      await LtiScoreOutbox.update(
        { status: 'sent', sentAt: now(), lineItemUrl, lockedUntil: null, lastError: null, attempts },
        { where: { id: row.id } },
      );
      sent++;
    } catch (error) {
      const final = !retryable(error) || attempts >= MAX_ATTEMPTS;
      await LtiScoreOutbox.update(
        {
          status: final ? 'failed' : 'queued',
          attempts,
          lastError: error instanceof Error ? error.message.slice(0, 1000) : String(error),
          nextAttemptAt: new Date(now().getTime() + scoreBackoffMs(attempts)),
          lockedUntil: null,
        },
        { where: { id: row.id } },
      );
      failed++;
      logger.warn({ err: error, scoreOutboxId: row.id, attempts, willRetry: !final }, 'score not sent');
    }
  }
  const remaining = await LtiScoreOutbox.count({ where: { status: ['queued', 'sending'] } });
  if (due.length) logger.info({ due: due.length, sent, failed, remaining }, 'score outbox run');
  return { sent, failed, remaining };
}

/**
 * Staff "resend": a failed score goes back in the queue as it was; a sent one is queued again as a
 * new score with the time of the resend (a repeat with the old time would not replace anything).
 */
export async function resendScore(id: number): Promise<void> {
  const { LtiScoreOutbox } = models();
  const row = await LtiScoreOutbox.findByPk(id);
  if (!row) return;
  if (row.status === 'sent') {
    const now = new Date();
    await LtiScoreOutbox.create({
      dedupeKey: `${row.dedupeKey}:resend-${now.getTime()}`.slice(0, 200),
      ltiContextId: row.ltiContextId,
      practicalId: row.practicalId,
      submissionId: row.submissionId,
      userId: row.userId,
      platformUserId: row.platformUserId,
      scoreGiven: row.scoreGiven,
      scoreMaximum: row.scoreMaximum,
      comment: row.comment,
      scoredAt: now,
      lineItemUrl: row.lineItemUrl,
      nextAttemptAt: now,
      lockedUntil: null,
      lastError: null,
      sentAt: null,
    });
  } else {
    await LtiScoreOutbox.update({ status: 'queued', nextAttemptAt: new Date(), attempts: 0, lockedUntil: null }, { where: { id } });
  }
}

export type ScoreDelivery = {
  id: number;
  platformCourse: string;
  status: string;
  attempts: number;
  scoreGiven: number;
  scoreMaximum: number;
  lastError: string | null;
  sentAt: string | null;
  createdAt: string;
};

/** The score deliveries of one submission, for the marking page (beside the e-mail's). */
/** GET /api/lti/submissions/[id]/scores's answer. */
export type ScoreDeliveriesAnswer = { deliveries: ScoreDelivery[] };

export async function scoreDeliveries(submissionId: number): Promise<ScoreDelivery[]> {
  const { LtiScoreOutbox, LtiContext } = models();
  const rows = await LtiScoreOutbox.findAll({ where: { submissionId }, order: [['id', 'ASC']] });
  if (!rows.length) return [];
  const contexts = await LtiContext.findAll({ where: { id: [...new Set(rows.map((r) => r.ltiContextId))] } });
  return rows.map((r) => {
    const ctx = contexts.find((c) => c.id === r.ltiContextId);
    return {
      id: r.id,
      platformCourse: ctx?.title ?? ctx?.contextId ?? '—',
      status: r.status,
      attempts: r.attempts,
      scoreGiven: r.scoreGiven,
      scoreMaximum: r.scoreMaximum,
      lastError: r.lastError,
      sentAt: r.sentAt?.toISOString() ?? null,
      createdAt: r.createdAt.toISOString(),
    };
  });
}

let timer: NodeJS.Timeout | null = null;

/** Run the score worker in this process every few seconds (started by instrumentation.ts with the mail worker). */
export function startScoreWorker(intervalMs = 3000): void {
  if (timer) return;
  let running = false;
  timer = setInterval(async () => {
    if (running) return;
    running = true;
    try {
      await deliverScores();
    } catch (error) {
      log().error({ err: error }, 'score worker failed');
    } finally {
      running = false;
    }
  }, intervalMs);
  timer.unref?.();
}
