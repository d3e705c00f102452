import { endSessionOfRequest, signedOutRedirect } from '@/lib/auth/sign-out';
import { route } from '@/lib/http';

/**
 * "Sign out" in the header: a plain form POST (same-origin only, as every write). Ends this session
 * on the server, removes the cookie and goes to the sign-in page. Signed out already (an expired
 * or ended session), it still clears the cookie and goes there: nothing is looked up or changed.
 */
export const POST = route(async (request) => {
  await endSessionOfRequest(request);
  return signedOutRedirect();
});
