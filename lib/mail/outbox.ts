/**
 * Outgoing mail goes through the email_outbox table: a row is written in the same transaction as
 * the change it announces, and `deliverOutbox` sends due rows. A row is claimed by moving it to
 * 'sending' with a lease (lockedUntil) in one conditional UPDATE, so several workers (or app
 * instances) never send the same row twice; a worker that dies mid-send leaves the lease to
 * expire and the row is retried. Failed sends back off exponentially.
 */
import 'server-only';
import { log, withRun, type Logger } from '@/lib/log';
import fs from 'node:fs/promises';
import { Op, type Transaction } from 'sequelize';
import { models } from '@/models';
import { MAIL_FROM, sendMail, smtpPoolSize, type MailMessage } from './transport';
import { feedbackPath } from '@/lib/storage';

const LEASE_MS = 60_000;
const MAX_ATTEMPTS = 12;
const backoffMs = (attempts: number) => Math.min(30 * 60_000, 5_000 * 2 ** Math.max(0, attempts - 1));

export type QueuedMail = {
  dedupeKey: string;
  to: string;
  subject: string;
  text: string;
  html?: string | null;
  submissionId?: number | null;
  feedbackDocumentId?: number | null;
};

/** Queue a message; a second call with the same dedupeKey is a no-op. */
export async function queueEmail(mail: QueuedMail, transaction?: Transaction): Promise<void> {
  const { EmailOutbox } = models();
  const existing = await EmailOutbox.findOne({ where: { dedupeKey: mail.dedupeKey }, transaction });
  if (existing) return;
  await EmailOutbox.create(
    {
      dedupeKey: mail.dedupeKey,
      toAddress: mail.to,
      // One line, whatever the caller built it from: a line break would end the header early.
      // eslint-disable-next-line no-control-regex -- control characters are exactly what this pattern removes
      subject: mail.subject.replace(/[\u0000-\u001f\u007f-\u009f\u2028\u2029]+/g, ' ').slice(0, 300),
      textBody: mail.text,
      htmlBody: mail.html ?? null,
      submissionId: mail.submissionId ?? null,
      feedbackDocumentId: mail.feedbackDocumentId ?? null,
      nextAttemptAt: new Date(),
      lockedUntil: null,
      lastError: null,
      messageId: null,
      sentAt: null,
    },
    { transaction },
  );
}

async function claim(id: number, now: Date): Promise<boolean> {
  const { EmailOutbox } = models();
  const [count] = await EmailOutbox.update(
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

type OutboxRow = InstanceType<ReturnType<typeof models>['EmailOutbox']>;

/**
 * One Message-ID per outbox row, the same on every attempt. SMTP cannot be exactly-once: a worker
 * killed after the relay accepted a message but before the row was marked sent sends it again
 * when the lease expires. Mail stores and clients treat messages with the same Message-ID as one
 * (common practice), so such a repeat shows as a single message.
 */
export function outboxMessageId(row: Pick<OutboxRow, 'id' | 'createdAt'>): string {
  const from = /@([^>\s]+)>?\s*$/.exec(MAIL_FROM())?.[1] ?? 'oscillab.invalid';
  return `<outbox.${row.id}.${new Date(row.createdAt).getTime()}@${from}>`;
}

async function messageFor(row: OutboxRow): Promise<MailMessage> {
  const message: MailMessage = {
    to: row.toAddress,
    subject: row.subject,
    text: row.textBody,
    html: row.htmlBody ?? undefined,
    headers: { 'X-Oscillab-Outbox-Id': String(row.id) },
    messageId: outboxMessageId(row),
  };
  if (row.feedbackDocumentId) {
    const doc = await models().FeedbackDocument.findByPk(row.feedbackDocumentId);
    if (doc) {
      message.attachments = [
        {
          filename: `feedback-${row.submissionId ?? doc.submissionId}.pdf`,
          content: await fs.readFile(feedbackPath(doc.storedName)),
          contentType: 'application/pdf',
        },
      ];
    }
  }
  return message;
}

export type DeliveryReport = { sent: number; failed: number; remaining: number };

/** Send every due row once. Safe to run in several processes at the same time. */
export function deliverOutbox(options: { limit?: number; now?: () => Date } = {}): Promise<DeliveryReport> {
  return withRun('outbox', (logger) => deliverDue(logger, options));
}

async function deliverDue(logger: Logger, options: { limit?: number; now?: () => Date }): Promise<DeliveryReport> {
  const { EmailOutbox } = models();
  const now = options.now ?? (() => new Date());
  const due = await EmailOutbox.findAll({
    where: {
      [Op.or]: [
        { status: 'queued', nextAttemptAt: { [Op.lte]: now() } },
        { status: 'sending', lockedUntil: { [Op.lt]: now() } },
      ],
    },
    order: [['id', 'ASC']],
    limit: options.limit ?? 500,
  });
  let sent = 0;
  let failed = 0;
  const deliver = async (row: OutboxRow) => {
    if (!(await claim(row.id, now()))) return;
    try {
      const { messageId } = await sendMail(await messageFor(row));
      // Written by id, not through the stale instance: claim() changed the row behind its back.
      await EmailOutbox.update(
        { status: 'sent', sentAt: now(), messageId, lockedUntil: null, lastError: null, attempts: row.attempts + 1 },
        { where: { id: row.id } },
      );
      sent++;
    } catch (error) {
      const attempts = row.attempts + 1;
      await EmailOutbox.update(
        {
          status: attempts >= MAX_ATTEMPTS ? 'failed' : 'queued',
          attempts,
          lastError: error instanceof Error ? error.message.slice(0, 1000) : String(error),
          nextAttemptAt: new Date(now().getTime() + backoffMs(attempts)),
          lockedUntil: null,
        },
        { where: { id: row.id } },
      );
      failed++;
      logger.warn({ err: error, outboxId: row.id, attempts, willRetry: attempts < MAX_ATTEMPTS }, 'message not sent');
    }
  };
  // As many messages under way as the SMTP pool has connections, each row claimed on its own.
  let next = 0;
  await Promise.all(
    Array.from({ length: Math.min(due.length, smtpPoolSize()) }, async () => {
      while (next < due.length) await deliver(due[next++]);
    }),
  );
  const remaining = await EmailOutbox.count({ where: { status: ['queued', 'sending'] } });
  if (due.length) logger.info({ due: due.length, sent, failed, remaining }, 'outbox run');
  return { sent, failed, remaining };
}

/** One resend per message within this window: repeated or simultaneous clicks send it once. */
export const RESEND_WINDOW_MS = 60_000;

/**
 * Staff "resend": puts a sent or failed row back in the queue, in one conditional UPDATE, so of any
 * number of simultaneous clicks exactly one succeeds, and no second resend is taken within
 * RESEND_WINDOW_MS. The row itself goes again, so the message keeps its Message-ID (mailboxes show
 * one message however often it was sent). Returns false when nothing was queued.
 */
export async function requeue(id: number, now = new Date()): Promise<boolean> {
  const { EmailOutbox } = models();
  const [count] = await EmailOutbox.update(
    { status: 'queued', nextAttemptAt: now, attempts: 0, lockedUntil: null, resentAt: now },
    {
      where: {
        id,
        status: ['sent', 'failed'],
        [Op.or]: [{ resentAt: null }, { resentAt: { [Op.lte]: new Date(now.getTime() - RESEND_WINDOW_MS) } }],
      },
    },
  );
  return count === 1;
}

let timer: NodeJS.Timeout | null = null;

/** Run the worker in this process every few seconds (started by instrumentation.ts). */
export function startOutboxWorker(intervalMs = 3000): void {
  if (timer) return;
  let running = false;
  timer = setInterval(async () => {
    if (running) return;
    running = true;
    try {
      await deliverOutbox();
    } catch (error) {
      log().error({ err: error }, 'outbox worker failed');
    } finally {
      running = false;
    }
  }, intervalMs);
  timer.unref?.();
}
