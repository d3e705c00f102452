/**
 * Loading a submission or practical for a request, with the access decision taken from the
 * database row (never from ids the client sent).
 */
import { authorize, type Actor } from '@/lib/authz';
import { HttpError } from '@/lib/http';
import { models } from '@/models';
import type { Submission } from '@/models/submission';
import type { Practical } from '@/models/practical';
import type { PracticalCohort } from '@/models/practical-cohort';

export async function scopeOf(submission: Submission) {
  const practical = await models().Practical.findByPk(submission.practicalId);
  if (!practical) throw new HttpError(404, 'Not found.');
  return { practical, scope: { courseId: practical.courseId, cohortId: submission.cohortId, studentId: submission.studentId } };
}

export async function loadSubmissionFor(request: Request, id: number, kind: 'submission-read' | 'submission-write') {
  const submission = await models().Submission.findByPk(id);
  if (!submission) throw new HttpError(404, 'No such submission.');
  const { practical, scope } = await scopeOf(submission);
  const actor = await authorize(request, { kind, ...scope });
  return { actor, submission, practical };
}

/** The cohort through which a student takes a practical: their student membership in its course, if the practical is set for that cohort. */
export async function studentPlacement(actor: Actor, practical: Practical): Promise<PracticalCohort | null> {
  const cohortIds = actor.memberships.filter((m) => m.courseId === practical.courseId && m.role === 'student' && m.cohortId !== null).map((m) => m.cohortId as number);
  if (!cohortIds.length) return null;
  return models().PracticalCohort.findOne({ where: { practicalId: practical.id, cohortId: cohortIds } });
}

export function isOpen(pc: PracticalCohort, practical: Practical, now = new Date()): boolean {
  if (practical.archivedAt) return false;
  if (pc.opensAt && pc.opensAt > now) return false;
  return true;
}
