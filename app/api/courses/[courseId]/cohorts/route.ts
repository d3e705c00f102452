import { authorize } from '@/lib/authz';
import { idParam, json, readJson, route } from '@/lib/http';
import { cohortCreateSchema } from '@/lib/schemas/instructor';
import { courseOr404, createCohort } from '@/lib/instructor/courses';

type Ctx = { params: Promise<{ courseId: string }> };

export const POST = route<Ctx>(async (request, { params }) => {
  const courseId = idParam((await params).courseId);
  const actor = await authorize(request, { kind: 'course-manage', courseId });
  await courseOr404(courseId);
  const data = await readJson(request, cohortCreateSchema);
  return json({ cohort: await createCohort(courseId, data, actor.id) }, 201);
});
