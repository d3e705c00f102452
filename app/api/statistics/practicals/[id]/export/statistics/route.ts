/** GET /api/statistics/practicals/:id/export/statistics[?cohortId=] — per-quantity statistics as CSV. */
import { idParam, route, validate } from '@/lib/http';
import { csvResponse, statisticsCsv } from '@/lib/statistics/csv';
import { practicalReport, thresholdFrom } from '@/lib/statistics/report';
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
  const report = await practicalReport(s, thresholdFrom(request));
  const tag = s.cohort ? `${s.cohort.name}-${s.cohort.term}` : 'all-cohorts';
  return csvResponse(statisticsCsv(report), `statistics-${s.practical.title}-${tag}.csv`);
});
