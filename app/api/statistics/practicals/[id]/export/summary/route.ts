/** GET /api/statistics/practicals/:id/export/summary[?cohortId=] — PDF summary with vector charts (every quantity and slip on page 1, histograms after). */
import { idParam, route } from '@/lib/http';
import { summaryPdf } from '@/lib/statistics/pdf';
import { practicalReport, thresholdFrom } from '@/lib/statistics/report';
import { statisticsScope } from '@/lib/statistics/scope';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (request, { params }) => {
  const { id } = await params;
  const s = await statisticsScope(request, idParam(id));
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
