/**
 * A launch signs the person in with the same session Oscillab's own sign-in issues: a next-auth
 * JWT cookie built by the same jwt callback (so it carries the account's sessionVersion and ends
 * with it), with next-auth's own cookie name and flags (SameSite=Lax, HttpOnly, Secure under https).
 */
import { encode } from 'next-auth/jwt';
import type { JWT } from 'next-auth/jwt';
import { authOptions } from '@/lib/auth/options';
import { sessionSecret } from '@/lib/auth/secret';

type Account = { id: number; email: string; name: string; sessionVersion: number };

function cookieSettings() {
  const secure = authOptions.useSecureCookies ?? (process.env.NEXTAUTH_URL ?? '').startsWith('https://');
  const fallback = {
    name: `${secure ? '__Secure-' : ''}next-auth.session-token`,
    options: { httpOnly: true, sameSite: 'lax', path: '/', secure },
  };
  const custom = authOptions.cookies?.sessionToken;
  return { name: custom?.name ?? fallback.name, options: { ...fallback.options, ...(custom?.options ?? {}) } as typeof fallback.options };
}

/** The Set-Cookie value that signs `user` in, exactly as the credentials sign-in would. */
export async function sessionCookieFor(user: Account): Promise<string> {
  const maxAge = authOptions.session?.maxAge ?? 30 * 24 * 3600;
  let token: JWT = { name: user.name, email: user.email, sub: String(user.id) };
  const jwt = authOptions.callbacks?.jwt;
  if (jwt) {
    token = await jwt({
      token,
      user: { id: String(user.id), email: user.email, name: user.name, sessionVersion: user.sessionVersion } as never,
      account: null,
      trigger: 'signIn',
    } as never);
  }
  const value = await (authOptions.jwt?.encode ?? encode)({ token, secret: sessionSecret(), maxAge });
  const { name, options } = cookieSettings();
  const parts = [
    `${name}=${value}`,
    `Path=${options.path}`,
    `Max-Age=${maxAge}`,
    `Expires=${new Date(Date.now() + maxAge * 1000).toUTCString()}`,
    `SameSite=${options.sameSite === 'lax' ? 'Lax' : String(options.sameSite)}`,
  ];
  if (options.httpOnly) parts.push('HttpOnly');
  if (options.secure) parts.push('Secure');
  return parts.join('; ');
}
