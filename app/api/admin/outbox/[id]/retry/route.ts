import { authorize } from '@/lib/authz';
import { idParam, json, route } from '@/lib/http';
import { retryOutbox } from '@/lib/admin/outbox-health';
import { deliverSoon } from '@/lib/mail/outbox';

type Ctx = { params: Promise<{ id: string }> };

/** Site administrators send a failed (or backing-off) message again now. */
export const POST = route<Ctx>(async (request, { params }) => {
  const actor = await authorize(request, { kind: 'admin' });
  const id = idParam((await params).id);
  await retryOutbox(id, actor.id);
  void deliverSoon();
  return json({ ok: true });
});
