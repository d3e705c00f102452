/**
 * Signing out with a plain form POST (the header's "Sign out" and "Sign out everywhere" buttons),
 * so pages need no next-auth client script for it. What next-auth's own sign-out does, done here:
 * the session the cookie carries is recorded as ended (so a copy of the cookie stops working), the
 * cookie is removed, and the browser goes to the sign-in page.
 */
import { decode } from 'next-auth/jwt';
import { sessionSecret } from './secret';
import { endSession, SESSION_COOKIES, sessionTokenFromCookieHeader } from './session';

/** Ends the session the request's cookie carries, if it carries a valid one; otherwise does nothing. */
export async function endSessionOfRequest(request: Request): Promise<void> {
  const token = sessionTokenFromCookieHeader(request.headers.get('cookie'));
  if (!token) return;
  let payload: Awaited<ReturnType<typeof decode>> = null;
  try {
    payload = await decode({ token, secret: sessionSecret() });
  } catch {
    return;
  }
  await endSession(payload?.sid, payload?.sub);
}

/** A form post from a page (as opposed to a fetch with a JSON body). */
export function isFormPost(request: Request): boolean {
  const type = request.headers.get('content-type') ?? '';
  return type.startsWith('application/x-www-form-urlencoded') || type.startsWith('multipart/form-data');
}

/**
 * 303 to the sign-in page, removing the session cookie under both of next-auth's names (the
 * `__Secure-` one is used when NEXTAUTH_URL is https; a browser ignores its removal over http).
 */
export function signedOutRedirect(): Response {
  const headers = new Headers({ Location: '/signin', 'Cache-Control': 'no-store' });
  for (const name of SESSION_COOKIES) {
    headers.append(
      'Set-Cookie',
      `${name}=; Path=/; Max-Age=0; Expires=Thu, 01 Jan 1970 00:00:00 GMT; HttpOnly; SameSite=Lax${name.startsWith('__Secure-') ? '; Secure' : ''}`,
    );
  }
  return new Response(null, { status: 303, headers });
}
