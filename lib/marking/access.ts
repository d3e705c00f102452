import { authenticate, permit, type Actor } from '@/lib/authz';
import { HttpError } from '@/lib/http';
import { models } from '@/models';

/** The submission's scope, read from the database row, never from the client. */
export async function submissionScope(submissionId: number) {
  const { Submission, Practical } = models();
  const submission = await Submission.findByPk(submissionId);
  if (!submission) throw new HttpError(404, 'Not found.');
  const practical = await Practical.findByPk(submission.practicalId);
  if (!practical) throw new HttpError(404, 'Not found.');
  // Drafts are decided by lib/authz.ts like everything else: the student's own until submitted.
  return { submission, practical, scope: { courseId: practical.courseId, cohortId: submission.cohortId, studentId: submission.studentId, draft: submission.status === 'draft' } };
}

export async function authorizeSubmission(request: Request, submissionId: number, kind: 'submission-mark' | 'submission-read'): Promise<{ actor: Actor } & Awaited<ReturnType<typeof submissionScope>>> {
  // Signed in first: a signed-out caller gets 401 whether or not the id exists.
  const actor = await authenticate(request);
  const found = await submissionScope(submissionId);
  permit(actor, { kind, ...found.scope });
  return { actor, ...found };
}
