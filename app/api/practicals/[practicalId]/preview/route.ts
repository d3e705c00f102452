import { idParam, json, readJson, route } from '@/lib/http';
import { previewSchema } from '@/lib/schemas/instructor';
import { authorizePractical } from '@/lib/authz/practical';
import { previewVerdict } from '@/lib/instructor/practicals';

type Ctx = { params: Promise<{ practicalId: string }> };

/** The verdict and marks a typed value would get for a cohort, with the bands that apply. Writes nothing. */
export const POST = route<Ctx>(async (request, { params }) => {
  const { practical } = await authorizePractical(request, idParam((await params).practicalId));
  const data = await readJson(request, previewSchema);
  return json(await previewVerdict(practical, data));
});
