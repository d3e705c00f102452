/** GET /api/statistics/practicals/:id/export/statistics[?cohortId=] — per-quantity statistics as CSV. */
import { idParam, route } from '@/lib/http';
import { csvResponse, statisticsCsv } from '@/lib/statistics/csv';
import { practicalReport, thresholdFrom } from '@/lib/statistics/report';
import { statisticsScope } from '@/lib/statistics/scope';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (request, { params }) => {
  const { id } = await params;
  const s = await statisticsScope(request, idParam(id));
  const report = await practicalReport(s, thresholdFrom(request));
  const tag = s.cohort ? `${s.cohort.name}-${s.cohort.term}` : 'all-cohorts';
  return csvResponse(statisticsCsv(report), `statistics-${s.practical.title}-${tag}.csv`);
});
