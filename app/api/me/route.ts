import { authorize } from '@/lib/authz';
import { json, route } from '@/lib/http';
import { homesFor } from '@/lib/homes';

/** Who am I, and which homes can I open. */
export const GET = route(async (request) => {
  const actor = await authorize(request);
  return json({
    id: actor.id,
    email: actor.email,
    name: actor.name,
    isAdmin: actor.isAdmin,
    memberships: actor.memberships,
    homes: homesFor(actor),
  });
});
