import { authorize, permit } from '@/lib/authz';
import { json, readJson, route, HttpError } from '@/lib/http';
import { models } from '@/models';
import { sequelize } from '@/lib/db';
import { audit } from '@/lib/audit';
import { courseCreateSchema } from '@/lib/schemas/instructor';
import { managedCourses } from '@/lib/instructor/courses';

/** The courses the caller sets up, with cohorts and practicals. */
export const GET = route(async (request) => {
  const actor = await authorize(request);
  return json({ courses: await managedCourses(actor) });
});

/** An instructor or course lead (of any course) starts a new course and becomes its instructor. */
export const POST = route(async (request) => {
  const actor = await authorize(request);
  permit(actor, { kind: 'course-manager' }, 'Only instructors and course leads create courses.');
  const data = await readJson(request, courseCreateSchema);
  const { Course, CourseMembership } = models();
  const course = await sequelize().transaction(async (transaction) => {
    if (await Course.findOne({ where: { code: data.code }, transaction }))
      throw new HttpError(409, `A course ${data.code} exists already.`, { code: ['Already taken.'] });
    const c = await Course.create({ code: data.code, title: data.title, archivedAt: null }, { transaction });
    await CourseMembership.create({ userId: actor.id, courseId: c.id, role: 'instructor', cohortId: null }, { transaction });
    await audit({ actorId: actor.id, action: 'course.create', entityType: 'course', entityId: c.id, after: data }, transaction);
    return c;
  });
  return json({ course }, 201);
});
