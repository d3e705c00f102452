import { authorize } from '@/lib/authz';
import { json, route, validate } from '@/lib/http';
import { queuePage } from '@/lib/marking/queue';
import { queueQuerySchema } from '@/lib/schemas/marking';

/** GET /api/marking/queue?practicalId&cohortId&status&flag&sort&dir&page&pageSize */
export const GET = route(async (request) => {
  const actor = await authorize(request, { kind: 'signed-in' });
  const url = new URL(request.url);
  const query = validate(queueQuerySchema, Object.fromEntries(url.searchParams));
  return json(await queuePage(actor, query));
});
