import { audit } from '@/lib/audit';
import { authorize } from '@/lib/authz';
import { endAllSessions } from '@/lib/auth/session';
import { isFormPost, signedOutRedirect } from '@/lib/auth/sign-out';
import { HttpError, json, route } from '@/lib/http';

/**
 * "Sign out everywhere": ends every session of the caller's account, this one included, on every
 * device and app instance (the account's session version goes up; tokens carrying the old one stop
 * working). The account menu posts a plain form: that gets the cookie removed and a 303 to the
 * sign-in page (also when the session had already ended); other callers get JSON.
 */
export const POST = route(async (request) => {
  const form = isFormPost(request);
  let actor;
  try {
    actor = await authorize(request, { kind: 'signed-in' });
  } catch (error) {
    if (form && error instanceof HttpError && error.status === 401) return signedOutRedirect();
    throw error;
  }
  await endAllSessions(actor.id);
  await audit({ actorId: actor.id, action: 'session.end-all', entityType: 'user', entityId: actor.id });
  return form ? signedOutRedirect() : json({ ok: true });
});
