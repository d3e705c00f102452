import { idParam, json, readJson, route } from '@/lib/http';
import { bandDeleteSchema, bandSchema } from '@/lib/schemas/instructor';
import { authorizePractical } from '@/lib/authz/practical';
import { deleteBand, NeedsRecheckDecision, saveBand } from '@/lib/instructor/practicals';

type Ctx = { params: Promise<{ practicalId: string }> };

const asConflict = (error: unknown) => {
  if (error instanceof NeedsRecheckDecision)
    return json({ error: error.message, needsRecheckDecision: true, submissions: error.submissions }, 409);
  throw error;
};

/**
 * Add or change a band (course default: cohortId null; override: a cohort of this course).
 * With submissions already checked, answers 409 with their count unless `recheck` is given.
 */
export const PUT = route<Ctx>(async (request, { params }) => {
  const { actor, practical } = await authorizePractical(request, idParam((await params).practicalId));
  const data = await readJson(request, bandSchema);
  try {
    return json(await saveBand(practical, data, actor.id));
  } catch (error) {
    return asConflict(error);
  }
});

export const DELETE = route<Ctx>(async (request, { params }) => {
  const { actor, practical } = await authorizePractical(request, idParam((await params).practicalId));
  const data = await readJson(request, bandDeleteSchema);
  try {
    return json(await deleteBand(practical, data.bandId, data.recheck, actor.id));
  } catch (error) {
    return asConflict(error);
  }
});
