/** GET /api/statistics/practicals/:id/compare?by=cohort|instrument — cohorts and years side by side. */
import { idParam, json, route, validate } from '@/lib/http';
import { authenticate } from '@/lib/authz';
import { authorizeComparison } from '@/lib/authz/statistics';
import { comparison } from '@/lib/statistics/compare';
import { compareQuery, queryParams } from '@/lib/schemas/statistics';

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (request, { params }) => {
  const { id } = await params;
  const practicalId = idParam(id);
  const { by } = validate(compareQuery, queryParams(request, 'by'));
  const actor = await authenticate(request);
  return json(await comparison(await authorizeComparison(actor, practicalId), by));
});
