import { idParam, json, readJson, route } from '@/lib/http';
import { copySchema } from '@/lib/schemas/instructor';
import { authorizePractical } from '@/lib/authz/practical';
import { copyPractical } from '@/lib/instructor/practicals';

type Ctx = { params: Promise<{ practicalId: string }> };

export const POST = route<Ctx>(async (request, { params }) => {
  const { actor, practical } = await authorizePractical(request, idParam((await params).practicalId));
  const data = await readJson(request, copySchema);
  const copy = await copyPractical(practical, data, actor.id);
  return json({ practical: copy }, 201);
});
