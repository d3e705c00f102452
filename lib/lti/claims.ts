/**
 * The LTI 1.3 / LTI Advantage vocabulary Oscillab reads and writes (1EdTech LTI Core 1.3, Deep
 * Linking 2.0, Names and Role Provisioning Services 2.0, Assignment and Grade Services 2.0), and
 * how the platform's roles map to Oscillab's course roles. Pure: no database, no I/O.
 */
import type { CourseRole } from '@/models/course-membership';

export const CLAIM = {
  messageType: 'https://purl.imsglobal.org/spec/lti/claim/message_type',
  version: 'https://purl.imsglobal.org/spec/lti/claim/version',
  deploymentId: 'https://purl.imsglobal.org/spec/lti/claim/deployment_id',
  targetLinkUri: 'https://purl.imsglobal.org/spec/lti/claim/target_link_uri',
  resourceLink: 'https://purl.imsglobal.org/spec/lti/claim/resource_link',
  roles: 'https://purl.imsglobal.org/spec/lti/claim/roles',
  context: 'https://purl.imsglobal.org/spec/lti/claim/context',
  custom: 'https://purl.imsglobal.org/spec/lti/claim/custom',
  deepLinkingSettings: 'https://purl.imsglobal.org/spec/lti-dl/claim/deep_linking_settings',
  deepLinkingContentItems: 'https://purl.imsglobal.org/spec/lti-dl/claim/content_items',
  deepLinkingData: 'https://purl.imsglobal.org/spec/lti-dl/claim/data',
  deepLinkingMessage: 'https://purl.imsglobal.org/spec/lti-dl/claim/msg',
  nrps: 'https://purl.imsglobal.org/spec/lti-nrps/claim/namesroleservice',
  ags: 'https://purl.imsglobal.org/spec/lti-ags/claim/endpoint',
} as const;

export const MESSAGE = {
  resourceLink: 'LtiResourceLinkRequest',
  deepLinkingRequest: 'LtiDeepLinkingRequest',
  deepLinkingResponse: 'LtiDeepLinkingResponse',
} as const;

export const SCOPE = {
  lineItem: 'https://purl.imsglobal.org/spec/lti-ags/scope/lineitem',
  score: 'https://purl.imsglobal.org/spec/lti-ags/scope/score',
  resultRead: 'https://purl.imsglobal.org/spec/lti-ags/scope/result.readonly',
  roster: 'https://purl.imsglobal.org/spec/lti-nrps/scope/contextmembership.readonly',
} as const;

export const MEDIA = {
  lineItem: 'application/vnd.ims.lis.v2.lineitem+json',
  lineItems: 'application/vnd.ims.lis.v2.lineitemcontainer+json',
  score: 'application/vnd.ims.lis.v1.score+json',
  roster: 'application/vnd.ims.lti-nrps.v2.membershipcontainer+json',
} as const;

/** The custom parameter Oscillab puts on the items it places by deep linking. */
export const PRACTICAL_PARAMETER = 'oscillab_practical';

const MEMBERSHIP = 'http://purl.imsglobal.org/vocab/lis/v2/membership#';
export const ROLE = {
  learner: `${MEMBERSHIP}Learner`,
  instructor: `${MEMBERSHIP}Instructor`,
  administrator: `${MEMBERSHIP}Administrator`,
  contentDeveloper: `${MEMBERSHIP}ContentDeveloper`,
  mentor: `${MEMBERSHIP}Mentor`,
  teachingAssistant: 'http://purl.imsglobal.org/vocab/lis/v2/membership/Instructor#TeachingAssistant',
} as const;

/** What each platform role (in the launch's own course) becomes in Oscillab; shown in the README and on the admin screen. */
export const ROLE_MAP: { platform: string; oscillab: CourseRole; note: string }[] = [
  { platform: ROLE.learner, oscillab: 'student', note: 'joins the cohort chosen for students from the learning platform' },
  {
    platform: ROLE.teachingAssistant,
    oscillab: 'ta',
    note: 'the sub-role wins over Instructor; an instructor then assigns what they mark',
  },
  { platform: ROLE.instructor, oscillab: 'instructor', note: '' },
  { platform: ROLE.administrator, oscillab: 'instructor', note: 'the course administrator role, not a site-wide one' },
  { platform: ROLE.contentDeveloper, oscillab: 'instructor', note: '' },
];

/**
 * The one Oscillab course role a set of platform roles grants in the launch's course, or null.
 * Only context (course membership) roles count; institution and system roles, and roles Oscillab
 * does not know (Mentor, Observer …), grant nothing.
 */
export function courseRoleFor(roles: readonly string[]): CourseRole | null {
  const has = (r: string) => roles.includes(r);
  if (has(ROLE.teachingAssistant)) return 'ta';
  if (has(ROLE.instructor) || has(ROLE.administrator) || has(ROLE.contentDeveloper)) return 'instructor';
  if (has(ROLE.learner)) return 'student';
  return null;
}

/** The last path segment of a role URI, for messages ("Mentor"). */
export function roleLabel(role: string): string {
  return role.split(/[#/]/).filter(Boolean).pop() ?? role;
}
