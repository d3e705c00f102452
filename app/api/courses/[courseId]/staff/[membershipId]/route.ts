import { authorize } from '@/lib/authz';
import { idParam, json, route } from '@/lib/http';
import { removeMembership } from '@/lib/instructor/courses';

type Ctx = { params: Promise<{ courseId: string; membershipId: string }> };

export const DELETE = route<Ctx>(async (request, { params }) => {
  const p = await params;
  const courseId = idParam(p.courseId);
  const actor = await authorize(request, { kind: 'course-manage', courseId });
  await removeMembership(courseId, idParam(p.membershipId), actor.id);
  return json({ ok: true });
});
