import { idParam, json, readJson, route } from '@/lib/http';
import { quantitySchema } from '@/lib/schemas/instructor';
import { authorizePractical } from '@/lib/authz/practical';
import { deleteQuantity, quantityOf, updateQuantity } from '@/lib/instructor/practicals';

type Ctx = { params: Promise<{ practicalId: string; quantityId: string }> };

export const PUT = route<Ctx>(async (request, { params }) => {
  const p = await params;
  const { actor, practical } = await authorizePractical(request, idParam(p.practicalId));
  const quantity = await quantityOf(practical, idParam(p.quantityId));
  const data = await readJson(request, quantitySchema);
  return json({ quantity: await updateQuantity(practical, quantity, data, actor.id) });
});

export const DELETE = route<Ctx>(async (request, { params }) => {
  const p = await params;
  const { actor, practical } = await authorizePractical(request, idParam(p.practicalId));
  await deleteQuantity(await quantityOf(practical, idParam(p.quantityId)), actor.id);
  return json({ ok: true });
});
