/**
 * GET /api/statistics/practicals/:id/export/marks[?cohortId=] — marks CSV for student records,
 * one row per student on the roster. Header documented in lib/statistics/definitions.ts.
 * Course leads and instructors only (TAs mark, but the records export is the course's business).
 */
import { HttpError, idParam, route } from '@/lib/http';
import { csvResponse, marksCsv } from '@/lib/statistics/csv';
import { statisticsScope } from '@/lib/statistics/scope';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (request, { params }) => {
  const { id } = await params;
  const s = await statisticsScope(request, idParam(id));
  if (!s.manages) throw new HttpError(403, 'Only course leads and instructors export marks.');
  const { csv } = await marksCsv(s);
  const tag = s.cohort ? `${s.cohort.name}-${s.cohort.term}` : 'all-cohorts';
  return csvResponse(csv, `marks-${s.practical.title}-${tag}.csv`);
});
