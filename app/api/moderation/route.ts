import { z } from 'zod';
import { authenticate, permit } from '@/lib/authz';
import { json, route, validate } from '@/lib/http';
import { moderationSample } from '@/lib/marking/moderation';

const query = z.object({
  courseId: z.coerce.number().int().positive().max(Number.MAX_SAFE_INTEGER),
  share: z.coerce.number().min(0.01).max(1).optional(),
});

/** GET /api/moderation?courseId=…&share=0.1: the sample of each marker's marked submissions. */
export const GET = route(async (request) => {
  const actor = await authenticate(request);
  const q = validate(query, Object.fromEntries(new URL(request.url).searchParams));
  permit(actor, { kind: 'moderate', courseId: q.courseId });
  return json({ markers: await moderationSample(q.courseId, q.share) });
});
