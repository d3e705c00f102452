import { z } from 'zod';
import { authorize } from '@/lib/authz';
import { json, route, validate } from '@/lib/http';
import { moderationSample } from '@/lib/marking/moderation';

const query = z.object({ courseId: z.coerce.number().int().positive().max(Number.MAX_SAFE_INTEGER), share: z.coerce.number().min(0.01).max(1).optional() });

/** GET /api/moderation?courseId=…&share=0.1: the sample of each marker's marked submissions. */
export const GET = route(async (request) => {
  const q = validate(query, Object.fromEntries(new URL(request.url).searchParams));
  await authorize(request, { kind: 'moderate', courseId: q.courseId });
  return json({ markers: await moderationSample(q.courseId, q.share) });
});
