/**
 * The decision itself: who may do what, from the signed-in actor and an Access describing what is
 * about to happen. Pure (no database, no request): the loaders beside it (lib/authz/*.ts) read the
 * rows a request is about and ask `can`; lib/authz/index.ts turns a refusal into 401/403/404.
 */
import type { CourseRole } from '@/models/course-membership';
import type { Actor } from '@/lib/auth/session';

export type { Actor };

type SubmissionScope = {
  courseId: number;
  cohortId: number;
  studentId: number;
  /**
   * The row is an unsubmitted draft. A draft is the student's own until it is submitted: nobody
   * else reads or marks it, staff and administrators included, and to them it does not exist (404).
   */
  draft?: boolean;
};

export type Access =
  | { kind: 'signed-in' }
  | { kind: 'admin' }
  /** Holds this role in at least one course (role home pages). */
  | { kind: 'role'; role: CourseRole }
  /** Lead or instructor in at least one course (or the administrator): starts courses, previews instructions. */
  | { kind: 'course-manager' }
  /** Any staff role in the course: TA, instructor, course lead. */
  | { kind: 'course-staff'; courseId: number }
  /** Set the course up: cohorts, roster, practicals, bands. */
  | { kind: 'course-manage'; courseId: number }
  | { kind: 'moderate'; courseId: number }
  /** Statistics of one cohort (TAs: only cohorts they mark) or, without cohortId, of the whole course. */
  | { kind: 'statistics'; courseId: number; cohortId?: number }
  | ({ kind: 'submission-read' } & SubmissionScope)
  | ({ kind: 'submission-mark' } & SubmissionScope)
  /** Only the student themself, enrolled in that cohort. */
  | ({ kind: 'submission-write' } & SubmissionScope);

export function rolesIn(actor: Actor, courseId: number): CourseRole[] {
  return actor.memberships.filter((m) => m.courseId === courseId).map((m) => m.role);
}

export function hasRole(actor: Actor, role: CourseRole): boolean {
  return actor.memberships.some((m) => m.role === role);
}

/** Lead or instructor of the course, or the site administrator: sets it up, moderates, sees every cohort and markers' names. */
export function managesCourse(actor: Actor, courseId: number): boolean {
  const roles = rolesIn(actor, courseId);
  return actor.isAdmin || roles.includes('lead') || roles.includes('instructor');
}

/** Cohorts (and, for group duties, students) the actor marks. */
function marks(actor: Actor, cohortId: number, studentId?: number): boolean {
  return actor.taDuties.some((d) => d.cohortId === cohortId && (d.studentId === null || d.studentId === studentId));
}

/** A draft's scope reaches nobody but its student (and is not there at all for anyone else). */
export function isDraftAccess(access: Access): boolean {
  return (access.kind === 'submission-read' || access.kind === 'submission-mark') && access.draft === true;
}

export function can(actor: Actor | null, access: Access): boolean {
  if (!actor) return false;
  if (access.kind === 'signed-in') return true;
  if (access.kind === 'admin') return actor.isAdmin;
  if (access.kind === 'role') return hasRole(actor, access.role);
  if (access.kind === 'course-manager') return actor.isAdmin || hasRole(actor, 'instructor') || hasRole(actor, 'lead');
  if (access.kind === 'submission-write') {
    return (
      actor.id === access.studentId &&
      actor.memberships.some((m) => m.courseId === access.courseId && m.role === 'student' && m.cohortId === access.cohortId)
    );
  }
  if (isDraftAccess(access)) return access.kind === 'submission-read' && actor.id === access.studentId;
  if (actor.isAdmin) return true;

  const manages = managesCourse(actor, access.courseId);
  const ta = rolesIn(actor, access.courseId).includes('ta');
  switch (access.kind) {
    case 'course-staff':
      return manages || ta;
    case 'course-manage':
    case 'moderate':
      return manages;
    case 'statistics':
      if (manages) return true;
      return ta && access.cohortId !== undefined && marks(actor, access.cohortId);
    case 'submission-mark':
      return manages || (ta && marks(actor, access.cohortId, access.studentId));
    case 'submission-read':
      return actor.id === access.studentId || manages || (ta && marks(actor, access.cohortId, access.studentId));
  }
}
