import { authorize } from '@/lib/authz';
import { json, readJson, route } from '@/lib/http';
import { createRegistration, listRegistrations } from '@/lib/lti/admin';
import { registrationSchema } from '@/lib/schemas/lti';

/** Learning platforms Oscillab is registered with (site administrators). */
export const GET = route(async (request) => {
  await authorize(request, { kind: 'admin' });
  return json({ registrations: await listRegistrations() });
});

export const POST = route(async (request) => {
  const actor = await authorize(request, { kind: 'admin' });
  const data = await readJson(request, registrationSchema);
  const row = await createRegistration(data, actor.id);
  return json({ id: row.id }, 201);
});
