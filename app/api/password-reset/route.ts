import { json, readJson, route } from '@/lib/http';
import { resetRequestSchema } from '@/lib/schemas/auth';
import { clientOf, requestPasswordReset } from '@/lib/auth/reset';

/**
 * Public: ask for a password-reset link. The answer is the same for every well-formed address,
 * whether or not it has an account; only a malformed body (4xx) or too many requests (429) differ.
 */
export const POST = route(async (request) => {
  const { email } = await readJson(request, resetRequestSchema);
  return json(await requestPasswordReset(email, clientOf(request)));
});
