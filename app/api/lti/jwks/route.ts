import { json, route } from '@/lib/http';
import { publishedToolKeys } from '@/lib/lti/keys';

/** Oscillab's public keys (JSON Web Key Set), for the learning platform to check what Oscillab signs. Public by design. */
export const GET = route(async () => {
  return json({ keys: await publishedToolKeys() }, 200, { 'Cache-Control': 'public, max-age=300' });
});
