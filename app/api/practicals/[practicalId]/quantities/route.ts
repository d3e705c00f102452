import { idParam, json, readJson, route } from '@/lib/http';
import { quantitySchema } from '@/lib/schemas/instructor';
import { authorizePractical } from '@/lib/authz/practical';
import { addQuantity } from '@/lib/instructor/practicals';

type Ctx = { params: Promise<{ practicalId: string }> };

export const POST = route<Ctx>(async (request, { params }) => {
  const { actor, practical } = await authorizePractical(request, idParam((await params).practicalId));
  const data = await readJson(request, quantitySchema);
  return json({ quantity: await addQuantity(practical, data, actor.id) }, 201);
});
