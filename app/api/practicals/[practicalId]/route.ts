import { idParam, json, readJson, route } from '@/lib/http';
import { practicalSchema } from '@/lib/schemas/instructor';
import { authorizePractical } from '@/lib/authz/practical';
import { practicalDetail, updatePractical } from '@/lib/instructor/practicals';
import { renderInstructions } from '@/lib/instructor/markdown';

type Ctx = { params: Promise<{ practicalId: string }> };

/** The whole definition: practical, deadlines, quantities with references and bands. */
export const GET = route<Ctx>(async (request, { params }) => {
  const { practical } = await authorizePractical(request, idParam((await params).practicalId));
  return json({ ...(await practicalDetail(practical)), instructionsHtml: renderInstructions(practical.instructions) });
});

export const PUT = route<Ctx>(async (request, { params }) => {
  const { actor, practical } = await authorizePractical(request, idParam((await params).practicalId));
  const data = await readJson(request, practicalSchema);
  await updatePractical(practical, data, actor.id);
  return json(await practicalDetail(practical));
});
