import { authorize, type Actor } from '@/lib/authz';
import { HttpError } from '@/lib/http';
import { models } from '@/models';

/** The submission's scope, read from the database row, never from the client. */
export async function submissionScope(submissionId: number) {
  const { Submission, Practical } = models();
  const submission = await Submission.findByPk(submissionId);
  if (!submission || submission.status === 'draft') throw new HttpError(404, 'Not found.');
  const practical = await Practical.findByPk(submission.practicalId);
  if (!practical) throw new HttpError(404, 'Not found.');
  return { submission, practical, scope: { courseId: practical.courseId, cohortId: submission.cohortId, studentId: submission.studentId } };
}

export async function authorizeSubmission(request: Request, submissionId: number, kind: 'submission-mark' | 'submission-read'): Promise<{ actor: Actor } & Awaited<ReturnType<typeof submissionScope>>> {
  const found = await submissionScope(submissionId);
  const actor = await authorize(request, { kind, ...found.scope });
  return { actor, ...found };
}
