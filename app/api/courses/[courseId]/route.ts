import { authorize } from '@/lib/authz';
import { idParam, json, route, HttpError } from '@/lib/http';
import { models } from '@/models';

type Ctx = { params: Promise<{ courseId: string }> };

/** A course with its cohorts, for its staff. */
export const GET = route<Ctx>(async (request, { params }) => {
  const courseId = idParam((await params).courseId);
  await authorize(request, { kind: 'course-staff', courseId });
  const { Course, Cohort } = models();
  const course = await Course.findByPk(courseId);
  if (!course) throw new HttpError(404, 'No such course.');
  const cohorts = await Cohort.findAll({ where: { courseId }, order: [['term', 'DESC'], ['name', 'ASC']] });
  return json({ course, cohorts });
});
