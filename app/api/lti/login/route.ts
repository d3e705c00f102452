import { toolUrls } from '@/lib/lti/config';
import { readForm } from '@/lib/lti/form';
import { escapeHtml, htmlPage, ltiRoute } from '@/lib/lti/page';
import { beginLogin, readLoginParameters, registrationFor, type LoginParameters } from '@/lib/lti/state';

/** Browsing contexts inside another page (Fetch Metadata: Sec-Fetch-Dest). */
const FRAMED = new Set(['iframe', 'frame', 'embed', 'object', 'fencedframe']);

/**
 * Inside the platform's frame Oscillab does not sign anyone in (its cookies would be third-party
 * there, and browsers drop them): it offers to open the same login in a window of its own, where
 * the whole exchange runs first-party. See README, "Connecting a learning platform".
 */
async function newWindowPage(p: LoginParameters) {
  await registrationFor(p.iss, p.client_id);
  const url = new URL(toolUrls().login);
  for (const [k, v] of Object.entries(p)) if (v !== undefined) url.searchParams.set(k, v);
  return htmlPage({
    title: 'Oscillab opens in its own window',
    body: `<h1>Oscillab opens in its own window</h1><p>So that your sign-in stays safe and works in every browser, Oscillab does not run inside the learning platform’s page.</p><p><a class="btn" href="${escapeHtml(url.toString())}" target="_blank" rel="noopener">Open Oscillab in a new window</a></p><p class="soft">You come back here by closing that window.</p>`,
  });
}

async function handle(request: Request, params: URLSearchParams) {
  const p = readLoginParameters(params);
  if (FRAMED.has(request.headers.get('sec-fetch-dest') ?? '')) return newWindowPage(p);
  const { location, cookie } = await beginLogin(p);
  return new Response(null, { status: 302, headers: { location, 'set-cookie': cookie, 'cache-control': 'no-store' } });
}

/** OIDC third-party-initiated login (LTI Core 1.3 §5.1.1), by GET or by form POST. */
export const GET = ltiRoute(async (request) => handle(request, new URL(request.url).searchParams));
export const POST = ltiRoute(async (request) => handle(request, await readForm(request)));
