import { authorize } from '@/lib/authz';
import { idParam, json, readJson, route } from '@/lib/http';
import { applyPlatformRoster, loadContext, previewPlatformRoster } from '@/lib/lti/roster';
import { rosterConfirmSchema } from '@/lib/schemas/lti';

type Ctx = { params: Promise<{ contextId: string }> };

/** The learning platform's roster against the course: new, changed, leaving. Writes nothing. */
export const GET = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).contextId);
  await authorize(request, { kind: 'signed-in' });
  const ctx = await loadContext(id);
  await authorize(request, { kind: 'course-manage', courseId: ctx.courseId });
  return json(await previewPlatformRoster(ctx));
});

/** Confirm the preview: { fingerprint } from it. All of it or nothing. */
export const POST = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).contextId);
  const actor = await authorize(request, { kind: 'signed-in' });
  const { fingerprint } = await readJson(request, rosterConfirmSchema);
  const ctx = await loadContext(id);
  await authorize(request, { kind: 'course-manage', courseId: ctx.courseId });
  return json(await applyPlatformRoster(ctx, fingerprint, actor.id));
});
