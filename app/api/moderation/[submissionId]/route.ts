import { authenticate, permit } from '@/lib/authz';
import { json, readJson, route, idParam } from '@/lib/http';
import { submissionScope } from '@/lib/authz/submission';
import { moderate } from '@/lib/marking/moderation';
import { moderationSchema } from '@/lib/schemas/marking';

type Ctx = { params: Promise<{ submissionId: string }> };

/** Confirm or change a marker's marks: { decision, version, items, note }. */
export const POST = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).submissionId);
  const actor = await authenticate(request);
  const { scope } = await submissionScope(id);
  permit(actor, { kind: 'moderate', courseId: scope.courseId });
  const input = await readJson(request, moderationSchema);
  return json(await moderate(actor.id, id, input));
});
