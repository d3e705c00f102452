import { decode } from 'next-auth/jwt';
import { models } from '@/models';
import type { CourseRole } from '@/models/course-membership';
import { sessionSecret } from './secret';

export const SESSION_COOKIES = ['__Secure-next-auth.session-token', 'next-auth.session-token'];

export type Membership = { courseId: number; role: CourseRole; cohortId: number | null };
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
  if (!Number.isInteger(id) || id <= 0) return null;
  return loadActor(id);
}

export async function loadActor(userId: number): Promise<Actor | null> {
  const { User, CourseMembership, TaAssignment } = models();
  const user = await User.findByPk(userId);
  if (!user) return null;
  const [memberships, duties] = await Promise.all([
    CourseMembership.findAll({ where: { userId }, attributes: ['courseId', 'role', 'cohortId'], raw: true }),
    TaAssignment.findAll({ where: { taId: userId }, attributes: ['cohortId', 'studentId'], raw: true }),
  ]);
  return {
    id: user.id,
    email: user.email,
    name: user.name,
    isAdmin: user.isAdmin,
    memberships: memberships as Membership[],
    taDuties: duties as TaDuty[],
  };
}
