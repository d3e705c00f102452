import { z } from 'zod';
import { authorize } from '@/lib/authz';
import { json, readJson, route } from '@/lib/http';
import { renderInstructions } from '@/lib/instructor/markdown';
import { multiLine } from '@/lib/schemas/text';

/** Live preview of instructions for the practical editor (staff who set practicals up only). */
export const POST = route(async (request) => {
  await authorize(request, { kind: 'course-manager' });
  const { markdown } = await readJson(request, z.object({ markdown: multiLine(z.string().max(50_000)) }));
  return json({ html: renderInstructions(markdown) });
});
