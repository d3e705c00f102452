import crypto from 'node:crypto';
import { encode } from 'next-auth/jwt';

/**
 * A next-auth session cookie for a user, signed with the test secret, as the browser would send it.
 * `sessionVersion` is the account's at sign-in (0 until a password is set or sessions are ended);
 * `sessionId` the session's own id (random, as sign-in makes it).
 */
export async function sessionCookie(
  userId: number,
  sessionVersion = 0,
  sessionId = crypto.randomBytes(16).toString('hex'),
): Promise<string> {
  const token = await encode({ token: { sub: String(userId), sv: sessionVersion, sid: sessionId }, secret: process.env.NEXTAUTH_SECRET! });
  return `next-auth.session-token=${token}`;
}

export const ORIGIN = 'http://localhost:3000';

/** Build a Request for a route handler, signed in as `as` (a user id) or anonymous. */
export async function apiRequest(
  pathname: string,
  options: { method?: string; as?: number | null; body?: unknown; rawBody?: BodyInit; headers?: Record<string, string> } = {},
): Promise<Request> {
  const headers: Record<string, string> = { origin: ORIGIN, ...options.headers };
  if (options.as) headers.cookie = await sessionCookie(options.as);
  let body: BodyInit | undefined = options.rawBody;
  if (options.body !== undefined) {
    body = JSON.stringify(options.body);
    headers['content-type'] ??= 'application/json';
  }
  return new Request(new URL(pathname, ORIGIN), { method: options.method ?? (body ? 'POST' : 'GET'), headers, body });
}

/** The `params` context Next passes to a dynamic route handler. */
export const params = <T extends Record<string, string>>(p: T) => ({ params: Promise.resolve(p) });
