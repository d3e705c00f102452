import { authorize } from '@/lib/authz';
import { idParam, json, route } from '@/lib/http';
import { courseOr404, coursePeople } from '@/lib/instructor/courses';
import { importRosterFile, previewRosterFile, readRosterBody } from '@/lib/instructor/roster';

type Ctx = { params: Promise<{ courseId: string }> };

/** Everyone in the course: students with cohorts, staff with roles, TA duties. */
export const GET = route<Ctx>(async (request, { params }) => {
  const courseId = idParam((await params).courseId);
  await authorize(request, { kind: 'course-manage', courseId });
  await courseOr404(courseId);
  return json(await coursePeople(courseId));
});

/**
 * The CSV file itself is the body. `?mode=preview` (the default) classifies each row and writes
 * nothing; `?mode=import` writes all rows or none.
 */
export const POST = route<Ctx>(async (request, { params }) => {
  const courseId = idParam((await params).courseId);
  const actor = await authorize(request, { kind: 'course-manage', courseId });
  await courseOr404(courseId);
  const mode = new URL(request.url).searchParams.get('mode') ?? 'preview';
  const bytes = await readRosterBody(request);
  if (mode === 'import') return json(await importRosterFile(courseId, bytes, actor.id));
  return json(await previewRosterFile(courseId, bytes));
});
