/**
 * The one place that decides who may do what. Every route handler, server action and page
 * calls `authorize` / `authorizePage` (or a loader of this folder built on them) with an Access
 * describing what it is about to do; the route-protection file (proxy.ts) only sends signed-out
 * visitors to the sign-in page.
 *
 * lib/authz/decision.ts  the decision (`can`), pure
 * lib/authz/index.ts     request and page entry points: 401 / 403 / 404 and redirects
 * lib/authz/submission.ts, practical.ts, placement.ts, statistics.ts
 *                        loaders: read the row a request is about, then decide from the row
 */
import 'server-only';
import { actorFromSessionToken, sessionTokenFromCookieHeader, SESSION_COOKIES, type Actor } from '@/lib/auth/session';
import { HttpError } from '@/lib/http-error';
import { can, isDraftAccess, type Access } from './decision';

export { can, hasRole, managesCourse, rolesIn, type Access, type Actor } from './decision';

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
export function permit(actor: Actor, access: Access, refusal = 'You do not have permission for this.'): Actor {
  if (!can(actor, access)) {
    // Someone else's draft is not there for the caller at all, as on the marking pages.
    if (isDraftAccess(access)) throw new HttpError(404, 'Not found.');
    throw new HttpError(403, refusal);
  }
  return actor;
}

async function sessionActor(): Promise<Actor | null> {
  const { cookies } = await import('next/headers');
  const jar = await cookies();
  const token = SESSION_COOKIES.map((n) => jar.get(n)?.value).find(Boolean) ?? null;
  return actorFromSessionToken(token);
}

/** For pages and server actions: redirects to sign-in or to the not-permitted page. */
export async function authorizePage(access: Access = { kind: 'signed-in' }): Promise<Actor> {
  const { notFound, redirect } = await import('next/navigation');
  const actor = await sessionActor();
  if (!actor) redirect('/signin');
  if (!can(actor, access)) {
    if (isDraftAccess(access)) notFound();
    redirect('/not-permitted');
  }
  return actor as Actor;
}

/** The actor if signed in, without requiring anything (for the shared layout). */
export async function currentActor(): Promise<Actor | null> {
  return sessionActor();
}
