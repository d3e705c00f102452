import { authorize } from '@/lib/authz';
import { HttpError, idParam, json, route } from '@/lib/http';
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
 * nothing; `?mode=import` writes all rows or none. `&cohortId=` puts every row in that open
 * cohort of the course (the file's cohort and term columns are then optional and must agree).
 */
export const POST = route<Ctx>(async (request, { params }) => {
  const courseId = idParam((await params).courseId);
  const actor = await authorize(request, { kind: 'course-manage', courseId });
  await courseOr404(courseId);
  const query = new URL(request.url).searchParams;
  const mode = query.get('mode') ?? 'preview';
  const rawCohort = query.get('cohortId');
  if (rawCohort !== null && rawCohort !== '' && !/^\d{1,12}$/.test(rawCohort)) throw new HttpError(400, 'cohortId must be a cohort id.');
  const options = { targetCohortId: rawCohort ? Number(rawCohort) : null };
  const bytes = await readRosterBody(request);
  if (mode === 'import') return json(await importRosterFile(courseId, bytes, actor.id, options));
  return json(await previewRosterFile(courseId, bytes, options));
});
