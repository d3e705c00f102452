import { log } from '@/lib/log';
import { json, readJson, route, idParam } from '@/lib/http';
import { deliverOutbox } from '@/lib/mail/outbox';
import { authorizeSubmission } from '@/lib/authz/submission';
import { requestResubmission } from '@/lib/marking/resubmission';
import { resubmissionSchema } from '@/lib/schemas/marking';

type Ctx = { params: Promise<{ submissionId: string }> };

/** Ask the student to resubmit: { message, version? }. */
export const POST = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).submissionId);
  const { actor } = await authorizeSubmission(request, id, 'submission-mark');
  const input = await readJson(request, resubmissionSchema);
  const result = await requestResubmission(actor, id, input.message, input.version);
  deliverOutbox().catch((error) => log().error({ err: error }, 'outbox after resubmission request failed'));
  return json(result);
});
