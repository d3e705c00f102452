/** GET /api/statistics/practicals/:id/export/summary[?cohortId=] — PDF summary with vector charts (every quantity and slip on page 1, histograms after). */
import { idParam, route, validate } from '@/lib/http';
import { summaryPdf } from '@/lib/statistics/pdf';
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
  const bytes = await summaryPdf(report);
  const tag = (s.cohort ? `${s.cohort.name}-${s.cohort.term}` : 'all-cohorts').replace(/[^A-Za-z0-9._-]+/g, '-');
  return new Response(Buffer.from(bytes), {
    headers: {
      'Content-Type': 'application/pdf',
      'Content-Disposition': `attachment; filename="statistics-summary-${tag}.pdf"`,
      'Cache-Control': 'no-store',
    },
  });
});
