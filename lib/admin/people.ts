/**
 * The site administrator's people list: search by name, e-mail or student number, each person
 * with their course roles (and cohort, with its term). Callers authorise first ({ kind: 'admin' }).
 */
import { Op } from 'sequelize';
import { z } from 'zod';
import { models } from '@/models';

export const PEOPLE_PAGE_SIZE = 25;

export const peopleQuery = z.object({
  q: z.string().trim().max(120).optional().default(''),
  page: z.coerce.number().int().min(1).max(10_000).optional().default(1),
});

export type AdminPerson = {
  id: number;
  name: string;
  email: string;
  studentNumber: string | null;
  isAdmin: boolean;
  invited: boolean;
  roles: { membershipId: number; courseId: number; course: string; role: string; cohort: string | null }[];
};

/** `%` and `_` typed by the administrator are matched literally. */
const like = (text: string) => `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;

export async function searchPeople(
  input: z.input<typeof peopleQuery>,
): Promise<{ people: AdminPerson[]; total: number; page: number; pages: number; q: string }> {
  const { q, page } = peopleQuery.parse(input);
  const { User, CourseMembership, Course, Cohort } = models();
  const where = q
    ? {
        [Op.or]: [
          { name: { [Op.like]: like(q) } },
          { email: { [Op.like]: like(q.toLowerCase()) } },
          { studentNumber: { [Op.like]: like(q) } },
        ],
      }
    : {};
  const { rows, count } = await User.findAndCountAll({
    where,
    attributes: ['id', 'name', 'email', 'studentNumber', 'isAdmin', 'passwordHash'],
    order: [
      ['name', 'ASC'],
      ['id', 'ASC'],
    ],
    limit: PEOPLE_PAGE_SIZE,
    offset: (page - 1) * PEOPLE_PAGE_SIZE,
  });
  const ids = rows.map((u) => u.id);
  const memberships = ids.length
    ? await CourseMembership.findAll({
        where: { userId: ids },
        order: [
          ['courseId', 'ASC'],
          ['id', 'ASC'],
        ],
      })
    : [];
  const [courses, cohorts] = await Promise.all([
    memberships.length
      ? Course.findAll({ where: { id: [...new Set(memberships.map((m) => m.courseId))] }, attributes: ['id', 'code'] })
      : Promise.resolve([]),
    memberships.some((m) => m.cohortId)
      ? Cohort.findAll({
          where: { id: [...new Set(memberships.map((m) => m.cohortId).filter((x): x is number => x !== null))] },
          attributes: ['id', 'name', 'term'],
        })
      : Promise.resolve([]),
  ]);
  return {
    q,
    page,
    total: count,
    pages: Math.max(1, Math.ceil(count / PEOPLE_PAGE_SIZE)),
    people: rows.map((u) => ({
      id: u.id,
      name: u.name,
      email: u.email,
      studentNumber: u.studentNumber,
      isAdmin: u.isAdmin,
      invited: !u.passwordHash,
      roles: memberships
        .filter((m) => m.userId === u.id)
        .map((m) => {
          const cohort = m.cohortId ? cohorts.find((c) => c.id === m.cohortId) : null;
          return {
            membershipId: m.id,
            courseId: m.courseId,
            course: courses.find((c) => c.id === m.courseId)?.code ?? `course ${m.courseId}`,
            role: m.role,
            cohort: cohort ? `${cohort.name} (${cohort.term})` : null,
          };
        }),
    })),
  };
}

/** Courses with their open cohorts, for the grant form. */
export async function coursesForGrant() {
  const { Course, Cohort } = models();
  const [courses, cohorts] = await Promise.all([
    Course.findAll({ order: [['code', 'ASC']], attributes: ['id', 'code', 'title', 'archivedAt'] }),
    Cohort.findAll({
      where: { archivedAt: null },
      order: [
        ['term', 'DESC'],
        ['name', 'ASC'],
      ],
      attributes: ['id', 'courseId', 'name', 'term'],
    }),
  ]);
  return courses.map((c) => ({
    id: c.id,
    code: c.code,
    title: c.title,
    archived: c.archivedAt !== null,
    cohorts: cohorts.filter((h) => h.courseId === c.id).map((h) => ({ id: h.id, name: h.name, term: h.term })),
  }));
}
