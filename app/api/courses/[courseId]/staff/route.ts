import { authorize } from '@/lib/authz';
import { idParam, json, readJson, route } from '@/lib/http';
import { staffAddSchema } from '@/lib/schemas/instructor';
import { addStaff, courseOr404 } from '@/lib/instructor/courses';

type Ctx = { params: Promise<{ courseId: string }> };

export const POST = route<Ctx>(async (request, { params }) => {
  const courseId = idParam((await params).courseId);
  const actor = await authorize(request, { kind: 'course-manage', courseId });
  await courseOr404(courseId);
  const data = await readJson(request, staffAddSchema);
  const { user, created, invited } = await addStaff(courseId, data, actor.id);
  return json({ userId: user.id, created, invited }, created ? 201 : 200);
});
