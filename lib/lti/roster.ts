/**
 * The course roster from the learning platform (Names and Role Provisioning Services): every member
 * is classified against the Oscillab course as it is — new, changed, leaving, unchanged, or not
 * taken (a role Oscillab has nothing for, an account conflict) — for a preview that writes nothing.
 * Confirming fetches the roster again, classifies it inside one transaction, and writes only if it
 * is still what the instructor saw (same fingerprint); otherwise nothing, and they look again.
 */
import crypto from 'node:crypto';
import type { Transaction } from 'sequelize';
import { sequelize } from '@/lib/db';
import { audit } from '@/lib/audit';
import { HttpError } from '@/lib/http-error';
import { models } from '@/models';
import type { CourseRole } from '@/models/course-membership';
import type { LtiContext } from '@/models/lti-context';
import { courseRoleFor, roleLabel } from './claims';
import { accountFor, cohortForNewStudents, matchAccount, type Person } from './launch';
import { PlatformAnswered, PlatformUnreachable } from './fetch';
import { fetchRoster, type PlatformMember } from './services';

export type PlatformRosterStatus = 'new' | 'changed' | 'leaving' | 'unchanged' | 'not-taken';
export type PlatformRosterRow = {
  sub: string;
  name: string;
  email: string | null;
  platformRoles: string[];
  role: CourseRole | null;
  status: PlatformRosterStatus;
  /** What confirming does to this person, in words. */
  change: string;
  userId: number | null;
};
export type PlatformRosterPreview = {
  ltiContextId: number;
  courseId: number;
  rows: PlatformRosterRow[];
  counts: Record<PlatformRosterStatus, number>;
  /** Changes the preview shows, for confirming exactly those. */
  fingerprint: string;
};

const ACTIVE = (m: PlatformMember) => !m.status || m.status === 'Active';
const nameOf = (m: PlatformMember) =>
  (m.name || [m.given_name, m.family_name].filter(Boolean).join(' ') || m.email || m.user_id).slice(0, 200);
const emailOf = (m: PlatformMember) => {
  const e = typeof m.email === 'string' ? m.email.trim().toLowerCase() : '';
  return e && e.length <= 254 && /^[^\s@,;<>"]+@[^\s@,;<>"]+\.[^\s@,;<>"]+$/.test(e) ? e : null;
};
const STAFF: CourseRole[] = ['ta', 'instructor', 'lead'];

export async function loadContext(ltiContextId: number): Promise<LtiContext> {
  const ctx = await models().LtiContext.findByPk(ltiContextId);
  if (!ctx) throw new HttpError(404, 'No such learning-platform course.');
  return ctx;
}

/** The platform's roster, or a 4xx/502 a person can act on. */
export async function rosterFromPlatform(ctx: LtiContext): Promise<PlatformMember[]> {
  try {
    return await fetchRoster(ctx);
  } catch (error) {
    if (error instanceof PlatformUnreachable || error instanceof PlatformAnswered)
      throw new HttpError(502, `The learning platform’s roster could not be fetched: ${error.message}`);
    if (error instanceof Error && /launch Oscillab once/.test(error.message)) throw new HttpError(409, error.message);
    throw error;
  }
}

export async function classifyRoster(
  ctx: LtiContext,
  members: PlatformMember[],
  transaction?: Transaction,
): Promise<PlatformRosterPreview> {
  const { CourseMembership, LtiUserLink, User } = models();
  const rows: PlatformRosterRow[] = [];
  const seen = new Set<string>();
  const newStudentCohort = await cohortForNewStudents(ctx, transaction);
  const memberships = await CourseMembership.findAll({ where: { courseId: ctx.courseId }, transaction });
  const rolesOf = (userId: number) => memberships.filter((m) => m.userId === userId).map((m) => m.role);

  for (const m of members.slice(0, 5000)) {
    if (seen.has(m.user_id)) continue;
    seen.add(m.user_id);
    const person: Person = { sub: m.user_id.slice(0, 255), email: emailOf(m), name: nameOf(m) };
    const role = courseRoleFor(m.roles);
    const base = { sub: person.sub, name: person.name, email: person.email, platformRoles: m.roles.map(roleLabel), role };
    const match = await matchAccount(ctx.registrationId, person, transaction);
    const user = match.kind === 'linked' || match.kind === 'by-email' ? match.user : null;
    const held = user ? rolesOf(user.id) : [];

    if (!ACTIVE(m)) {
      const leaving = role && user && held.includes(role);
      rows.push({
        ...base,
        userId: user?.id ?? null,
        status: leaving ? 'leaving' : 'not-taken',
        change: leaving
          ? `Leaves the course (${m.status} on the learning platform): their ${role} role ends; their work is kept.`
          : `${m.status} on the learning platform and not in this course.`,
      });
      continue;
    }
    if (!role) {
      rows.push({
        ...base,
        userId: user?.id ?? null,
        status: 'not-taken',
        change: 'Their role on the learning platform has no counterpart in Oscillab.',
      });
      continue;
    }
    if (match.kind === 'conflict') {
      rows.push({ ...base, userId: null, status: 'not-taken', change: match.reason });
      continue;
    }
    const needsRole = !(held.includes(role) || (role === 'student' && held.some((r) => STAFF.includes(r))));
    if (needsRole && role === 'student' && !newStudentCohort) {
      rows.push({
        ...base,
        userId: user?.id ?? null,
        status: 'not-taken',
        change: 'No cohort is chosen for students from the learning platform (choose one above).',
      });
      continue;
    }
    if (needsRole) {
      const what =
        match.kind === 'new' ? 'New account' : match.kind === 'by-email' ? 'Existing account (matched by e-mail)' : 'Existing account';
      rows.push({
        ...base,
        userId: user?.id ?? null,
        status: 'new',
        change: `${what}; becomes ${role === 'ta' ? 'teaching assistant' : role} in this course.`,
      });
      continue;
    }
    const renamed = user && user.name !== person.name;
    const unlinked = match.kind === 'by-email';
    if (renamed || unlinked) {
      rows.push({
        ...base,
        userId: user!.id,
        status: 'changed',
        change: [renamed ? `Name changes from “${user!.name}”.` : '', unlinked ? 'Account gets connected to the learning platform.' : '']
          .filter(Boolean)
          .join(' '),
      });
      continue;
    }
    rows.push({ ...base, userId: user?.id ?? null, status: 'unchanged', change: '—' });
  }

  // People Oscillab connected to this platform who hold a role here but are no longer on its roster.
  const links = await LtiUserLink.findAll({
    where: { registrationId: ctx.registrationId, userId: [...new Set(memberships.map((m) => m.userId))] },
    transaction,
  });
  for (const link of links) {
    if (seen.has(link.sub)) continue;
    const user = await User.findByPk(link.userId, { transaction });
    const held = rolesOf(link.userId).filter((r) => r !== 'lead');
    if (!user || !held.length) continue;
    rows.push({
      sub: link.sub,
      name: user.name,
      email: user.email,
      platformRoles: [],
      role: held[0],
      userId: user.id,
      status: 'leaving',
      change: `No longer on the learning platform’s roster: their ${held.join(' and ')} role ends; their work is kept.`,
    });
  }

  const counts: Record<PlatformRosterStatus, number> = { new: 0, changed: 0, leaving: 0, unchanged: 0, 'not-taken': 0 };
  for (const r of rows) counts[r.status]++;
  const changes = rows
    .filter((r) => r.status === 'new' || r.status === 'changed' || r.status === 'leaving')
    .map((r) => [r.sub, r.status, r.role, r.name, r.email]);
  const fingerprint = crypto.createHash('sha256').update(JSON.stringify(changes)).digest('hex').slice(0, 32);
  return { ltiContextId: ctx.id, courseId: ctx.courseId, rows, counts, fingerprint };
}

export async function previewPlatformRoster(ctx: LtiContext): Promise<PlatformRosterPreview> {
  return classifyRoster(ctx, await rosterFromPlatform(ctx));
}

export type PlatformRosterResult = PlatformRosterPreview & {
  applied: { added: number; renamed: number; connected: number; removed: number };
};

/** Write the changes the preview showed (same fingerprint), all or nothing. */
export async function applyPlatformRoster(ctx: LtiContext, fingerprint: string, actorId: number): Promise<PlatformRosterResult> {
  const members = await rosterFromPlatform(ctx);
  const { CourseMembership, LtiContext: Contexts, User } = models();
  return sequelize().transaction(async (t) => {
    const preview = await classifyRoster(ctx, members, t);
    if (preview.fingerprint !== fingerprint)
      throw new HttpError(
        409,
        'The roster changed since the preview (on the learning platform or in Oscillab). Nothing was written; look at the new preview and confirm again.',
      );
    const applied = { added: 0, renamed: 0, connected: 0, removed: 0 };
    const byMember = new Map(members.map((m) => [m.user_id.slice(0, 255), m]));
    for (const row of preview.rows) {
      if (row.status === 'new') {
        const person: Person = { sub: row.sub, email: row.email, name: row.name };
        const match = await matchAccount(ctx.registrationId, person, t);
        const user = await accountFor(ctx.registrationId, person, match, t);
        const role = row.role!;
        const cohortId = role === 'student' ? await cohortForNewStudents(ctx, t) : null;
        await CourseMembership.create({ userId: user.id, courseId: ctx.courseId, role, cohortId }, { transaction: t });
        applied.added++;
      } else if (row.status === 'changed') {
        const person: Person = { sub: row.sub, email: row.email, name: row.name };
        const match = await matchAccount(ctx.registrationId, person, t);
        if (match.kind === 'by-email') {
          await accountFor(ctx.registrationId, person, match, t);
          applied.connected++;
        }
        const user = await User.findByPk(row.userId!, { transaction: t });
        if (user && user.name !== row.name) {
          await user.update({ name: row.name }, { transaction: t });
          applied.renamed++;
        }
      } else if (row.status === 'leaving') {
        const member = byMember.get(row.sub);
        // Inactive on the platform: the role it maps to ends. Gone from the roster: every role here but course lead.
        const roles: CourseRole[] = member ? [row.role!] : (['student', 'ta', 'instructor'] as CourseRole[]);
        applied.removed += await CourseMembership.destroy({
          where: { userId: row.userId!, courseId: ctx.courseId, role: roles },
          transaction: t,
        });
      }
    }
    await Contexts.update({ rosterSyncedAt: new Date() }, { where: { id: ctx.id }, transaction: t });
    await audit(
      {
        actorId,
        action: 'lti.roster.sync',
        entityType: 'course',
        entityId: ctx.courseId,
        before: null,
        after: { ltiContextId: ctx.id, ...applied },
      },
      t,
    );
    return { ...preview, applied };
  });
}
