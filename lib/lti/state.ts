/**
 * Login initiation (OIDC third-party-initiated login): Oscillab makes a state and a nonce, keeps the
 * nonce and a hash of the state in lti_launch_states, gives the browser the state in a cookie, and
 * sends it to the platform's OIDC login URL. The launch later must bring back the same state in the
 * same browser (the cookie) and an id_token carrying the nonce, once.
 */
import crypto from 'node:crypto';
import { Op } from 'sequelize';
import { models } from '@/models';
import type { LtiRegistration } from '@/models/lti-registration';
import { limits, secureCookies, toolOrigin, toolUrls } from './config';
import { LaunchRefused } from './page';

export const sha256 = (value: string) => crypto.createHash('sha256').update(value).digest('hex');

const COOKIE_BASE = 'oscillab-lti-state-';
const cookieName = (state: string) => `${secureCookies() ? '__Host-' : ''}${COOKIE_BASE}${sha256(state).slice(0, 16)}`;

export type LoginParameters = {
  iss: string;
  login_hint: string;
  target_link_uri: string;
  lti_message_hint?: string;
  lti_deployment_id?: string;
  client_id?: string;
};

function refuse(code: string, message: string): never {
  throw new LaunchRefused(400, code, 'The learning platform’s sign-in request is incomplete', message);
}

export function readLoginParameters(source: URLSearchParams): LoginParameters {
  const get = (k: string) => {
    const v = source.get(k);
    if (v !== null && v.length > 2000) refuse('login-too-long', `The parameter “${k}” is longer than Oscillab accepts.`);
    return v ?? undefined;
  };
  const iss = get('iss');
  const loginHint = get('login_hint');
  const target = get('target_link_uri');
  if (!iss) refuse('login-no-issuer', 'The request does not say which learning platform it comes from (iss).');
  if (!loginHint) refuse('login-no-hint', 'The request does not name the person signing in (login_hint).');
  if (!target) refuse('login-no-target', 'The request does not say where in Oscillab to go (target_link_uri).');
  return {
    iss,
    login_hint: loginHint,
    target_link_uri: target,
    lti_message_hint: get('lti_message_hint'),
    lti_deployment_id: get('lti_deployment_id'),
    client_id: get('client_id'),
  };
}

/** The registration a login initiation or launch names; refused when unknown, ambiguous or switched off. */
export async function registrationFor(issuer: string, clientId?: string): Promise<LtiRegistration> {
  const rows = await models().LtiRegistration.findAll({ where: { issuer } });
  const matching = clientId ? rows.filter((r) => r.clientId === clientId) : rows;
  if (rows.length === 0) {
    throw new LaunchRefused(
      401,
      'unknown-platform',
      'This learning platform is not connected to Oscillab',
      `No learning platform with the issuer “${issuer.slice(0, 200)}” is registered in Oscillab.`,
      'The site administrator registers learning platforms on Oscillab’s administration page.',
    );
  }
  if (matching.length === 0) {
    throw new LaunchRefused(
      401,
      'wrong-audience',
      'This sign-in was meant for another tool',
      'The learning platform is registered, but not with this client id.',
    );
  }
  if (matching.length > 1) {
    throw new LaunchRefused(
      400,
      'ambiguous-platform',
      'Oscillab cannot tell which registration this is',
      'Several registrations share this issuer; the learning platform must send its client id.',
    );
  }
  if (!matching[0].active) {
    throw new LaunchRefused(
      403,
      'platform-switched-off',
      'This learning platform’s connection is switched off',
      'The site administrator has switched off this learning platform’s connection to Oscillab.',
    );
  }
  return matching[0];
}

export async function beginLogin(params: LoginParameters): Promise<{ location: string; cookie: string }> {
  const registration = await registrationFor(params.iss, params.client_id);
  if (!(params.target_link_uri === toolOrigin() || params.target_link_uri.startsWith(`${toolOrigin()}/`))) {
    refuse('login-foreign-target', 'The request asks to go to an address outside Oscillab.');
  }
  if (params.lti_deployment_id) {
    const known = await models().LtiDeployment.findOne({
      where: { registrationId: registration.id, deploymentId: params.lti_deployment_id },
    });
    if (!known)
      throw new LaunchRefused(
        401,
        'unknown-deployment',
        'This deployment is not known to Oscillab',
        'The learning platform named a deployment that is not registered in Oscillab.',
      );
  }
  const state = crypto.randomBytes(32).toString('base64url');
  const nonce = crypto.randomBytes(24).toString('base64url');
  const now = Date.now();
  const { LtiLaunchState } = models();
  // Old rows are of no use once expired; a day's margin keeps the table small without racing a launch.
  await LtiLaunchState.destroy({ where: { expiresAt: { [Op.lt]: new Date(now - 86400_000) } } });
  await LtiLaunchState.create({
    stateHash: sha256(state),
    nonce,
    registrationId: registration.id,
    expiresAt: new Date(now + limits.stateSeconds * 1000),
    usedAt: null,
  });

  const url = new URL(registration.authLoginUrl);
  const query: Record<string, string | undefined> = {
    scope: 'openid',
    response_type: 'id_token',
    response_mode: 'form_post',
    prompt: 'none',
    client_id: registration.clientId,
    redirect_uri: toolUrls().launch,
    login_hint: params.login_hint,
    lti_message_hint: params.lti_message_hint,
    state,
    nonce,
  };
  for (const [k, v] of Object.entries(query)) if (v !== undefined) url.searchParams.set(k, v);
  const secure = secureCookies();
  const cookie = [
    `${cookieName(state)}=${state}`,
    'Path=/',
    `Max-Age=${limits.stateSeconds}`,
    'HttpOnly',
    'SameSite=Lax',
    ...(secure ? ['Secure'] : []),
  ].join('; ');
  return { location: url.toString(), cookie };
}

/** Whether this browser holds the state (the cookie set at login initiation). */
export function browserHoldsState(cookieHeader: string | null, state: string): boolean {
  if (!cookieHeader) return false;
  const name = cookieName(state);
  for (const part of cookieHeader.split(';')) {
    const eq = part.indexOf('=');
    if (eq > 0 && part.slice(0, eq).trim() === name) {
      const value = Buffer.from(part.slice(eq + 1).trim());
      const wanted = Buffer.from(state);
      return value.length === wanted.length && crypto.timingSafeEqual(value, wanted);
    }
  }
  return false;
}

/** Clears the state cookie once the launch has used it. */
export function clearStateCookie(state: string): string {
  return [`${cookieName(state)}=`, 'Path=/', 'Max-Age=0', 'HttpOnly', 'SameSite=Lax', ...(secureCookies() ? ['Secure'] : [])].join('; ');
}
