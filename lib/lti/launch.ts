/**
 * The launch: the id_token the learning platform posts back is checked completely before anything
 * is written — signature against the platform's key set, issuer, audience and azp, deployment,
 * expiry and issue time with a small leeway, the state bound to this browser and the single-use
 * nonce, the message type and the claims it needs — and then, in one transaction, the state is
 * used up, the platform user is mapped to an Oscillab account, given the role the platform's
 * roles map to in the one course the launch's context is connected to, and the item is tied to a
 * practical of that course. Any refusal rolls everything back.
 */
import { decodeJwt, decodeProtectedHeader, errors, jwtVerify, type JWTPayload } from 'jose';
import { UniqueConstraintError, type Transaction } from 'sequelize';
import { sequelize } from '@/lib/db';
import { audit } from '@/lib/audit';
import { models } from '@/models';
import type { CourseRole } from '@/models/course-membership';
import type { LtiRegistration } from '@/models/lti-registration';
import type { LtiContext } from '@/models/lti-context';
import type { User } from '@/models/user';
import { CLAIM, courseRoleFor, MESSAGE, PRACTICAL_PARAMETER, roleLabel } from './claims';
import { isAcceptablePlatformUrl, limits } from './config';
import { LaunchRefused } from './page';
import { KeySetUnavailable, platformKeyResolver, UnknownKey } from './platform-keys';
import { sha256 } from './state';

/** Asymmetric signatures only: `none` and HMAC (a public key used as a shared secret) never verify. */
export const ACCEPTED_ALGORITHMS = ['RS256', 'RS384', 'RS512', 'PS256', 'PS384', 'PS512', 'ES256', 'ES384'];

const refused = (status: number, code: string, title: string, message: string, advice?: string) =>
  new LaunchRefused(status, code, title, message, advice);
const badToken = (code: string, message: string) =>
  refused(401, code, 'Oscillab could not accept this sign-in from the learning platform', message);
const missing = (claim: string) =>
  refused(400, 'missing-claim', 'The learning platform’s sign-in message is incomplete', `The message has no ${claim}.`);

type Claims = JWTPayload & Record<string, unknown>;

export type VerifiedLaunch = {
  registration: LtiRegistration;
  stateId: number;
  deploymentId: string;
  messageType: string;
  sub: string;
  email: string | null;
  name: string;
  roles: string[];
  context: { id: string; title: string | null };
  resourceLink: { id: string; title: string | null } | null;
  custom: Record<string, unknown>;
  ags: { scope: string[]; lineitems: string | null; lineitem: string | null } | null;
  membershipsUrl: string | null;
  deepLinking: { returnUrl: string; data: string | null; acceptTypes: string[] } | null;
};

const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);
const text = (v: unknown, max = 255): string | null => (typeof v === 'string' && v.length > 0 && v.length <= max ? v : null);

/**
 * What the token says before its signature is checked: only enough to find the registration
 * (issuer and audiences), after the size and the algorithm are accepted.
 */
function readUnverified(idToken: string): { issuer: string; audiences: string[] } {
  if (Buffer.byteLength(idToken) > limits.maxIdTokenBytes) {
    throw refused(
      413,
      'token-too-large',
      'The sign-in message is too large',
      `The learning platform’s id_token is larger than the ${limits.maxIdTokenBytes / 1024} KB Oscillab accepts.`,
    );
  }
  let header: ReturnType<typeof decodeProtectedHeader>;
  let unverified: Claims;
  try {
    header = decodeProtectedHeader(idToken);
    unverified = decodeJwt(idToken) as Claims;
  } catch {
    throw refused(400, 'malformed-token', 'The sign-in message could not be read', 'The id_token is not a well-formed signed token.');
  }
  if (typeof header.alg !== 'string' || !ACCEPTED_ALGORITHMS.includes(header.alg)) {
    throw badToken(
      'algorithm-refused',
      `The id_token is signed with “${String(header.alg).slice(0, 20)}”, which Oscillab does not accept; only public-key signatures (such as RS256) are.`,
    );
  }
  const issuer = text(unverified.iss, 500);
  if (!issuer) throw missing('issuer (iss)');
  const audiences = Array.isArray(unverified.aud)
    ? unverified.aud.filter((a): a is string => typeof a === 'string')
    : typeof unverified.aud === 'string'
      ? [unverified.aud]
      : [];
  if (audiences.length === 0) throw missing('audience (aud)');
  return { issuer, audiences };
}

/** Which registration: by issuer, then by the audience naming its client id; it must be switched on. */
async function registrationFor(issuer: string, audiences: string[]): Promise<LtiRegistration> {
  const candidates = await models().LtiRegistration.findAll({ where: { issuer } });
  if (candidates.length === 0) {
    throw refused(
      401,
      'unknown-platform',
      'This learning platform is not connected to Oscillab',
      `No learning platform with the issuer “${issuer.slice(0, 200)}” is registered in Oscillab.`,
    );
  }
  const registration = candidates.length === 1 ? candidates[0] : candidates.find((r) => audiences.includes(r.clientId));
  if (!registration || !audiences.includes(registration.clientId))
    throw badToken('wrong-audience', 'The id_token was issued for another tool (its audience is not Oscillab’s client id).');
  if (!registration.active)
    throw refused(
      403,
      'platform-switched-off',
      'This learning platform’s connection is switched off',
      'The site administrator has switched off this learning platform’s connection to Oscillab.',
    );
  return registration;
}

/** The item a resource-link launch opens, or where a deep-linking request wants its answer. */
function messageTarget(
  claims: Claims,
  messageType: unknown,
): { resourceLink: VerifiedLaunch['resourceLink']; deepLinking: VerifiedLaunch['deepLinking'] } {
  let resourceLink: VerifiedLaunch['resourceLink'] = null;
  let deepLinking: VerifiedLaunch['deepLinking'] = null;
  if (messageType === MESSAGE.resourceLink) {
    const link = claims[CLAIM.resourceLink];
    if (!isObject(link) || !text(link.id)) throw missing('item (resource_link)');
    resourceLink = { id: link.id as string, title: text(link.title, 300) };
  } else {
    const settings = claims[CLAIM.deepLinkingSettings];
    if (!isObject(settings) || !text(settings.deep_link_return_url, 1000)) throw missing('deep-linking return address');
    if (!isAcceptablePlatformUrl(settings.deep_link_return_url as string))
      throw refused(
        400,
        'bad-return-url',
        'The learning platform’s return address is not acceptable',
        'The deep-linking return address must be an https address.',
      );
    const acceptTypes = Array.isArray(settings.accept_types) ? settings.accept_types.filter((t): t is string => typeof t === 'string') : [];
    if (!acceptTypes.includes('ltiResourceLink'))
      throw refused(
        400,
        'deep-link-type',
        'The learning platform cannot take an Oscillab item here',
        'This placement does not accept links to tools (ltiResourceLink).',
      );
    deepLinking = { returnUrl: settings.deep_link_return_url as string, data: text(settings.data, 2000), acceptTypes };
  }
  return { resourceLink, deepLinking };
}

/** Everything except the writes. Throws LaunchRefused with a clear message for each way a token can be wrong. */
export async function verifyLaunch(idToken: string, state: string): Promise<VerifiedLaunch> {
  const { issuer, audiences } = readUnverified(idToken);
  const registration = await registrationFor(issuer, audiences);

  let claims: Claims;
  try {
    const result = await jwtVerify(idToken, platformKeyResolver(registration.keySetUrl), {
      issuer: registration.issuer,
      audience: registration.clientId,
      algorithms: ACCEPTED_ALGORITHMS,
      clockTolerance: limits.skewSeconds(),
      requiredClaims: ['exp', 'iat', 'sub', 'nonce'],
    });
    claims = result.payload as Claims;
  } catch (error) {
    throw translateVerifyError(error);
  }
  const now = Math.floor(Date.now() / 1000);
  if (typeof claims.iat !== 'number' || claims.iat > now + limits.skewSeconds()) {
    throw badToken('not-yet-valid', 'The id_token is dated in the future; the learning platform’s clock or the token is wrong.');
  }
  if (audiences.length > 1 || claims.azp !== undefined) {
    if (claims.azp !== registration.clientId)
      throw badToken('wrong-azp', 'The id_token names several audiences but not Oscillab as the authorised party (azp).');
  }

  const deploymentId = text(claims[CLAIM.deploymentId]);
  if (!deploymentId) throw missing('deployment id');
  const deployment = await models().LtiDeployment.findOne({ where: { registrationId: registration.id, deploymentId } });
  if (!deployment)
    throw refused(
      401,
      'unknown-deployment',
      'This deployment is not known to Oscillab',
      'The learning platform named a deployment that is not registered in Oscillab.',
    );

  if (claims[CLAIM.version] !== '1.3.0')
    throw refused(400, 'wrong-version', 'Oscillab does not understand this message', 'Only LTI version 1.3.0 messages are accepted.');
  const messageType = claims[CLAIM.messageType];
  if (messageType !== MESSAGE.resourceLink && messageType !== MESSAGE.deepLinkingRequest) {
    throw refused(
      400,
      'unsupported-message',
      'Oscillab does not handle this kind of message',
      `The message type “${String(messageType).slice(0, 60)}” is not one Oscillab handles.`,
    );
  }

  // State and nonce, last of the checks that need no account: single use is enforced in completeLaunch.
  const row = await models().LtiLaunchState.findOne({ where: { stateHash: sha256(state) } });
  if (!row || row.registrationId !== registration.id)
    throw badToken('unknown-state', 'This sign-in was not started from this browser (its state is unknown to Oscillab).');
  if (row.usedAt) throw badToken('replayed', 'This sign-in message has already been used.');
  if (row.expiresAt.getTime() < Date.now()) throw badToken('state-expired', 'The sign-in took too long and has expired.');
  if (claims.nonce !== row.nonce)
    throw badToken('replayed', 'This sign-in message does not belong to this sign-in (its nonce differs): it may be replayed.');

  const sub = text(claims.sub);
  if (!sub) throw missing('user id (sub)');
  const roles = claims[CLAIM.roles];
  if (!Array.isArray(roles) || roles.some((r) => typeof r !== 'string')) throw missing('list of roles');
  const context = claims[CLAIM.context];
  if (!isObject(context) || !text(context.id)) throw missing('course (context)');
  const custom = isObject(claims[CLAIM.custom]) ? (claims[CLAIM.custom] as Record<string, unknown>) : {};

  const { resourceLink, deepLinking } = messageTarget(claims, messageType);

  const ags = isObject(claims[CLAIM.ags]) ? (claims[CLAIM.ags] as Record<string, unknown>) : null;
  const nrps = isObject(claims[CLAIM.nrps]) ? (claims[CLAIM.nrps] as Record<string, unknown>) : null;
  const serviceUrl = (v: unknown) => (typeof v === 'string' && v.length <= 1000 && isAcceptablePlatformUrl(v) ? v : null);
  const givenName = [text(claims.given_name, 100), text(claims.family_name, 100)].filter(Boolean).join(' ');
  const email = text(claims.email, 254)?.toLowerCase() ?? null;

  return {
    registration,
    stateId: row.id,
    deploymentId,
    messageType: messageType as string,
    sub,
    email: email && /^[^\s@,;<>"]+@[^\s@,;<>"]+\.[^\s@,;<>"]+$/.test(email) ? email : null,
    name: text(claims.name, 200) ?? (givenName || null) ?? email ?? 'Learning-platform user',
    roles: roles as string[],
    context: { id: context.id as string, title: text(context.title, 300) },
    resourceLink,
    custom,
    ags: ags
      ? {
          scope: Array.isArray(ags.scope) ? ags.scope.filter((s): s is string => typeof s === 'string') : [],
          lineitems: serviceUrl(ags.lineitems),
          lineitem: serviceUrl(ags.lineitem),
        }
      : null,
    membershipsUrl: nrps ? serviceUrl(nrps.context_memberships_url) : null,
    deepLinking,
  };
}

function translateVerifyError(error: unknown): LaunchRefused {
  if (error instanceof LaunchRefused) return error;
  if (error instanceof KeySetUnavailable) {
    return refused(
      503,
      'keyset-unreachable',
      'Oscillab cannot check this sign-in just now',
      'Oscillab could not reach the learning platform’s public key set to check the signature, so it cannot let you in yet.',
      'Please try again in a few minutes. Nothing is wrong with your account; if this lasts, tell the site administrator.',
    );
  }
  if (error instanceof UnknownKey)
    return badToken('unknown-key', 'The id_token is signed with a key the learning platform does not publish.');
  if (error instanceof errors.JWTExpired) return badToken('expired', 'The sign-in message has expired.');
  if (error instanceof errors.JWTClaimValidationFailed) {
    if (error.claim === 'nbf' || error.claim === 'iat') return badToken('not-yet-valid', 'The sign-in message is not valid yet.');
    if (error.claim === 'iss') return badToken('wrong-issuer', 'The id_token names another issuer than the registered platform.');
    if (error.claim === 'aud') return badToken('wrong-audience', 'The id_token was issued for another tool.');
    return missing(`valid “${error.claim}” claim`);
  }
  if (error instanceof errors.JOSEAlgNotAllowed)
    return badToken('algorithm-refused', 'The id_token is signed with an algorithm Oscillab does not accept.');
  if (error instanceof errors.JWSSignatureVerificationFailed)
    return badToken('bad-signature', 'The id_token’s signature does not match the learning platform’s key.');
  if (error instanceof errors.JWKSMultipleMatchingKeys)
    return badToken('unknown-key', 'The id_token does not say clearly which of the platform’s keys signed it.');
  if (error instanceof errors.JOSEError)
    return refused(400, 'malformed-token', 'The sign-in message could not be read', 'The id_token is not a well-formed signed token.');
  return error as LaunchRefused;
}

// ——— Mapping to Oscillab —————————————————————————————————————————————————————————

export type Person = { sub: string; email: string | null; name: string };
export type AccountMatch =
  { kind: 'linked'; user: User } | { kind: 'by-email'; user: User } | { kind: 'new' } | { kind: 'conflict'; reason: string };

/**
 * Who a platform user is in Oscillab: the account already linked to their `sub`; else the account
 * with the e-mail the platform gives (never a site administrator's, never one linked to another
 * platform user); else a new account. The link is made once and never moved.
 */
export async function matchAccount(registrationId: number, person: Person, transaction?: Transaction): Promise<AccountMatch> {
  const { LtiUserLink, User } = models();
  const link = await LtiUserLink.findOne({ where: { registrationId, sub: person.sub }, transaction });
  if (link) {
    const user = await User.findByPk(link.userId, { transaction });
    if (user) return { kind: 'linked', user };
  }
  if (!person.email)
    return {
      kind: 'conflict',
      reason: 'The learning platform did not share an e-mail address, and Oscillab has no account linked to this person yet.',
    };
  const user = await User.findOne({ where: { email: person.email }, transaction });
  if (!user) return { kind: 'new' };
  if (user.isAdmin)
    return {
      kind: 'conflict',
      reason:
        'The Oscillab account with this e-mail is a site administrator’s; such accounts are never connected to a learning platform by e-mail.',
    };
  const taken = await LtiUserLink.findOne({ where: { registrationId, userId: user.id }, transaction });
  if (taken)
    return {
      kind: 'conflict',
      reason: 'The Oscillab account with this e-mail is already connected to another person of the learning platform.',
    };
  return { kind: 'by-email', user };
}

/** The account for a match (made and linked if needed), inside the caller's transaction. */
export async function accountFor(registrationId: number, person: Person, match: AccountMatch, transaction: Transaction): Promise<User> {
  const { LtiUserLink, User } = models();
  if (match.kind === 'conflict') throw new Error(match.reason);
  if (match.kind === 'linked') return match.user;
  const user =
    match.kind === 'by-email'
      ? match.user
      : await User.create(
          { email: person.email!, name: person.name.slice(0, 200), passwordHash: null, isAdmin: false, studentNumber: null },
          { transaction },
        );
  await LtiUserLink.create({ registrationId, sub: person.sub, userId: user.id }, { transaction });
  return user;
}

/** The cohort students from the platform join: the context's chosen one, or the course's only open cohort. */
export async function cohortForNewStudents(ctx: LtiContext, transaction?: Transaction): Promise<number | null> {
  const { Cohort } = models();
  if (ctx.defaultCohortId) {
    const c = await Cohort.findByPk(ctx.defaultCohortId, { transaction });
    return c && c.courseId === ctx.courseId && !c.archivedAt ? c.id : null;
  }
  const open = await Cohort.findAll({ where: { courseId: ctx.courseId, archivedAt: null }, transaction });
  return open.length === 1 ? open[0].id : null;
}

const STAFF: CourseRole[] = ['ta', 'instructor', 'lead'];

/**
 * Give `user` the role in the context's course (and only there). A person who already holds a
 * staff role there is not made a student as well. Returns the roles they hold there afterwards.
 */
export async function grantCourseRole(
  user: User,
  ctx: LtiContext,
  role: CourseRole,
  transaction: Transaction,
): Promise<{ roles: CourseRole[]; cohortId: number | null; granted: boolean }> {
  const { CourseMembership } = models();
  const held = await CourseMembership.findAll({ where: { userId: user.id, courseId: ctx.courseId }, transaction });
  const roles = held.map((m) => m.role);
  const studentCohort = held.find((m) => m.role === 'student')?.cohortId ?? null;
  if (roles.includes(role) || (role === 'student' && roles.some((r) => STAFF.includes(r))))
    return { roles, cohortId: studentCohort, granted: false };
  let cohortId: number | null = null;
  if (role === 'student') {
    cohortId = await cohortForNewStudents(ctx, transaction);
    if (!cohortId) {
      throw refused(
        409,
        'no-cohort',
        'Oscillab does not know your cohort yet',
        'This course has several cohorts and none is chosen for students arriving from the learning platform.',
        'Your instructor chooses it on the course’s learning-platform page in Oscillab; then launch again.',
      );
    }
  }
  await CourseMembership.create({ userId: user.id, courseId: ctx.courseId, role, cohortId }, { transaction });
  return { roles: [...roles, role], cohortId: role === 'student' ? cohortId : studentCohort, granted: true };
}

export type LaunchOutcome = {
  user: User;
  location: string;
  role: CourseRole;
  context: LtiContext;
  practicalId: number | null;
};

/** The writes of a verified launch, all in one transaction; refusals roll back. */
export async function completeLaunch(v: VerifiedLaunch): Promise<LaunchOutcome> {
  try {
    return await writeLaunch(v);
  } catch (error) {
    // Two first launches of the same person at the same moment: one makes the account, the other meets the unique index.
    if (error instanceof UniqueConstraintError) {
      throw refused(
        409,
        'simultaneous-launch',
        'Another sign-in of yours was happening at the same moment',
        'Oscillab finished the other one first and left this one unused.',
        'Open the item again from the learning platform.',
      );
    }
    throw error;
  }
}

async function writeLaunch(v: VerifiedLaunch): Promise<LaunchOutcome> {
  const { LtiContext, LtiLaunchState, PracticalCohort, Course } = models();
  return sequelize().transaction(async (t) => {
    const [used] = await LtiLaunchState.update({ usedAt: new Date() }, { where: { id: v.stateId, usedAt: null }, transaction: t });
    if (used !== 1) throw badToken('replayed', 'This sign-in message has already been used.');

    const ctx = await LtiContext.findOne({ where: { registrationId: v.registration.id, contextId: v.context.id }, transaction: t });
    if (!ctx) {
      throw refused(
        403,
        'course-not-connected',
        'This course is not connected to Oscillab yet',
        `The learning platform’s course “${(v.context.title ?? v.context.id).slice(0, 120)}” (context id ${v.context.id.slice(0, 80)}) is not connected to an Oscillab course.`,
        'The site administrator connects it on Oscillab’s administration page (Learning platform); then launch again.',
      );
    }
    const course = await Course.findByPk(ctx.courseId, { transaction: t });
    if (!course || course.archivedAt)
      throw refused(
        403,
        'course-archived',
        'This course is closed in Oscillab',
        'The Oscillab course connected to this learning-platform course is archived.',
      );

    const role = courseRoleFor(v.roles);
    if (!role) {
      const named = v.roles.map(roleLabel).slice(0, 5).join(', ') || 'none';
      throw refused(
        403,
        'no-role',
        'Oscillab has nothing for your role here',
        `Your role in this course on the learning platform (${named}) does not correspond to any role in Oscillab, so Oscillab gives you none.`,
        'Students, teaching assistants and instructors of the course can use Oscillab. If your role is wrong, ask the course’s instructor.',
      );
    }
    if (v.messageType === MESSAGE.deepLinkingRequest && role !== 'instructor') {
      throw refused(
        403,
        'deep-link-staff-only',
        'Only instructors place Oscillab items',
        'Choosing which practical an item opens is for the course’s instructors.',
      );
    }

    const practicalId = v.resourceLink ? await practicalOfItem(ctx, v.resourceLink, v.custom, t) : null;

    const person: Person = { sub: v.sub, email: v.email, name: v.name };
    const match = await matchAccount(v.registration.id, person, t);
    if (match.kind === 'conflict')
      throw refused(
        409,
        'account-conflict',
        'Oscillab cannot tell which account is yours',
        match.reason,
        'The site administrator can sort this out; nothing was changed.',
      );
    const user = await accountFor(v.registration.id, person, match, t);
    const granted = await grantCourseRole(user, ctx, role, t);

    if (role === 'student' && practicalId && !granted.roles.some((r) => STAFF.includes(r))) {
      const placed = granted.cohortId
        ? await PracticalCohort.findOne({ where: { practicalId, cohortId: granted.cohortId }, transaction: t })
        : null;
      if (!placed)
        throw refused(
          403,
          'not-set-for-cohort',
          'This practical is not set for your cohort',
          'The practical this item opens is not set for the cohort you are in.',
          'Ask your instructor; nothing was changed.',
        );
    }

    await recordServices(v, ctx, practicalId, t);

    await audit(
      {
        actorId: user.id,
        action: 'lti.launch',
        entityType: 'course',
        entityId: ctx.courseId,
        before: null,
        after: {
          registrationId: v.registration.id,
          context: v.context.id,
          message: v.messageType,
          role,
          granted: granted.granted,
          practicalId,
          account: match.kind,
        },
      },
      t,
    );

    // Where they land: the page of the highest role they hold in this course.
    const held = granted.roles;
    const landing: CourseRole =
      held.includes('instructor') || held.includes('lead') ? 'instructor' : held.includes('ta') ? 'ta' : 'student';
    let location: string;
    if (v.messageType === MESSAGE.deepLinkingRequest) location = '/lti/deep-link';
    else if (landing === 'instructor') location = `/courses/${ctx.courseId}/practicals/${practicalId}`;
    else if (landing === 'ta') location = '/marking';
    else location = `/student/practicals/${practicalId}`;
    return { user, location, role: landing, context: ctx, practicalId };
  });
}

/**
 * The practical an item opens: the item's stored link, or the custom parameter a deep-linked item
 * carries — always a practical of this context's course, whatever the message says. A first
 * launch of the item stores the link.
 */
async function practicalOfItem(
  ctx: LtiContext,
  resourceLink: NonNullable<VerifiedLaunch['resourceLink']>,
  custom: VerifiedLaunch['custom'],
  t: Transaction,
): Promise<number> {
  const { LtiResourceLink, Practical } = models();
  let practicalId: number;
  const link = await LtiResourceLink.findOne({ where: { ltiContextId: ctx.id, resourceLinkId: resourceLink.id }, transaction: t });
  if (link) practicalId = link.practicalId;
  else {
    const named = custom[PRACTICAL_PARAMETER];
    const id =
      typeof named === 'string' && /^\d{1,12}$/.test(named)
        ? Number(named)
        : typeof named === 'number' && Number.isSafeInteger(named)
          ? named
          : null;
    if (!id) {
      throw refused(
        404,
        'item-not-linked',
        'This item does not open a practical yet',
        'The learning platform’s item does not name an Oscillab practical.',
        'An instructor places Oscillab items through the learning platform’s “add from a tool” (deep linking) page, which records the practical.',
      );
    }
    practicalId = id;
  }
  const practical = await Practical.findByPk(practicalId, { transaction: t });
  if (!practical || practical.courseId !== ctx.courseId) {
    throw refused(
      403,
      'other-course',
      'This item belongs to another course',
      'The item names a practical that is not part of the Oscillab course this learning-platform course is connected to. A launch only ever gives access within its own course.',
    );
  }
  if (practical.archivedAt)
    throw refused(404, 'practical-archived', 'This practical is closed', 'The practical this item opens has been archived in Oscillab.');
  if (!link)
    await LtiResourceLink.create(
      { ltiContextId: ctx.id, resourceLinkId: resourceLink.id, practicalId, title: resourceLink.title },
      { transaction: t },
    );
  return practicalId;
}

/** The services the platform offers for this course, as it announced them in this launch. */
async function recordServices(v: VerifiedLaunch, ctx: LtiContext, practicalId: number | null, t: Transaction): Promise<void> {
  const { LtiLineItem } = models();
  const updates: Partial<{ title: string; membershipsUrl: string; lineItemsUrl: string; agsScopes: string }> = {};
  if (v.context.title && v.context.title !== ctx.title) updates.title = v.context.title;
  if (v.membershipsUrl && v.membershipsUrl !== ctx.membershipsUrl) updates.membershipsUrl = v.membershipsUrl;
  if (v.ags?.lineitems && v.ags.lineitems !== ctx.lineItemsUrl) updates.lineItemsUrl = v.ags.lineitems;
  if (v.ags && JSON.stringify(v.ags.scope) !== ctx.agsScopes) updates.agsScopes = JSON.stringify(v.ags.scope);
  if (Object.keys(updates).length) await ctx.update(updates, { transaction: t });
  if (practicalId && v.ags?.lineitem) {
    const item = await LtiLineItem.findOne({ where: { ltiContextId: ctx.id, practicalId }, transaction: t });
    if (!item) await LtiLineItem.create({ ltiContextId: ctx.id, practicalId, url: v.ags.lineitem }, { transaction: t });
    else if (item.url !== v.ags.lineitem) await item.update({ url: v.ags.lineitem }, { transaction: t });
  }
}
