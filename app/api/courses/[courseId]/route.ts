import { authorize } from '@/lib/authz';
import { idParam, json, readJson, route, HttpError } from '@/lib/http';
import { models } from '@/models';
import { sequelize } from '@/lib/db';
import { audit } from '@/lib/audit';
import { courseUpdateSchema } from '@/lib/schemas/instructor';

type Ctx = { params: Promise<{ courseId: string }> };

/** A course with its cohorts, for its staff. */
export const GET = route<Ctx>(async (request, { params }) => {
  const courseId = idParam((await params).courseId);
  await authorize(request, { kind: 'course-staff', courseId });
  const { Course, Cohort } = models();
  const course = await Course.findByPk(courseId);
  if (!course) throw new HttpError(404, 'No such course.');
  const cohorts = await Cohort.findAll({
    where: { courseId },
    order: [
      ['term', 'DESC'],
      ['name', 'ASC'],
    ],
  });
  return json({ course, cohorts });
});

/** Rename or archive (and un-archive) a course. */
export const PATCH = route<Ctx>(async (request, { params }) => {
  const courseId = idParam((await params).courseId);
  const actor = await authorize(request, { kind: 'course-manage', courseId });
  const data = await readJson(request, courseUpdateSchema);
  const course = await sequelize().transaction(async (transaction) => {
    const c = await models().Course.findByPk(courseId, { transaction });
    if (!c) throw new HttpError(404, 'No such course.');
    const before = { ...c.get({ plain: true }) };
    await c.update(
      {
        ...(data.title ? { title: data.title } : {}),
        ...(data.archived !== undefined ? { archivedAt: data.archived ? (c.archivedAt ?? new Date()) : null } : {}),
      },
      { transaction },
    );
    await audit(
      { actorId: actor.id, action: 'course.update', entityType: 'course', entityId: c.id, before, after: c.get({ plain: true }) },
      transaction,
    );
    return c;
  });
  return json({ course });
});
