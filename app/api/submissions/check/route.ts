import { authorize, permit } from '@/lib/authz';
import { HttpError, json, readJson, route } from '@/lib/http';
import { saveDraftSchema } from '@/lib/schemas/submission';
import { autosaveTarget } from '@/lib/authz/placement';
import { precheckDraft } from '@/lib/submissions/precheck';
import { models } from '@/models';

/**
 * Check the student's draft as it would be submitted, without submitting it: format and unit
 * checks, in practice mode the verdicts, and what Submit would hand in. Writes nothing.
 */
export const POST = route(async (request) => {
  const actor = await authorize(request, { kind: 'signed-in' });
  const body = await readJson(request, saveDraftSchema);
  const target = await autosaveTarget(actor, body.practicalId);
  if (!target) throw new HttpError(404, 'No such practical.');
  if (target.cohortId === null) throw new HttpError(403, 'This practical is not set for your cohort.');
  permit(actor, { kind: 'submission-write', courseId: target.practical.courseId, cohortId: target.cohortId, studentId: actor.id });
  const practical = await models().Practical.findByPk(body.practicalId);
  if (!practical || practical.archivedAt) throw new HttpError(404, 'No such practical.');
  return json(await precheckDraft(actor, practical, target.cohortId, body.draft));
});
