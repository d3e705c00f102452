import { authorize } from '@/lib/authz';
import { assertSameOrigin } from '@/lib/http';
import { HttpError } from '@/lib/http-error';
import { audit } from '@/lib/audit';
import { deepLinkResponse, readDeepLinkTicket } from '@/lib/lti/deep-link';
import { readForm } from '@/lib/lti/form';
import { LaunchRefused, ltiRoute, selfSubmittingForm } from '@/lib/lti/page';
import { models } from '@/models';

/**
 * The instructor's choice on /lti/deep-link (a form of this site: the Origin check applies), answered
 * with the signed deep-linking response that posts itself back to the learning platform.
 */
export const POST = ltiRoute(async (request) => {
  assertSameOrigin(request);
  const actor = await authorize(request, { kind: 'signed-in' });
  const form = await readForm(request);
  const ticket = await readDeepLinkTicket(form.get('t') ?? '', actor.id);
  const ctx = await models().LtiContext.findByPk(ticket.ltiContextId);
  if (!ctx) throw new HttpError(404, 'This learning-platform course is no longer connected.');
  await authorize(request, { kind: 'course-manage', courseId: ctx.courseId });
  const raw = form.get('practicalId') ?? '';
  const practical = /^\d{1,12}$/.test(raw) ? await models().Practical.findByPk(Number(raw)) : null;
  if (!practical || practical.courseId !== ctx.courseId || practical.archivedAt) {
    throw new LaunchRefused(
      400,
      'no-such-practical',
      'Choose a practical of this course',
      'The practical chosen is not an open practical of the course this learning-platform course is connected to.',
      'Go back and choose again.',
    );
  }
  const jwt = await deepLinkResponse(ticket, practical);
  await audit({
    actorId: actor.id,
    action: 'lti.deep-link',
    entityType: 'practical',
    entityId: practical.id,
    before: null,
    after: { ltiContextId: ctx.id },
  });
  return selfSubmittingForm({
    title: 'Returning to the learning platform…',
    action: ticket.returnUrl,
    fields: { JWT: jwt },
    lead: `“${practical.title}” is being placed in the learning platform’s course.`,
    button: 'Return to the learning platform',
  });
});
