/**
 * GET /api/statistics/practicals/:id[?cohortId=&threshold=] — counts, per-quantity deviation
 * distributions (consistency and accuracy apart), frequent slips and marker consistency for one
 * practical, read from the kept statistics (lib/statistics/keep.ts). Definitions: lib/statistics/definitions.ts.
 */
import { idParam, json, route } from '@/lib/http';
import { practicalReport, thresholdFrom } from '@/lib/statistics/report';
import { statisticsScope } from '@/lib/statistics/scope';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (request, { params }) => {
  const { id } = await params;
  const s = await statisticsScope(request, idParam(id));
  const threshold = thresholdFrom(request);
  return json(await practicalReport(s, threshold));
});
