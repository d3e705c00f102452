import { json, readJson, route, idParam } from '@/lib/http';
import { authorizeSubmission } from '@/lib/authz/submission';
import { loadMarkingView } from '@/lib/marking/view';
import { saveMarks } from '@/lib/marking/marks';
import { saveMarksSchema } from '@/lib/schemas/marking';

type Ctx = { params: Promise<{ submissionId: string }> };

export const GET = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).submissionId);
  await authorizeSubmission(request, id, 'submission-mark');
  return json(await loadMarkingView(id));
});

/** Save marks: { version, items: [{ itemKey, awarded, comment }], markerComment }. 409 when the version is stale. */
export const PUT = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).submissionId);
  const { actor } = await authorizeSubmission(request, id, 'submission-mark');
  const input = await readJson(request, saveMarksSchema);
  return json(await saveMarks(actor.id, id, input));
});
