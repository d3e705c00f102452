import { authorize, permit } from '@/lib/authz';
import { HttpError, json, readJson, route } from '@/lib/http';
import { saveDraftSchema } from '@/lib/schemas/submission';
import { autosaveTarget } from '@/lib/authz/placement';
import { saveDraft } from '@/lib/submissions/service';

/** Autosave of the student's draft for a practical (created on first save). */
export const PUT = route(async (request) => {
  const actor = await authorize(request, { kind: 'signed-in' });
  const body = await readJson(request, saveDraftSchema);
  const target = await autosaveTarget(actor, body.practicalId);
  if (!target) throw new HttpError(404, 'No such practical.');
  const { practical, cohortId } = target;
  if (cohortId === null) throw new HttpError(403, 'This practical is not set for your cohort.');
  permit(actor, { kind: 'submission-write', courseId: practical.courseId, cohortId, studentId: actor.id });
  const row = await saveDraft(actor, practical, cohortId, body.draft);
  return json({ id: row.id, version: row.version, savedAt: new Date(row.updatedAt).toISOString() });
});
