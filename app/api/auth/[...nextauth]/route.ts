import NextAuth from 'next-auth';
import { authOptions } from '@/lib/auth/options';
import { signInSchema } from '@/lib/schemas/auth';
import { HttpError, inRequest, validate } from '@/lib/http';

const nextAuth = NextAuth(authOptions);

type Context = { params: Promise<{ nextauth: string[] }> };

export function GET(request: Request, context: Context) {
  return inRequest(request, () => nextAuth(request, context));
}

/**
 * next-auth answers a malformed sign-in with a redirect; we first check the body ourselves so a
 * bad request gets a plain 4xx with a reason, and nothing is counted or written.
 */
export function POST(request: Request, context: Context) {
  return inRequest(request, async () => {
    const { nextauth } = await context.params;
    if (nextauth.join('/') === 'callback/credentials') {
      const type = request.headers.get('content-type') ?? '';
      if (!type.includes('application/x-www-form-urlencoded')) throw new HttpError(415, 'Send the sign-in form as form data.');
      const length = Number(request.headers.get('content-length') ?? 0);
      if (length > 10_000) throw new HttpError(413, 'The sign-in request is too large.');
      const text = await request.clone().text();
      if (text.length > 10_000) throw new HttpError(413, 'The sign-in request is too large.');
      const form = new URLSearchParams(text);
      validate(signInSchema, { email: form.get('email') ?? undefined, password: form.get('password') ?? undefined });
    }
    return nextAuth(request, context);
  });
}
