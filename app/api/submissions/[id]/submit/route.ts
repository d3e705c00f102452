import { HttpError, idParam, json, readJson, route } from '@/lib/http';
import { submitSchema } from '@/lib/schemas/submission';
import { authorizeSubmission } from '@/lib/authz/submission';
import { submitDraft } from '@/lib/submissions/service';
import { studentAttemptView } from '@/lib/submissions/view';
import { models } from '@/models';

type Ctx = { params: Promise<{ id: string }> };

/** Submit the draft {id} as a new attempt; answers with what the student may see of the checks. */
export const POST = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).id);
  const { actor, submission, practical } = await authorizeSubmission(request, id, 'submission-write');
  if (submission.attempt !== 0) throw new HttpError(409, 'Only a draft can be submitted.');
  const body = await readJson(request, submitSchema);
  const attempt = await submitDraft(actor, submission, practical, body.version, body.draft);
  const fresh = await models().Submission.findByPk(attempt.id);
  const draft = await models().Submission.findByPk(submission.id);
  return json({ result: await studentAttemptView(fresh!, practical), draftVersion: draft!.version }, 201);
});
