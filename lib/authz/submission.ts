/**
 * Loading a submission for a request, with the access decision taken from the database row
 * (never from ids the client sent). One loader for the student's, the marker's and the
 * moderator's routes and pages.
 */
import 'server-only';
import { HttpError } from '@/lib/http-error';
import { models } from '@/models';
import type { Submission } from '@/models/submission';
import type { Practical } from '@/models/practical';
import { authenticate, permit, type Actor } from './index';

export type SubmissionAccessScope = { courseId: number; cohortId: number; studentId: number; draft: boolean };

/** The scope of a submission row already in hand: its practical's course, its cohort and student. */
export async function scopeOf(submission: Submission): Promise<{ practical: Practical; scope: SubmissionAccessScope }> {
  const practical = await models().Practical.findByPk(submission.practicalId);
  if (!practical) throw new HttpError(404, 'Not found.');
  // Drafts are decided like everything else: the student's own until submitted.
  return {
    practical,
    scope: {
      courseId: practical.courseId,
      cohortId: submission.cohortId,
      studentId: submission.studentId,
      draft: submission.status === 'draft',
    },
  };
}

/** The submission, its practical and its scope, read from the database (404 when there is none). */
export async function submissionScope(
  submissionId: number,
): Promise<{ submission: Submission; practical: Practical; scope: SubmissionAccessScope }> {
  const submission = await models().Submission.findByPk(submissionId);
  if (!submission) throw new HttpError(404, 'Not found.');
  return { submission, ...(await scopeOf(submission)) };
}

/**
 * For route handlers: signed in first (a signed-out caller gets 401 whether or not the id
 * exists), then the row (404), then the decision on that row (403, or 404 for another's draft).
 */
export async function authorizeSubmission(
  request: Request,
  submissionId: number,
  kind: 'submission-read' | 'submission-write' | 'submission-mark',
): Promise<{ actor: Actor; submission: Submission; practical: Practical; scope: SubmissionAccessScope }> {
  const actor = await authenticate(request);
  const found = await submissionScope(submissionId);
  permit(actor, { kind, ...found.scope });
  return { actor, ...found };
}
