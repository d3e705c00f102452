/**
 * GET /api/statistics/practicals/:id/export/marks[?cohortId=] — marks CSV for student records,
 * one row per student on the roster. Header documented in lib/statistics/definitions.ts.
 * Course leads and instructors only (TAs mark, but the records export is the course's business).
 */
import { HttpError, idParam, route, validate } from '@/lib/http';
import { csvResponse, marksCsv } from '@/lib/statistics/csv';
import { authenticate } from '@/lib/authz';
import { authorizeStatistics } from '@/lib/authz/statistics';
import { cohortQuery, queryParams } from '@/lib/schemas/statistics';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (request, { params }) => {
  const { id } = await params;
  const practicalId = idParam(id);
  const actor = await authenticate(request);
  const { cohortId } = validate(cohortQuery, queryParams(request, 'cohortId'));
  const s = await authorizeStatistics(actor, practicalId, cohortId);
  if (!s.manages) throw new HttpError(403, 'Only course leads and instructors export marks.');
  const { csv } = await marksCsv(s);
  const tag = s.cohort ? `${s.cohort.name}-${s.cohort.term}` : 'all-cohorts';
  return csvResponse(csv, `marks-${s.practical.title}-${tag}.csv`);
});
