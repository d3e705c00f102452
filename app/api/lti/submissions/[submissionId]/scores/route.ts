import { idParam, json, route } from '@/lib/http';
import { authorizeSubmission } from '@/lib/authz/submission';
import { scoreDeliveries } from '@/lib/lti/scores';

type Ctx = { params: Promise<{ submissionId: string }> };

/** Where the submission's score stands on its way to the learning platform's gradebook (markers). */
export const GET = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).submissionId);
  await authorizeSubmission(request, id, 'submission-mark');
  return json({ deliveries: await scoreDeliveries(id) });
});
