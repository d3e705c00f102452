/**
 * Courses, cohorts, staff and TA duties: the reads and writes behind the course screens.
 * Callers authorise first (course-manage on the course the row belongs to).
 */
import { Op, type InferAttributes } from 'sequelize';
import type { z } from 'zod';
import { sequelize } from '@/lib/db';
import { models } from '@/models';
import type { Actor } from '@/lib/authz';
import { HttpError } from '@/lib/http-error';
import { audit } from '@/lib/audit';
import type { cohortCreateSchema, cohortUpdateSchema, staffAddSchema, taAssignmentSchema } from '@/lib/schemas/instructor';
import { inviteUser } from './invitations';
import type { Serialized } from '@/lib/serialized';
import type { Course } from '@/models/course';

export async function courseOr404(courseId: number) {
  const course = await models().Course.findByPk(courseId);
  if (!course) throw new HttpError(404, 'No such course.');
  return course;
}

/** Courses the actor may set up (instructor or lead; an administrator sees all). */
export async function managedCourses(actor: Actor) {
  const { Course, Cohort, Practical, PracticalCohort } = models();
  const ids = [...new Set(actor.memberships.filter((m) => m.role === 'instructor' || m.role === 'lead').map((m) => m.courseId))];
  const courses = await Course.findAll({ where: actor.isAdmin ? {} : { id: ids.length ? ids : [0] }, order: [['code', 'ASC']] });
  const courseIds = courses.map((c) => c.id);
  const [cohorts, practicals] = await Promise.all([
    Cohort.findAll({
      where: { courseId: courseIds },
      order: [
        ['term', 'DESC'],
        ['name', 'ASC'],
      ],
    }),
    Practical.findAll({ where: { courseId: courseIds }, order: [['id', 'ASC']] }),
  ]);
  const deadlines = await PracticalCohort.findAll({ where: { practicalId: practicals.map((p) => p.id) } });
  return courses.map((c) => ({
    id: c.id,
    code: c.code,
    title: c.title,
    archived: c.archivedAt !== null,
    cohorts: cohorts
      .filter((h) => h.courseId === c.id)
      .map((h) => ({ id: h.id, name: h.name, term: h.term, instrument: h.instrument, archived: h.archivedAt !== null })),
    practicals: practicals
      .filter((p) => p.courseId === c.id)
      .map((p) => ({
        id: p.id,
        title: p.title,
        species: p.species,
        mode: p.mode,
        archived: p.archivedAt !== null,
        deadlines: deadlines
          .filter((d) => d.practicalId === p.id)
          .map((d) => ({ cohortId: d.cohortId, deadline: d.deadline.toISOString() })),
      })),
  }));
}

export async function createCohort(courseId: number, data: z.output<typeof cohortCreateSchema>, actorId: number) {
  const { Cohort } = models();
  return sequelize().transaction(async (transaction) => {
    if (await Cohort.findOne({ where: { courseId, name: data.name, term: data.term }, transaction })) {
      throw new HttpError(409, `There is already a cohort "${data.name}" in ${data.term}.`, { name: ['Already exists in this term.'] });
    }
    const cohort = await Cohort.create(
      { courseId, name: data.name, term: data.term, instrument: data.instrument || null, archivedAt: null },
      { transaction },
    );
    await audit(
      { actorId, action: 'cohort.create', entityType: 'cohort', entityId: cohort.id, after: cohort.get({ plain: true }) },
      transaction,
    );
    return cohort;
  });
}

export async function updateCohort(cohortId: number, courseId: number, data: z.output<typeof cohortUpdateSchema>, actorId: number) {
  const { Cohort } = models();
  return sequelize().transaction(async (transaction) => {
    const cohort = await Cohort.findOne({ where: { id: cohortId, courseId }, transaction });
    if (!cohort) throw new HttpError(404, 'No such cohort in this course.');
    const before = { ...cohort.get({ plain: true }) };
    const name = data.name ?? cohort.name;
    const term = data.term ?? cohort.term;
    if (
      (name !== cohort.name || term !== cohort.term) &&
      (await Cohort.findOne({ where: { courseId, name, term, id: { [Op.ne]: cohort.id } }, transaction }))
    ) {
      throw new HttpError(409, `There is already a cohort "${name}" in ${term}.`, { name: ['Already exists in this term.'] });
    }
    await cohort.update(
      {
        name,
        term,
        ...(data.instrument !== undefined ? { instrument: data.instrument || null } : {}),
        ...(data.archived !== undefined ? { archivedAt: data.archived ? (cohort.archivedAt ?? new Date()) : null } : {}),
      },
      { transaction },
    );
    await audit(
      { actorId, action: 'cohort.update', entityType: 'cohort', entityId: cohort.id, before, after: cohort.get({ plain: true }) },
      transaction,
    );
    return cohort;
  });
}

/** GET /api/courses/[id]/roster's answer. */
export type CoursePeople = Serialized<Awaited<ReturnType<typeof coursePeople>>>;

/** Everyone in the course with their roles, cohort and TA duties. */
export async function coursePeople(courseId: number) {
  const { CourseMembership, User, TaAssignment, Cohort } = models();
  const memberships = await CourseMembership.findAll({
    where: { courseId },
    include: [{ model: User, attributes: ['id', 'name', 'email', 'studentNumber', 'passwordHash'] }],
    order: [['id', 'ASC']],
  });
  const cohorts = await Cohort.findAll({ where: { courseId }, attributes: ['id'] });
  const duties = await TaAssignment.findAll({ where: { cohortId: cohorts.map((c) => c.id) }, order: [['id', 'ASC']] });
  return {
    people: memberships.map((m) => {
      const u = (
        m as unknown as { User: { id: number; name: string; email: string; studentNumber: string | null; passwordHash: string | null } }
      ).User;
      return {
        membershipId: m.id,
        userId: u.id,
        name: u.name,
        email: u.email,
        studentNumber: u.studentNumber,
        role: m.role,
        cohortId: m.cohortId,
        invited: !u.passwordHash,
      };
    }),
    duties: duties.map((d) => ({ id: d.id, cohortId: d.cohortId, taId: d.taId, studentId: d.studentId })),
  };
}

/** POST /api/courses/[id]/staff's answer. */
export type StaffAdded = { userId: number; created: boolean; invited: boolean };
/** POST /api/courses's answer: the course as stored (a model serialises to its columns). */
export type CourseCreated = { course: Serialized<InferAttributes<Course>> };

/** Add a TA, instructor or lead by e-mail; an unknown address gets an account and an invitation. */
export async function addStaff(courseId: number, data: z.output<typeof staffAddSchema>, actorId: number) {
  const { User, CourseMembership, Course } = models();
  return sequelize().transaction(async (transaction) => {
    const course = (await Course.findByPk(courseId, { transaction }))!;
    let user = await User.findOne({ where: { email: data.email }, transaction });
    let invited = false;
    if (!user) {
      if (!data.name)
        throw new HttpError(400, 'No account has this e-mail yet: give the person’s name so an invitation can be sent.', {
          name: ['Required for a new account.'],
        });
      user = await User.create(
        { email: data.email, name: data.name, passwordHash: null, isAdmin: false, studentNumber: null },
        { transaction },
      );
    }
    const memberships = await CourseMembership.findAll({ where: { courseId, userId: user.id }, transaction });
    if (memberships.some((m) => m.role === 'student')) throw new HttpError(409, 'This person is a student of this course.');
    if (memberships.some((m) => m.role === data.role)) return { user, created: false, invited };
    const m = await CourseMembership.create({ userId: user.id, courseId, role: data.role, cohortId: null }, { transaction });
    if (!user.passwordHash) {
      await inviteUser(user, { courseTitle: `${course.code} ${course.title}`, role: data.role }, transaction);
      invited = true;
    }
    await audit(
      { actorId, action: 'staff.add', entityType: 'course_membership', entityId: m.id, after: { userId: user.id, role: data.role } },
      transaction,
    );
    return { user, created: true, invited };
  });
}

export async function removeMembership(courseId: number, membershipId: number, actorId: number) {
  const { CourseMembership } = models();
  return sequelize().transaction(async (transaction) => {
    const m = await CourseMembership.findOne({ where: { id: membershipId, courseId }, transaction });
    if (!m) throw new HttpError(404, 'No such member of this course.');
    if (m.userId === actorId && m.role !== 'student' && m.role !== 'ta') throw new HttpError(400, 'You cannot remove your own role here.');
    await m.destroy({ transaction });
    await audit(
      { actorId, action: 'membership.remove', entityType: 'course_membership', entityId: m.id, before: m.get({ plain: true }) },
      transaction,
    );
  });
}

/** A TA marks a whole cohort (no students given) or the named students of it. */
export async function assignTa(courseId: number, data: z.output<typeof taAssignmentSchema>, actorId: number) {
  const { CourseMembership, Cohort, TaAssignment } = models();
  return sequelize().transaction(async (transaction) => {
    const cohort = await Cohort.findOne({ where: { id: data.cohortId, courseId }, transaction });
    if (!cohort) throw new HttpError(400, 'Not a cohort of this course.', { cohortId: ['Not a cohort of this course.'] });
    if (!(await CourseMembership.findOne({ where: { courseId, userId: data.taId, role: 'ta' }, transaction }))) {
      throw new HttpError(400, 'That person is not a TA of this course; add them as staff first.', { taId: ['Not a TA of this course.'] });
    }
    const ids = [...new Set(data.studentIds)];
    if (ids.length) {
      const enrolled = await CourseMembership.count({
        where: { courseId, role: 'student', cohortId: cohort.id, userId: ids },
        transaction,
      });
      if (enrolled !== ids.length)
        throw new HttpError(400, 'Every named student must be enrolled in that cohort.', { studentIds: ['Not all in this cohort.'] });
    }
    const created = [];
    for (const studentId of ids.length ? ids : [null]) {
      const where = { cohortId: cohort.id, taId: data.taId, studentId: studentId ?? { [Op.is]: null } };
      if (await TaAssignment.findOne({ where, transaction })) continue;
      const row = await TaAssignment.create({ cohortId: cohort.id, taId: data.taId, studentId }, { transaction });
      created.push(row);
    }
    await audit(
      {
        actorId,
        action: 'ta.assign',
        entityType: 'cohort',
        entityId: cohort.id,
        after: { taId: data.taId, studentIds: ids, created: created.length },
      },
      transaction,
    );
    return created;
  });
}

export async function unassignTa(courseId: number, assignmentId: number, actorId: number) {
  const { Cohort, TaAssignment } = models();
  await sequelize().transaction(async (transaction) => {
    const row = await TaAssignment.findByPk(assignmentId, { transaction });
    const cohort = row && (await Cohort.findByPk(row.cohortId, { transaction }));
    if (!row || !cohort || cohort.courseId !== courseId) throw new HttpError(404, 'No such TA assignment in this course.');
    await row.destroy({ transaction });
    await audit(
      { actorId, action: 'ta.unassign', entityType: 'ta_assignment', entityId: row.id, before: row.get({ plain: true }) },
      transaction,
    );
  });
}
