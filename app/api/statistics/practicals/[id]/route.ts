/**
 * GET /api/statistics/practicals/:id[?cohortId=&threshold=] — counts, per-quantity deviation
 * distributions (consistency and accuracy apart), frequent slips and marker consistency for one
 * practical, read from the kept statistics (lib/statistics/keep.ts). Definitions: lib/statistics/definitions.ts.
 */
import { idParam, json, route, validate } from '@/lib/http';
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
  const threshold = thresholdFrom(request);
  return json(await practicalReport(s, threshold));
});
