import { json, readJson, route } from '@/lib/http';
import { welcomeSchema } from '@/lib/schemas/instructor';
import { acceptInvitation } from '@/lib/instructor/invitations';

/** Public: the invitation link's token sets the account's password, once. */
export const POST = route(async (request) => {
  const { token, password } = await readJson(request, welcomeSchema);
  return json(await acceptInvitation(token, password));
});
