import 'server-only';
import { decode } from 'next-auth/jwt';
import { Op, QueryTypes } from 'sequelize';
import { sequelize } from '@/lib/db';
import type { CourseRole } from '@/models/course-membership';
import { sessionSecret } from './secret';
import { models } from '@/models';

export const SESSION_COOKIES = ['__Secure-next-auth.session-token', 'next-auth.session-token'];

export type Membership = { courseId: number; role: CourseRole; cohortId: number | null };
/** A cohort (or, with studentId, one student of it) the person marks; only while they are still a TA of that cohort's course. */
export type TaDuty = { cohortId: number; studentId: number | null };

/** The signed-in person as every authorisation decision sees them, read fresh from the database. */
export type Actor = {
  id: number;
  email: string;
  name: string;
  isAdmin: boolean;
  memberships: Membership[];
  taDuties: TaDuty[];
};

export function sessionTokenFromCookieHeader(cookieHeader: string | null | undefined): string | null {
  if (!cookieHeader) return null;
  const jar = new Map<string, string>();
  for (const part of cookieHeader.split(';')) {
    const eq = part.indexOf('=');
    if (eq > 0) jar.set(part.slice(0, eq).trim(), decodeURIComponent(part.slice(eq + 1).trim()));
  }
  for (const name of SESSION_COOKIES) {
    const value = jar.get(name);
    if (value) return value;
  }
  return null;
}

export async function actorFromSessionToken(token: string | null): Promise<Actor | null> {
  if (!token) return null;
  let payload: Awaited<ReturnType<typeof decode>>;
  try {
    payload = await decode({ token, secret: sessionSecret() });
  } catch {
    return null;
  }
  const id = Number(payload?.sub);
  const version = payload?.sv;
  const sid = payload?.sid;
  // Every session token carries its own id (sid), so signing out can end exactly that session.
  if (!Number.isInteger(id) || id <= 0 || typeof version !== 'number' || typeof sid !== 'string' || !SESSION_ID.test(sid)) return null;
  return loadActor(id, version, sid);
}

/** A session id as issued at sign-in: 32 hex digits. */
export const SESSION_ID = /^[a-f0-9]{32}$/;
/** How long a session token lives (next-auth's maxAge); an ended session is remembered this long. */
export const SESSION_MAX_AGE_S = 12 * 60 * 60;

/**
 * Ends one session: its id is recorded until the token would have expired, so the cookie (and any
 * copy of it) no longer authorises anything. Old entries are removed on the way.
 */
export async function endSession(sid: unknown, userId: unknown, now = new Date()): Promise<void> {
  if (typeof sid !== 'string' || !SESSION_ID.test(sid)) return;
  const { EndedSession } = models();
  const uid = Number(userId);
  await EndedSession.destroy({ where: { expiresAt: { [Op.lt]: now } } });
  await EndedSession.findOrCreate({
    where: { sessionId: sid },
    defaults: {
      sessionId: sid,
      userId: Number.isInteger(uid) && uid > 0 ? uid : null,
      expiresAt: new Date(now.getTime() + SESSION_MAX_AGE_S * 1000),
    },
  });
}

/** "Sign out everywhere": raises the account's session version, which ends every session it has, on every instance. */
export async function endAllSessions(userId: number): Promise<void> {
  await models().User.increment('sessionVersion', { by: 1, where: { id: userId } });
}

/**
 * The actor for a user id. With `sessionVersion` (from a session token) a token signed in before
 * the account's sessions were ended (a password was set since) gives null.
 */
export async function loadActor(userId: number, sessionVersion?: number, sessionId?: string): Promise<Actor | null> {
  // One statement for the account, its memberships and its TA duties: this runs on every
  // authenticated request, and three round trips through the driver cost three times one.
  // Each row says what it is (k); the columns a–t mean what that kind needs. A TA duty is read
  // only while its holder is still a TA of the cohort's course (a removed TA keeps no duty).
  const rows = await sequelize().query<ActorRow>(
    `SELECT 'u' AS "k", "id" AS "o", "id" AS "a", "sessionVersion" AS "b", CASE WHEN "isAdmin" THEN 1 ELSE 0 END AS "c",
            ${sessionId !== undefined ? '(SELECT 1 FROM "ended_sessions" WHERE "sessionId" = :sessionId)' : 'NULL'} AS "d",
            CAST("email" AS TEXT) AS "s", CAST("name" AS TEXT) AS "t"
       FROM "users" WHERE "id" = :userId
     UNION ALL
     SELECT 'm', "id", "courseId", "cohortId", NULL, NULL, CAST("role" AS TEXT), NULL FROM "course_memberships" WHERE "userId" = :userId
     UNION ALL
     SELECT 'd', d."id", d."cohortId", d."studentId", NULL, NULL, NULL, NULL
       FROM "ta_assignments" d JOIN "cohorts" c ON c."id" = d."cohortId"
      WHERE d."taId" = :userId
        AND EXISTS (SELECT 1 FROM "course_memberships" m WHERE m."userId" = :userId AND m."courseId" = c."courseId" AND m."role" = 'ta')
     ORDER BY 1, 2`,
    { replacements: { userId, sessionId: sessionId ?? '' }, type: QueryTypes.SELECT },
  );
  const user = rows.find((r) => r.k === 'u');
  if (!user) return null;
  if (sessionVersion !== undefined && sessionVersion !== Number(user.b)) return null;
  if (user.d !== null && user.d !== undefined) return null;
  const int = (v: unknown) => (v === null || v === undefined ? null : Number(v));
  return {
    id: Number(user.a),
    email: String(user.s),
    name: String(user.t),
    isAdmin: Number(user.c) === 1,
    memberships: rows.filter((r) => r.k === 'm').map((r) => ({ courseId: Number(r.a), role: r.s as CourseRole, cohortId: int(r.b) })),
    taDuties: rows.filter((r) => r.k === 'd').map((r) => ({ cohortId: Number(r.a), studentId: int(r.b) })),
  };
}

/** A row of loadActor's statement: the account (u), a membership (m) or a TA duty (d). */
type ActorRow = {
  k: 'u' | 'm' | 'd';
  o: number;
  a: number;
  b: number | null;
  c: number | null;
  d: number | null;
  s: string | null;
  t: string | null;
};
