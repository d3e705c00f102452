import { authorize } from '@/lib/authz';
import { json, readJson, route } from '@/lib/http';
import { connectContext } from '@/lib/lti/admin';
import { contextCreateSchema } from '@/lib/schemas/lti';

/** Connect a learning-platform course (its context id) to an Oscillab course (site administrators). */
export const POST = route(async (request) => {
  const actor = await authorize(request, { kind: 'admin' });
  const data = await readJson(request, contextCreateSchema);
  const row = await connectContext(data, actor.id);
  return json({ id: row.id }, 201);
});
