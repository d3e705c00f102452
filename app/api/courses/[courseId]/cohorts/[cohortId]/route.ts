import { idParam, json, readJson, route, HttpError } from '@/lib/http';
import { models } from '@/models';
import { cohortUpdateSchema } from '@/lib/schemas/instructor';
import { updateCohort } from '@/lib/instructor/courses';
import { authorizeManageOf } from '@/lib/authz/practical';

type Ctx = { params: Promise<{ courseId: string; cohortId: string }> };

/** Rename, change term or instrument, archive. The course comes from the cohort's own row. */
export const PATCH = route<Ctx>(async (request, { params }) => {
  const p = await params;
  const { actor, row: cohort } = await authorizeManageOf(
    request,
    async () => {
      const c = await models().Cohort.findByPk(idParam(p.cohortId));
      if (!c || c.courseId !== idParam(p.courseId)) throw new HttpError(404, 'No such cohort in this course.');
      return c;
    },
    (c) => c.courseId,
  );
  const data = await readJson(request, cohortUpdateSchema);
  return json({ cohort: await updateCohort(cohort.id, cohort.courseId, data, actor.id) });
});
