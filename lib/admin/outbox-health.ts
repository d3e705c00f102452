/**
 * The mail outbox as the site administrator sees it: how much is waiting, what is failing and
 * why, and a retry for a message that failed or is waiting out its back-off.
 */
import { Op, fn, col } from 'sequelize';
import { audit } from '@/lib/audit';
import { HttpError } from '@/lib/http-error';
import { models } from '@/models';

export type OutboxHealth = {
  counts: { queued: number; sending: number; failed: number; sentLastDay: number };
  /** Queued messages that have already failed at least once (retrying with back-off). */
  retrying: number;
  oldestQueuedAt: string | null;
  lastError: { at: string; message: string; to: string } | null;
  problems: {
    id: number;
    to: string;
    subject: string;
    status: string;
    attempts: number;
    lastError: string | null;
    nextAttemptAt: string | null;
    updatedAt: string;
    submissionId: number | null;
  }[];
};

export async function outboxHealth(now = new Date()): Promise<OutboxHealth> {
  const { EmailOutbox } = models();
  const [byStatus, sentLastDay, retrying, oldest, problems] = await Promise.all([
    EmailOutbox.findAll({ attributes: ['status', [fn('COUNT', col('id')), 'n']], group: ['status'], raw: true }) as unknown as Promise<
      { status: string; n: number | string }[]
    >,
    EmailOutbox.count({ where: { status: 'sent', sentAt: { [Op.gte]: new Date(now.getTime() - 86_400_000) } } }),
    EmailOutbox.count({ where: { status: 'queued', attempts: { [Op.gt]: 0 } } }),
    EmailOutbox.findOne({ where: { status: ['queued', 'sending'] }, order: [['createdAt', 'ASC']], attributes: ['createdAt'] }),
    EmailOutbox.findAll({
      where: { [Op.or]: [{ status: 'failed' }, { status: 'queued', attempts: { [Op.gt]: 0 } }] },
      order: [['updatedAt', 'DESC']],
      limit: 20,
      attributes: ['id', 'toAddress', 'subject', 'status', 'attempts', 'lastError', 'nextAttemptAt', 'updatedAt', 'submissionId'],
    }),
  ]);
  const count = (s: string) => Number(byStatus.find((r) => r.status === s)?.n ?? 0);
  const withError = problems.find((p) => p.lastError);
  return {
    counts: { queued: count('queued'), sending: count('sending'), failed: count('failed'), sentLastDay },
    retrying,
    oldestQueuedAt: oldest ? oldest.createdAt.toISOString() : null,
    lastError: withError ? { at: withError.updatedAt.toISOString(), message: withError.lastError!, to: withError.toAddress } : null,
    problems: problems.map((p) => ({
      id: p.id,
      to: p.toAddress,
      subject: p.subject,
      status: p.status,
      attempts: p.attempts,
      lastError: p.lastError,
      nextAttemptAt: p.nextAttemptAt ? p.nextAttemptAt.toISOString() : null,
      updatedAt: p.updatedAt.toISOString(),
      submissionId: p.submissionId,
    })),
  };
}

/**
 * Try a failed message again now, or one that is waiting out its back-off. The row keeps its
 * dedupe key and Message-ID (it is the same message); attempts start again from zero so the
 * back-off restarts. A message already sent is not sent again here (staff resend it from the
 * submission, which makes a new copy).
 */
export async function retryOutbox(id: number, actorId: number): Promise<void> {
  const { EmailOutbox } = models();
  const row = await EmailOutbox.findByPk(id);
  if (!row) throw new HttpError(404, 'No such message in the outbox.');
  if (row.status === 'sent') throw new HttpError(409, 'This message was sent; resend it from its submission if it must go again.');
  if (row.status === 'sending') throw new HttpError(409, 'This message is being sent right now.');
  const before = { status: row.status, attempts: row.attempts, nextAttemptAt: row.nextAttemptAt };
  const [n] = await EmailOutbox.update(
    { status: 'queued', attempts: 0, nextAttemptAt: new Date(), lockedUntil: null },
    { where: { id, status: ['queued', 'failed'] } },
  );
  if (n !== 1) throw new HttpError(409, 'This message changed while you were looking; reload and try again.');
  await audit({
    actorId,
    action: 'mail.retry',
    entityType: 'email_outbox',
    entityId: id,
    before,
    after: { status: 'queued', attempts: 0 },
  });
}
