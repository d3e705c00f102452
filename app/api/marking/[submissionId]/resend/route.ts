import { audit } from '@/lib/audit';
import { json, readJson, route, idParam, HttpError } from '@/lib/http';
import { deliverSoon, requeue } from '@/lib/mail/outbox';
import { authorizeSubmission } from '@/lib/authz/submission';
import { resendSchema } from '@/lib/schemas/marking';
import { models } from '@/models';

type Ctx = { params: Promise<{ submissionId: string }> };

/**
 * Staff "resend": a sent or failed message goes back in the queue, once per click window however
 * many clicks arrive (lib/mail/outbox.ts requeue), with the same Message-ID.
 */
export const POST = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).submissionId);
  const { actor } = await authorizeSubmission(request, id, 'submission-mark');
  const { outboxId } = await readJson(request, resendSchema);
  const { EmailOutbox } = models();
  const row = await EmailOutbox.findByPk(outboxId);
  if (!row || row.submissionId !== id) throw new HttpError(404, 'No such message for this submission.');
  if (row.status === 'queued' || row.status === 'sending') throw new HttpError(409, 'This message is still waiting to be sent.');
  const before = { status: row.status, attempts: row.attempts };
  if (!(await requeue(row.id))) {
    throw new HttpError(409, `This message was already sent again just now; wait a minute before asking again.`);
  }
  await audit({
    actorId: actor.id,
    action: 'mail.resend',
    entityType: 'email_outbox',
    entityId: row.id,
    before,
    after: { requeued: true },
  });
  void deliverSoon();
  return json({ ok: true });
});
