import { authorize, permit } from '@/lib/authz';
import { json, readJson, route } from '@/lib/http';
import { deliverOutbox } from '@/lib/mail/outbox';
import { submissionScope } from '@/lib/marking/access';
import { releaseMany } from '@/lib/marking/release';
import { releaseSchema } from '@/lib/schemas/marking';

/** Release one or a batch: { submissionIds }. Every submission must be one the caller may mark. */
export const POST = route(async (request) => {
  const actor = await authorize(request, { kind: 'signed-in' });
  const { submissionIds } = await readJson(request, releaseSchema);
  for (const id of submissionIds) {
    const { scope } = await submissionScope(id);
    permit(actor, { kind: 'submission-mark', ...scope });
  }
  const results = await releaseMany(actor.id, submissionIds);
  // Send now rather than wait for the worker's next tick; failures stay queued and are retried.
  deliverOutbox().catch((error) => console.error('[oscillab] outbox after release', error));
  return json({ results, released: results.filter((r) => r.ok).length });
});
