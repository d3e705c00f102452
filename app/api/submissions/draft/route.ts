import { authorize, permit } from '@/lib/authz';
import { HttpError, json, readJson, route } from '@/lib/http';
import { saveDraftSchema } from '@/lib/schemas/submission';
import { studentPlacement } from '@/lib/submissions/access';
import { saveDraft } from '@/lib/submissions/service';
import { models } from '@/models';

/** Autosave of the student's draft for a practical (created on first save). */
export const PUT = route(async (request) => {
  const actor = await authorize(request, { kind: 'signed-in' });
  const body = await readJson(request, saveDraftSchema);
  // Only the columns the save needs (not the instructions and reference texts).
  const practical = await models().Practical.findByPk(body.practicalId, { attributes: ['id', 'courseId', 'species'] });
  if (!practical) throw new HttpError(404, 'No such practical.');
  const pc = await studentPlacement(actor, practical);
  if (!pc) throw new HttpError(403, 'This practical is not set for your cohort.');
  permit(actor, { kind: 'submission-write', courseId: practical.courseId, cohortId: pc.cohortId, studentId: actor.id });
  const row = await saveDraft(actor, practical, pc, body.draft);
  return json({ id: row.id, version: row.version, savedAt: new Date(row.updatedAt).toISOString() });
});
