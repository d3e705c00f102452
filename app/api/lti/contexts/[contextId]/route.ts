import { authorize } from '@/lib/authz';
import { idParam, json, readJson, route } from '@/lib/http';
import { contextOr404, disconnectContext, setDefaultCohort } from '@/lib/lti/admin';
import { contextUpdateSchema } from '@/lib/schemas/lti';

type Ctx = { params: Promise<{ contextId: string }> };

/** The cohort students from the learning platform join: the course's managers choose it. */
export const PATCH = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).contextId);
  const actor = await authorize(request, { kind: 'signed-in' });
  const data = await readJson(request, contextUpdateSchema);
  const ctx = await contextOr404(id);
  await authorize(request, { kind: 'course-manage', courseId: ctx.courseId });
  await setDefaultCohort(id, data.defaultCohortId, actor.id);
  return json({ ok: true });
});

/** Disconnect (site administrators). People, roles and work in Oscillab stay. */
export const DELETE = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).contextId);
  const actor = await authorize(request, { kind: 'admin' });
  await disconnectContext(id, actor.id);
  return json({ ok: true });
});
