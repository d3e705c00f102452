import { authorize } from '@/lib/authz';
import { json, route } from '@/lib/http';
import { activeToolKey, rotateToolKey, toolKeySummary } from '@/lib/lti/keys';

/** Oscillab's own signing keys (site administrators): which is active, which are still published. */
export const GET = route(async (request) => {
  await authorize(request, { kind: 'admin' });
  await activeToolKey();
  return json({ keys: await toolKeySummary() });
});

/** Rotate: a new key signs from now on; the old one stays published for the grace period. */
export const POST = route(async (request) => {
  const actor = await authorize(request, { kind: 'admin' });
  const result = await rotateToolKey(actor.id);
  return json(result, 201);
});
