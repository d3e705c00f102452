import { json, readJson, route, idParam } from '@/lib/http';
import { deliverSoon } from '@/lib/mail/outbox';
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
  void deliverSoon();
  return json(result);
});
