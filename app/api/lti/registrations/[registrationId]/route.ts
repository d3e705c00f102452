import { authorize } from '@/lib/authz';
import { idParam, json, readJson, route } from '@/lib/http';
import { deleteRegistration, updateRegistration } from '@/lib/lti/admin';
import { registrationUpdateSchema } from '@/lib/schemas/lti';

type Ctx = { params: Promise<{ registrationId: string }> };

export const PATCH = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).registrationId);
  const actor = await authorize(request, { kind: 'admin' });
  const data = await readJson(request, registrationUpdateSchema);
  await updateRegistration(id, data, actor.id);
  return json({ ok: true });
});

/** Removes the registration with its course connections and queued scores; accounts and their work stay. */
export const DELETE = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).registrationId);
  const actor = await authorize(request, { kind: 'admin' });
  await deleteRegistration(id, actor.id);
  return json({ ok: true });
});
