import { json, readJson, route, idParam } from '@/lib/http';
import { authorizeSubmission } from '@/lib/authz/submission';
import { acceptProposal } from '@/lib/marking/marks';
import { acceptSchema } from '@/lib/schemas/marking';

type Ctx = { params: Promise<{ submissionId: string }> };

/** Accept the engine's proposed marks: { version }. */
export const POST = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).submissionId);
  const { actor } = await authorizeSubmission(request, id, 'submission-mark');
  const { version } = await readJson(request, acceptSchema);
  return json(await acceptProposal(actor.id, id, version));
});
