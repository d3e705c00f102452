import { idParam, json, route } from '@/lib/http';
import { authorizeSubmission } from '@/lib/authz/submission';
import { readDraft } from '@/lib/submissions/service';
import { studentAttemptView } from '@/lib/submissions/view';

type Ctx = { params: Promise<{ id: string }> };

/** One submission: for its student the student view (no staff-only flags); for staff the stored row. */
export const GET = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).id);
  const { actor, submission, practical } = await authorizeSubmission(request, id, 'submission-read');
  if (actor.id === submission.studentId) {
    if (submission.attempt === 0)
      return json({ id: submission.id, attempt: 0, version: submission.version, draft: readDraft(submission.draft, practical.species) });
    return json(await studentAttemptView(submission, practical));
  }
  return json({ submission });
});
