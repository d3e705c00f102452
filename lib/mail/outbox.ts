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
import { sequelize } from '@/lib/db';
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
  await queueEmails([mail], transaction);
}

/** Queue messages (a release's group) in two statements; any whose dedupeKey is already queued is left out. */
export async function queueEmails(mails: QueuedMail[], transaction?: Transaction): Promise<void> {
  if (!mails.length) return;
  const { EmailOutbox } = models();
  const existing = await EmailOutbox.findAll({
    where: { dedupeKey: mails.map((m) => m.dedupeKey) },
    attributes: ['dedupeKey'],
    transaction,
  });
  const taken = new Set(existing.map((e) => e.dedupeKey));
  const now = new Date();
  const rows = [];
  for (const mail of mails) {
    if (taken.has(mail.dedupeKey)) continue;
    taken.add(mail.dedupeKey);
    rows.push({
      dedupeKey: mail.dedupeKey,
      toAddress: mail.to,
      // One line, whatever the caller built it from: a line break would end the header early.
      // eslint-disable-next-line no-control-regex -- control characters are exactly what this pattern removes
      subject: mail.subject.replace(/[\u0000-\u001f\u007f-\u009f\u2028\u2029]+/g, ' ').slice(0, 300),
      textBody: mail.text,
      htmlBody: mail.html ?? null,
      submissionId: mail.submissionId ?? null,
      feedbackDocumentId: mail.feedbackDocumentId ?? null,
      nextAttemptAt: now,
      lockedUntil: null,
      lastError: null,
      messageId: null,
      sentAt: null,
    });
  }
  if (rows.length) await EmailOutbox.bulkCreate(rows, { transaction });
}

type OutboxRow = InstanceType<ReturnType<typeof models>['EmailOutbox']>;

const dueNow = (now: Date) => ({
  [Op.or]: [
    { status: 'queued', nextAttemptAt: { [Op.lte]: now } },
    { status: 'sending', lockedUntil: { [Op.lt]: now } },
  ],
});

/**
 * Claim rows for this worker: each moves to 'sending' with a lease only if it is still due, in one
 * conditional UPDATE per row (so of several workers exactly one gets it), all in one transaction.
 * The claim also writes the Message-ID the row goes out with (the same on every attempt).
 * Answers the rows claimed.
 */
async function claim(rows: OutboxRow[], now: Date): Promise<OutboxRow[]> {
  const { EmailOutbox } = models();
  const lease = { status: 'sending' as const, lockedUntil: new Date(now.getTime() + LEASE_MS) };
  return sequelize().transaction(async (transaction) => {
    const claimed: OutboxRow[] = [];
    for (const row of rows) {
      const [count] = await EmailOutbox.update(
        { ...lease, messageId: outboxMessageId(row) },
        { where: { id: row.id, ...dueNow(now) }, transaction },
      );
      if (count === 1) claimed.push(row);
    }
    return claimed;
  });
}

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

type Attached = Pick<InstanceType<ReturnType<typeof models>['FeedbackDocument']>, 'submissionId' | 'storedName'>;

async function messageFor(row: OutboxRow, doc: Attached | undefined): Promise<MailMessage> {
  const message: MailMessage = {
    to: row.toAddress,
    subject: row.subject,
    text: row.textBody,
    html: row.htmlBody ?? undefined,
    headers: { 'X-Oscillab-Outbox-Id': String(row.id) },
    messageId: outboxMessageId(row),
  };
  if (doc) {
    message.attachments = [
      {
        filename: `feedback-${row.submissionId ?? doc.submissionId}.pdf`,
        content: await fs.readFile(feedbackPath(doc.storedName)),
        contentType: 'application/pdf',
      },
    ];
  }
  return message;
}

export type DeliveryReport = { sent: number; failed: number; remaining: number };

/** Send every due row once. Safe to run in several processes at the same time. */
export function deliverOutbox(options: { limit?: number; now?: () => Date } = {}): Promise<DeliveryReport> {
  return withRun('outbox', (logger) => deliverDue(logger, options));
}

/**
 * Records sent messages a group at a time, in one statement for the group: whatever was sent while
 * the previous group was being written goes into the next. A message sent but not yet recorded
 * when the process dies is sent again when its lease runs out, with the same Message-ID (see
 * outboxMessageId).
 */
class SentRecorder {
  private waiting: number[] = [];
  private writing: Promise<void> | null = null;

  constructor(
    private readonly logger: Logger,
    private readonly now: () => Date,
  ) {}

  add(id: number): void {
    this.waiting.push(id);
    this.writing ??= this.write();
  }

  /** Resolves when everything added so far is written (or has failed and been logged). */
  async settled(): Promise<void> {
    while (this.writing) await this.writing;
  }

  private async write(): Promise<void> {
    const { EmailOutbox } = models();
    while (this.waiting.length) {
      const ids = this.waiting.splice(0);
      try {
        await EmailOutbox.update(
          {
            status: 'sent',
            sentAt: this.now(),
            lockedUntil: null,
            lastError: null,
            attempts: sequelize().literal('attempts + 1') as unknown as number,
          },
          { where: { id: ids, status: 'sending' } },
        );
      } catch (error) {
        this.logger.error({ err: error, outboxIds: ids }, 'sent messages not recorded; they go again when their lease ends');
      }
    }
    this.writing = null;
  }
}

async function deliverDue(logger: Logger, options: { limit?: number; now?: () => Date }): Promise<DeliveryReport> {
  const { EmailOutbox, FeedbackDocument } = models();
  const now = options.now ?? (() => new Date());
  const due = await EmailOutbox.findAll({ where: dueNow(now()), order: [['id', 'ASC']], limit: options.limit ?? 500 });
  const recorder = new SentRecorder(logger, now);
  let sent = 0;
  let failed = 0;
  const deliver = async (row: OutboxRow, doc: Attached | undefined) => {
    try {
      await sendMail(await messageFor(row, doc));
      recorder.add(row.id);
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
  // Rows are claimed a few at a time, a little before they are sent (so a lease never runs out
  // while its row waits here, and sending never waits for a claim), and sent as many at once as
  // the SMTP pool has connections.
  const lanes = smtpPoolSize();
  const slice = 2 * lanes;
  const ready: { row: OutboxRow; doc: Attached | undefined }[] = [];
  let next = 0;
  let refilling: Promise<void> | null = null;
  // A claim that fails ends the claiming; what is claimed already is still sent, then the error is thrown.
  let claimFailed = null as { error: unknown } | null;
  const refill = async () => {
    const rows = await claim(due.slice(next, (next += slice)), now());
    const docIds = rows.map((r) => r.feedbackDocumentId).filter((id): id is number => id !== null);
    const docs = docIds.length
      ? await FeedbackDocument.findAll({ where: { id: docIds }, attributes: ['id', 'submissionId', 'storedName'] })
      : [];
    for (const row of rows) ready.push({ row, doc: docs.find((d) => d.id === row.feedbackDocumentId) });
  };
  const take = async () => {
    for (;;) {
      if (ready.length <= lanes && next < due.length && !claimFailed)
        refilling ??= refill()
          .catch((error) => void (claimFailed = { error }))
          .finally(() => (refilling = null));
      if (ready.length) return ready.shift();
      if (!refilling) return undefined;
      await refilling;
    }
  };
  await Promise.all(
    Array.from({ length: Math.min(due.length, lanes) }, async () => {
      for (let item = await take(); item; item = await take()) await deliver(item.row, item.doc);
    }),
  );
  await recorder.settled();
  if (claimFailed) throw claimFailed.error;
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

let running: Promise<void> | null = null;
let again = false;

/**
 * Deliver what is due now, in the background. Called while a run is under way, it runs once more
 * when that run ends (rows queued meanwhile may have been committed after the run read the
 * queue); calls never overlap within this copy of the module. A release calls this after each
 * group of releases commits, so the first students' e-mails leave while the rest of the batch is
 * still being rendered. The promise settles when the runs asked for so far are done; a failed
 * run is logged, not thrown (its rows stay queued for the next).
 */
export function deliverSoon(): Promise<void> {
  if (running) {
    again = true;
    return running;
  }
  running = (async () => {
    try {
      do {
        again = false;
        await deliverOutbox();
      } while (again);
    } catch (error) {
      log().error({ err: error }, 'outbox run failed');
    } finally {
      running = null;
    }
  })();
  return running;
}

/** Settles when the runs deliverSoon started in this copy of the module are done (the tests wait for it before their database goes). */
export function deliverySettled(): Promise<void> {
  return running ?? Promise.resolve();
}

let timer: NodeJS.Timeout | null = null;

/** Run the worker in this process every few seconds (started by instrumentation.ts). */
export function startOutboxWorker(intervalMs = 3000): void {
  if (timer) return;
  timer = setInterval(() => void deliverSoon(), intervalMs);
  timer.unref?.();
}
