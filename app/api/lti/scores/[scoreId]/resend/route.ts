import { audit } from '@/lib/audit';
import { authorize } from '@/lib/authz';
import { HttpError, idParam, json, route } from '@/lib/http';
import { authorizeSubmission } from '@/lib/authz/submission';
import { deliverScores, resendScore } from '@/lib/lti/scores';
import { models } from '@/models';
import { log } from '@/lib/log';

type Ctx = { params: Promise<{ scoreId: string }> };

/** Staff "resend" of a score: a failed one is queued again; a sent one is sent again as a new score. */
export const POST = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).scoreId);
  await authorize(request, { kind: 'signed-in' });
  const row = await models().LtiScoreOutbox.findByPk(id);
  if (!row) throw new HttpError(404, 'No such score.');
  const { actor } = await authorizeSubmission(request, row.submissionId, 'submission-mark');
  if (row.status === 'queued' || row.status === 'sending') throw new HttpError(409, 'This score is still waiting to be sent.');
  await resendScore(id);
  await audit({
    actorId: actor.id,
    action: 'lti.score.resend',
    entityType: 'lti_score_outbox',
    entityId: id,
    before: { status: row.status },
    after: { requeued: true },
  });
  if (process.env.OUTBOX_WORKER !== 'off')
    deliverScores().catch((error) => log().error({ err: error }, 'score delivery after resend failed'));
  return json({ ok: true });
});
