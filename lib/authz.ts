/**
 * The one place that decides who may do what. Every route handler, server action and page
 * calls `authorize` / `authorizePage` with an Access describing what it is about to do; the
 * route-protection file (proxy.ts) only sends signed-out visitors to the sign-in page.
 */
import type { CourseRole } from '@/models/course-membership';
import { actorFromSessionToken, sessionTokenFromCookieHeader, SESSION_COOKIES, type Actor } from './auth/session';
import { HttpError } from './http-error';

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

/** Cohorts (and, for group duties, students) the actor marks. */
function marks(actor: Actor, cohortId: number, studentId?: number): boolean {
  return actor.taDuties.some((d) => d.cohortId === cohortId && (d.studentId === null || d.studentId === studentId));
}

export function can(actor: Actor | null, access: Access): boolean {
  if (!actor) return false;
  if (access.kind === 'signed-in') return true;
  if (access.kind === 'admin') return actor.isAdmin;
  if (access.kind === 'role') return hasRole(actor, access.role);
  if (access.kind === 'submission-write') {
    return (
      actor.id === access.studentId &&
      actor.memberships.some((m) => m.courseId === access.courseId && m.role === 'student' && m.cohortId === access.cohortId)
    );
  }
  if ((access.kind === 'submission-read' || access.kind === 'submission-mark') && access.draft) {
    return access.kind === 'submission-read' && actor.id === access.studentId;
  }
  if (actor.isAdmin) return true;

  const roles = rolesIn(actor, access.courseId);
  const manages = roles.includes('instructor') || roles.includes('lead');
  switch (access.kind) {
    case 'course-staff':
      return manages || roles.includes('ta');
    case 'course-manage':
    case 'moderate':
      return manages;
    case 'statistics':
      if (manages) return true;
      return roles.includes('ta') && access.cohortId !== undefined && marks(actor, access.cohortId);
    case 'submission-mark':
      return manages || (roles.includes('ta') && marks(actor, access.cohortId, access.studentId));
    case 'submission-read':
      return (
        actor.id === access.studentId ||
        manages ||
        (roles.includes('ta') && marks(actor, access.cohortId, access.studentId))
      );
  }
}

/**
 * The courses in which the actor may do a course-wide duty, page and API alike. The site
 * administrator holds every duty in every course (README: "everything"), so moderation, set-up and
 * staff views list every open course for them, not only courses they are a member of.
 */
export async function coursesWhere(actor: Actor, kind: 'moderate' | 'course-manage' | 'course-staff'): Promise<number[]> {
  const { models } = await import('@/models');
  const candidates = actor.isAdmin
    ? (await models().Course.findAll({ where: { archivedAt: null }, attributes: ['id'], order: [['code', 'ASC']] })).map((c) => c.id)
    : [...new Set(actor.memberships.map((m) => m.courseId))];
  return candidates.filter((courseId) => can(actor, { kind, courseId }));
}

/** The signed-in person behind a request, or null. */
export async function actorFromRequest(request: Request): Promise<Actor | null> {
  return actorFromSessionToken(sessionTokenFromCookieHeader(request.headers.get('cookie')));
}

/**
 * For route handlers, before anything is looked up: the signed-in actor, or 401. A signed-out
 * caller then learns nothing from the answer (no 404 for a missing id beside a 401 for an existing one).
 */
export async function authenticate(request: Request): Promise<Actor> {
  const actor = await actorFromRequest(request);
  if (!actor) throw new HttpError(401, 'Sign in to continue.');
  return actor;
}

/** For route handlers: returns the actor, or throws 401 (not signed in) / 403 (not allowed). */
export async function authorize(request: Request, access: Access = { kind: 'signed-in' }): Promise<Actor> {
  return permit(await authenticate(request), access);
}

/**
 * A further check for an actor `authorize` already returned, once the handler has read what the
 * request is about (the submission's cohort, each item of a batch): 403 unless allowed.
 */
export function permit(actor: Actor, access: Access): Actor {
  if (!can(actor, access)) {
    // Someone else's draft is not there for the caller at all, as on the marking pages.
    if ((access.kind === 'submission-read' || access.kind === 'submission-mark') && access.draft) throw new HttpError(404, 'Not found.');
    throw new HttpError(403, 'You do not have permission for this.');
  }
  return actor;
}

/** For pages and server actions: redirects to sign-in or to the not-permitted page. */
export async function authorizePage(access: Access = { kind: 'signed-in' }): Promise<Actor> {
  const { cookies } = await import('next/headers');
  const { notFound, redirect } = await import('next/navigation');
  const jar = await cookies();
  const token = SESSION_COOKIES.map((n) => jar.get(n)?.value).find(Boolean) ?? null;
  const actor = await actorFromSessionToken(token);
  if (!actor) redirect('/signin');
  if (!can(actor, access)) {
    if ((access.kind === 'submission-read' || access.kind === 'submission-mark') && access.draft) notFound();
    redirect('/not-permitted');
  }
  return actor as Actor;
}

/** The actor if signed in, without requiring anything (for the shared layout). */
export async function currentActor(): Promise<Actor | null> {
  const { cookies } = await import('next/headers');
  const jar = await cookies();
  const token = SESSION_COOKIES.map((n) => jar.get(n)?.value).find(Boolean) ?? null;
  return actorFromSessionToken(token);
}

