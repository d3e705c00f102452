import { authorize } from '@/lib/authz';
import { idParam, json, readJson, route } from '@/lib/http';
import { practicalSchema } from '@/lib/schemas/instructor';
import { courseOr404 } from '@/lib/instructor/courses';
import { createPractical } from '@/lib/instructor/practicals';

type Ctx = { params: Promise<{ courseId: string }> };

export const POST = route<Ctx>(async (request, { params }) => {
  const courseId = idParam((await params).courseId);
  const actor = await authorize(request, { kind: 'course-manage', courseId });
  await courseOr404(courseId);
  const data = await readJson(request, practicalSchema);
  const practical = await createPractical(courseId, data, actor.id);
  return json({ practical }, 201);
});
