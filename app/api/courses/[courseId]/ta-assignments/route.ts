import { authorize } from '@/lib/authz';
import { idParam, json, readJson, route } from '@/lib/http';
import { taAssignmentSchema } from '@/lib/schemas/instructor';
import { assignTa, courseOr404 } from '@/lib/instructor/courses';

type Ctx = { params: Promise<{ courseId: string }> };

export const POST = route<Ctx>(async (request, { params }) => {
  const courseId = idParam((await params).courseId);
  const actor = await authorize(request, { kind: 'course-manage', courseId });
  await courseOr404(courseId);
  const data = await readJson(request, taAssignmentSchema);
  const created = await assignTa(courseId, data, actor.id);
  return json({ created: created.length }, 201);
});
