/** GET /api/statistics/practicals/:id/compare?by=cohort|instrument — cohorts and years side by side. */
import { z } from 'zod';
import { idParam, json, route, validate } from '@/lib/http';
import { comparison } from '@/lib/statistics/compare';

type Ctx = { params: Promise<{ id: string }> };
const query = z.object({ by: z.enum(['cohort', 'instrument']).default('cohort') });

export const GET = route<Ctx>(async (request, { params }) => {
  const { id } = await params;
  const practicalId = idParam(id);
  const { by } = validate(query, { by: new URL(request.url).searchParams.get('by') ?? undefined });
  return json(await comparison(request, practicalId, by));
});
