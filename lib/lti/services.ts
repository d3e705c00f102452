/**
 * Calls to the platform's LTI Advantage services. Each call carries an access token from the
 * platform's token URL, got with the client-credentials grant and a JWT assertion signed with
 * Oscillab's key (private_key_jwt, RFC 7523), and kept until shortly before it expires.
 */
import crypto from 'node:crypto';
import { models } from '@/models';
import type { LtiRegistration } from '@/models/lti-registration';
import type { LtiContext } from '@/models/lti-context';
import type { Practical } from '@/models/practical';
import { MEDIA, SCOPE } from './claims';
import { isAcceptablePlatformUrl } from './config';
import { lineItemResourceId, practicalMaximum } from './deep-link';
import { PlatformAnswered, platformJson } from './fetch';
import { signAsTool } from './keys';

type Token = { value: string; expiresAt: number };
const tokens = new Map<string, Token>();

export function forgetAccessTokens() {
  tokens.clear();
}

export async function accessToken(registration: LtiRegistration, scopes: string[]): Promise<string> {
  const key = `${registration.id} ${[...scopes].sort().join(' ')}`;
  const cached = tokens.get(key);
  if (cached && cached.expiresAt > Date.now()) return cached.value;
  const assertion = await signAsTool(
    { jti: crypto.randomUUID() },
    {
      issuer: registration.clientId,
      subject: registration.clientId,
      audience: registration.tokenAudience || registration.authTokenUrl,
      expiresInSeconds: 300,
    },
  );
  const body = new URLSearchParams({
    grant_type: 'client_credentials',
    client_assertion_type: 'urn:ietf:params:oauth:client-assertion-type:jwt-bearer',
    client_assertion: assertion,
    scope: scopes.join(' '),
  });
  const { data } = await platformJson<{ access_token?: unknown; expires_in?: unknown }>(registration.authTokenUrl, {
    method: 'POST',
    headers: { 'content-type': 'application/x-www-form-urlencoded', accept: 'application/json' },
    body,
  });
  if (typeof data?.access_token !== 'string' || !data.access_token)
    throw new PlatformAnswered(registration.authTokenUrl, 200, 'no access_token in the answer');
  const seconds = typeof data.expires_in === 'number' && data.expires_in > 0 ? data.expires_in : 3600;
  // A minute's margin (or a tenth of a short life) so a token never expires on its way.
  tokens.set(key, { value: data.access_token, expiresAt: Date.now() + Math.max(0, seconds * 1000 - Math.min(60_000, seconds * 100)) });
  return data.access_token;
}

/** Drop a token the platform no longer accepts (401). */
export function dropAccessToken(registration: LtiRegistration, scopes: string[]) {
  tokens.delete(`${registration.id} ${[...scopes].sort().join(' ')}`);
}

async function registrationOf(ctx: LtiContext): Promise<LtiRegistration> {
  const registration = await models().LtiRegistration.findByPk(ctx.registrationId);
  if (!registration) throw new Error('The learning platform is no longer registered.');
  return registration;
}

// ——— Names and Role Provisioning Services ————————————————————————————————————————

export type PlatformMember = {
  user_id: string;
  roles: string[];
  status?: string;
  name?: string;
  given_name?: string;
  family_name?: string;
  email?: string;
};

const nextLink = (header: string | null): string | null => {
  if (!header) return null;
  for (const part of header.split(',')) {
    const m = /<([^>]+)>\s*;\s*rel="?next"?/i.exec(part);
    if (m) return m[1];
  }
  return null;
};

/** Every member of the platform course, following the container's "next" pages. */
export async function fetchRoster(ctx: LtiContext): Promise<PlatformMember[]> {
  if (!ctx.membershipsUrl)
    throw new Error(
      'The learning platform has not offered its roster for this course yet: launch Oscillab once from the course as an instructor.',
    );
  const registration = await registrationOf(ctx);
  const token = await accessToken(registration, [SCOPE.roster]);
  const members: PlatformMember[] = [];
  let url: string | null = ctx.membershipsUrl;
  for (let page = 0; url && page < 100; page++) {
    if (!isAcceptablePlatformUrl(url)) throw new Error('The roster continues at an address Oscillab does not call.');
    const res: { data: { members?: unknown }; headers: Headers } = await platformJson<{ members?: unknown }>(url, {
      headers: { authorization: `Bearer ${token}`, accept: MEDIA.roster },
    });
    if (!Array.isArray(res.data?.members)) throw new PlatformAnswered(url, 200, 'the answer has no members list');
    for (const m of res.data.members as PlatformMember[]) {
      if (m && typeof m.user_id === 'string' && Array.isArray(m.roles)) members.push(m);
    }
    url = nextLink(res.headers.get('link'));
  }
  return members;
}

// ——— Assignment and Grade Services ——————————————————————————————————————————

const withPath = (url: string, suffix: string) => {
  const u = new URL(url);
  u.pathname = `${u.pathname.replace(/\/$/, '')}${suffix}`;
  return u.toString();
};

/**
 * The line item (gradebook column) for a practical in a platform course: the one recorded (from a
 * launch of a deep-linked item), else the platform's own with Oscillab's resource id, else a new one.
 */
export async function lineItemFor(ctx: LtiContext, practical: Practical): Promise<string> {
  const { LtiLineItem } = models();
  const known = await LtiLineItem.findOne({ where: { ltiContextId: ctx.id, practicalId: practical.id } });
  if (known) return known.url;
  if (!ctx.lineItemsUrl)
    throw new Error('The learning platform has not offered its gradebook for this course yet: launch Oscillab once from the course.');
  const registration = await registrationOf(ctx);
  const token = await accessToken(registration, [SCOPE.lineItem, SCOPE.score]);
  const search = new URL(ctx.lineItemsUrl);
  search.searchParams.set('resource_id', lineItemResourceId(practical.id));
  const { data: found } = await platformJson<unknown[]>(search.toString(), {
    headers: { authorization: `Bearer ${token}`, accept: MEDIA.lineItems },
  });
  let url = Array.isArray(found)
    ? (found.find((i) => (i as { resourceId?: string }).resourceId === lineItemResourceId(practical.id)) as { id?: string } | undefined)?.id
    : undefined;
  if (!url) {
    const { data: created } = await platformJson<{ id?: string }>(ctx.lineItemsUrl, {
      method: 'POST',
      headers: { authorization: `Bearer ${token}`, 'content-type': MEDIA.lineItem, accept: MEDIA.lineItem },
      body: JSON.stringify({
        scoreMaximum: Math.max(1, await practicalMaximum(practical)),
        label: practical.title,
        resourceId: lineItemResourceId(practical.id),
        tag: 'oscillab',
      }),
    });
    url = created?.id;
  }
  if (typeof url !== 'string' || !isAcceptablePlatformUrl(url))
    throw new Error('The learning platform did not give a usable line item address.');
  const [row] = await LtiLineItem.findOrCreate({
    where: { ltiContextId: ctx.id, practicalId: practical.id },
    defaults: { ltiContextId: ctx.id, practicalId: practical.id, url },
  });
  return row.url;
}

export type Score = {
  userId: string;
  scoreGiven: number;
  scoreMaximum: number;
  comment?: string;
  timestamp: string;
  activityProgress: 'Completed';
  gradingProgress: 'FullyGraded';
};

export async function postScore(ctx: LtiContext, lineItemUrl: string, score: Score): Promise<void> {
  const registration = await registrationOf(ctx);
  const scopes = [SCOPE.lineItem, SCOPE.score];
  const token = await accessToken(registration, scopes);
  try {
    await platformJson(withPath(lineItemUrl, '/scores'), {
      method: 'POST',
      headers: { authorization: `Bearer ${token}`, 'content-type': MEDIA.score },
      body: JSON.stringify(score),
    });
  } catch (error) {
    if (error instanceof PlatformAnswered && error.status === 401) dropAccessToken(registration, scopes);
    throw error;
  }
}
