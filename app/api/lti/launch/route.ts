import { deepLinkTicket } from '@/lib/lti/deep-link';
import { readForm } from '@/lib/lti/form';
import { completeLaunch, verifyLaunch } from '@/lib/lti/launch';
import { LaunchRefused, ltiRoute, selfSubmittingForm } from '@/lib/lti/page';
import { instructorLandingAfterRoster } from '@/lib/lti/landing';
import { sessionCookieFor } from '@/lib/lti/session';
import { browserHoldsState, clearStateCookie } from '@/lib/lti/state';
import { limits } from '@/lib/lti/config';

const RELAY = 'oscillab_relay';

/**
 * The launch: the platform's auto-submitting form posts the id_token and state here. The state
 * cookie is SameSite=Lax, so on this cross-site post the browser leaves it out; the first answer is
 * then a form that posts the same fields again from Oscillab's own page, where the cookie is sent
 * (a same-site post). The token is only read once the browser has shown it holds the state.
 */
export const POST = ltiRoute(async (request) => {
  const form = await readForm(request);
  const platformError = form.get('error');
  if (platformError) {
    throw new LaunchRefused(
      400,
      'platform-error',
      'The learning platform did not sign you in',
      `The learning platform answered “${platformError.slice(0, 80)}”${form.get('error_description') ? `: ${form.get('error_description')!.slice(0, 200)}` : ''}.`,
    );
  }
  const idToken = form.get('id_token');
  const state = form.get('state');
  if (!idToken)
    throw new LaunchRefused(400, 'missing-claim', 'The learning platform’s sign-in message is incomplete', 'The form has no id_token.');
  if (!state || state.length > 200)
    throw new LaunchRefused(400, 'unknown-state', 'The learning platform’s sign-in message is incomplete', 'The form has no usable state.');
  if (Buffer.byteLength(idToken) > limits.maxIdTokenBytes) {
    throw new LaunchRefused(
      413,
      'token-too-large',
      'The sign-in message is too large',
      `The learning platform’s id_token is larger than the ${limits.maxIdTokenBytes / 1024} KB Oscillab accepts.`,
    );
  }
  if (!browserHoldsState(request.headers.get('cookie'), state)) {
    if (form.get(RELAY) !== '1') {
      return selfSubmittingForm({
        title: 'Signing you in…',
        action: '/api/lti/launch',
        fields: { id_token: idToken, state, [RELAY]: '1' },
        lead: 'One moment: Oscillab is checking your sign-in from the learning platform.',
        button: 'Continue',
      });
    }
    throw new LaunchRefused(
      401,
      'state-not-in-browser',
      'This sign-in was not started in this browser',
      'Oscillab did not find the check it gave this browser when the sign-in began, so it cannot be sure the sign-in is yours.',
      'Go back to the learning platform and open the item again. If Oscillab was shown inside the learning platform’s page, use “Open Oscillab in a new window”.',
    );
  }

  const verified = await verifyLaunch(idToken, state);
  const outcome = await completeLaunch(verified);
  let location = outcome.location;
  if (verified.deepLinking) {
    const ticket = await deepLinkTicket({
      userId: outcome.user.id,
      ltiContextId: outcome.context.id,
      registrationId: verified.registration.id,
      deploymentId: verified.deploymentId,
      returnUrl: verified.deepLinking.returnUrl,
      data: verified.deepLinking.data,
    });
    location = `/lti/deep-link?t=${encodeURIComponent(ticket)}`;
  } else if (outcome.role === 'instructor') {
    location = await instructorLandingAfterRoster(outcome.context, location);
  }
  const headers = new Headers({ location, 'cache-control': 'no-store' });
  headers.append('set-cookie', await sessionCookieFor(outcome.user));
  headers.append('set-cookie', clearStateCookie(state));
  return new Response(null, { status: 303, headers });
});
