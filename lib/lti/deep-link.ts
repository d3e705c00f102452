/**
 * Deep linking: an instructor launched from the platform's "add an item" page picks a practical in
 * Oscillab, and Oscillab answers the platform with a signed LtiDeepLinkingResponse carrying one
 * resource link (with the practical in a custom parameter) and a line item for its marks.
 * Between the launch and the choice, what the platform asked for travels in a short-lived ticket
 * signed with a key derived from the session secret, and bound to the instructor's account.
 */
import crypto from 'node:crypto';
import { jwtVerify, SignJWT } from 'jose';
import { sessionSecret } from '@/lib/auth/secret';
import { HttpError } from '@/lib/http-error';
import { models } from '@/models';
import type { Practical } from '@/models/practical';
import { CLAIM, MESSAGE, PRACTICAL_PARAMETER } from './claims';
import { toolUrls } from './config';
import { signAsTool } from './keys';

const TICKET_AUDIENCE = 'oscillab:deep-link';
const ticketKey = () => new Uint8Array(crypto.hkdfSync('sha256', sessionSecret(), 'oscillab-lti', 'deep-link-ticket', 32));

export type DeepLinkTicket = {
  userId: number;
  ltiContextId: number;
  registrationId: number;
  deploymentId: string;
  returnUrl: string;
  data: string | null;
};

export async function deepLinkTicket(t: DeepLinkTicket): Promise<string> {
  return new SignJWT({ ctx: t.ltiContextId, reg: t.registrationId, dep: t.deploymentId, ret: t.returnUrl, data: t.data })
    .setProtectedHeader({ alg: 'HS256' })
    .setSubject(String(t.userId))
    .setAudience(TICKET_AUDIENCE)
    .setIssuedAt()
    .setExpirationTime('1h')
    .sign(ticketKey());
}

/** The ticket's content, for `userId` only; a forged, expired or someone else's ticket is a 4xx. */
export async function readDeepLinkTicket(ticket: string, userId: number): Promise<DeepLinkTicket> {
  let payload;
  try {
    ({ payload } = await jwtVerify(ticket, ticketKey(), { audience: TICKET_AUDIENCE, algorithms: ['HS256'] }));
  } catch {
    throw new HttpError(400, 'This choice has expired or is not valid; start again from the learning platform.');
  }
  if (payload.sub !== String(userId))
    throw new HttpError(403, 'This choice was started by someone else; start again from the learning platform.');
  return {
    userId,
    ltiContextId: Number(payload.ctx),
    registrationId: Number(payload.reg),
    deploymentId: String(payload.dep),
    returnUrl: String(payload.ret),
    data: typeof payload.data === 'string' ? payload.data : null,
  };
}

/** The most marks a submission of the practical can get: every quantity's marks and every rubric item's. */
export async function practicalMaximum(practical: Practical): Promise<number> {
  const quantities = await models().QuantityDefinition.findAll({ where: { practicalId: practical.id }, attributes: ['marks'] });
  const rubric = Array.isArray(practical.rubric) ? practical.rubric : [];
  return quantities.reduce((s, q) => s + Number(q.marks), 0) + rubric.reduce((s, r) => s + Number(r.marks ?? 0), 0);
}

export const lineItemResourceId = (practicalId: number) => `oscillab-practical-${practicalId}`;

/** The signed LtiDeepLinkingResponse for one practical. */
export async function deepLinkResponse(ticket: DeepLinkTicket, practical: Practical): Promise<string> {
  const { LtiRegistration } = models();
  const registration = await LtiRegistration.findByPk(ticket.registrationId);
  if (!registration) throw new HttpError(404, 'The learning platform is no longer registered.');
  const max = await practicalMaximum(practical);
  const item = {
    type: 'ltiResourceLink',
    title: practical.title,
    text: 'Submit your line list and derived constants; Oscillab checks them and returns your feedback.',
    url: toolUrls().launch,
    custom: { [PRACTICAL_PARAMETER]: String(practical.id) },
    ...(max > 0
      ? { lineItem: { scoreMaximum: max, label: practical.title, resourceId: lineItemResourceId(practical.id), tag: 'oscillab' } }
      : {}),
  };
  return signAsTool(
    {
      nonce: crypto.randomBytes(16).toString('base64url'),
      [CLAIM.messageType]: MESSAGE.deepLinkingResponse,
      [CLAIM.version]: '1.3.0',
      [CLAIM.deploymentId]: ticket.deploymentId,
      [CLAIM.deepLinkingContentItems]: [item],
      [CLAIM.deepLinkingMessage]: `Placed “${practical.title}” from Oscillab.`,
      ...(ticket.data ? { [CLAIM.deepLinkingData]: ticket.data } : {}),
    },
    { issuer: registration.clientId, audience: registration.issuer, expiresInSeconds: 300 },
  );
}
