import { audit } from '@/lib/audit';
import { authorize } from '@/lib/authz';
import { endAllSessions } from '@/lib/auth/session';
import { json, route } from '@/lib/http';

/**
 * "Sign out everywhere": ends every session of the caller's account, this one included, on every
 * device and app instance (the account's session version goes up; tokens carrying the old one stop
 * working). The browser then clears its own cookie through the ordinary sign-out.
 */
export const POST = route(async (request) => {
  const actor = await authorize(request, { kind: 'signed-in' });
  await endAllSessions(actor.id);
  await audit({ actorId: actor.id, action: 'session.end-all', entityType: 'user', entityId: actor.id });
  return json({ ok: true });
});
