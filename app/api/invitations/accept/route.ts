import { json, readJson, route } from '@/lib/http';
import { welcomeSchema } from '@/lib/schemas/instructor';
import { acceptInvitation } from '@/lib/instructor/invitations';
import { invalidateResetTokens, isResetToken, resetPassword } from '@/lib/auth/reset';
import { models } from '@/models';

/**
 * Public: a one-time link's token sets the account's password, once. The same form serves
 * invitation links (/welcome/…) and password-reset links (/reset/…); the token says which.
 */
export const POST = route(async (request) => {
  const { token, password } = await readJson(request, welcomeSchema);
  if (await isResetToken(token)) return json(await resetPassword(token, password));
  const result = await acceptInvitation(token, password);
  // The password changed, so any reset link still in a mailbox must stop working.
  const user = await models().User.findOne({ where: { email: result.email } });
  if (user) await invalidateResetTokens(user.id);
  return json(result);
});
