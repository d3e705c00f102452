import { z } from 'zod';
import { authorize, hasRole } from '@/lib/authz';
import { json, readJson, route, HttpError } from '@/lib/http';
import { renderInstructions } from '@/lib/instructor/markdown';
import { multiLine } from '@/lib/schemas/text';

/** Live preview of instructions for the practical editor (staff who set practicals up only). */
export const POST = route(async (request) => {
  const actor = await authorize(request);
  if (!actor.isAdmin && !hasRole(actor, 'instructor') && !hasRole(actor, 'lead')) throw new HttpError(403, 'You do not have permission for this.');
  const { markdown } = await readJson(request, z.object({ markdown: multiLine(z.string().max(50_000)) }));
  return json({ html: renderInstructions(markdown) });
});
