/**
 * The authorisation matrix (issue 8, item 1): every API route handler, found from the code, called
 * as each of eight callers with ids of this course's real rows and a valid body, and the status
 * compared with the expected table below. A route or method without a row here fails the test, and
 * so does a row for a route that no longer exists.
 *
 * The calls run in table order, each role in column order, on one world built in beforeAll.
 * Calls that change state either repeat an idempotent change (same title, same band) or get a
 * fresh target row of their own from `call` (a new spare membership, a new marked submission…),
 * so one case never depends on what another case did.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { apiRequest, params } from '../helpers/session';
import { routeHandlers, serverActionFiles, type RouteHandler } from '../helpers/routes';
import { buildFixtureWorld, freshSubmission, JCAMP, type FixtureWorld } from '../helpers/fixture-world';
import { hashPassword } from '@/lib/auth/password';
import { models } from '@/models';
import { deliverOutbox } from '@/lib/mail/outbox';
import { connectContext, createRegistration } from '@/lib/lti/admin';

const ROLES = ['anonymous', 'student', 'otherStudent', 'ta', 'otherTa', 'instructor', 'otherLead', 'admin'] as const;
type Role = (typeof ROLES)[number];
/** An exact status, or 'allowed': anything but 401/403 (used only where a fully valid call is impractical). */
type Expected = number | 'allowed';
/** One expected status per role, in the order of ROLES. */
type Row = [
  anonymous: Expected,
  student: Expected,
  otherStudent: Expected,
  ta: Expected,
  otherTa: Expected,
  instructor: Expected,
  otherLead: Expected,
  admin: Expected,
];

type Call = { url: string; params?: Record<string, string>; body?: unknown; rawBody?: BodyInit; headers?: Record<string, string> };
/** `mails`: the route starts deliverOutbox() in the background; the next call waits for it (see settleOutbox). */
type Case = { expect: Row; call: (w: FixtureWorld, role: Role) => Call | Promise<Call>; mails?: true };

/** Route handlers the matrix cannot call outside Next, each with the reason. */
const SKIPPED: Record<string, string> = {
  // next-auth's own handler reads cookies()/headers() from the Next request context and redirects;
  // its pre-check of the sign-in body is covered in foundation-input.test.ts, sign-in itself in
  // foundation-signin.test.ts and the e2e suite.
  'GET /api/auth/[...nextauth]': 'next-auth handler: needs the Next request context',
  'POST /api/auth/[...nextauth]': 'next-auth handler: needs the Next request context',
};

let n = 0;
const uniq = (role: Role) => `${role}-${++n}`;

async function spareUser(tag: string) {
  return models().User.create({
    email: `spare.${tag}@test.example`,
    name: `Spare ${tag}`,
    passwordHash: await hashPassword('spare-password-123'),
    isAdmin: false,
    studentNumber: null,
  });
}
async function spareTa(w: FixtureWorld, tag: string) {
  const u = await spareUser(tag);
  const m = await models().CourseMembership.create({ userId: u.id, courseId: w.course.id, role: 'ta', cohortId: null });
  return { user: u, membership: m };
}
const version = async (id: number) => (await models().Submission.findByPk(id))!.version;

const LTI_REGISTRATION = {
  name: 'Matrix platform',
  issuer: 'https://matrix-platform.example',
  clientId: 'matrix-client',
  deploymentIds: ['matrix-deployment'],
  authLoginUrl: 'https://matrix-platform.example/auth',
  authTokenUrl: 'https://matrix-platform.example/token',
  keySetUrl: 'https://matrix-platform.example/jwks',
};
let ltiMemo: { registrationId: number; contextId: number } | null = null;
/** A registration and a connected context of the world's course, made once. */
async function ltiRows(w: FixtureWorld) {
  if (!ltiMemo) {
    const reg = await createRegistration(LTI_REGISTRATION, w.people.admin.id);
    const ctx = await connectContext({ registrationId: reg.id, contextId: 'matrix-context', courseId: w.course.id }, w.people.admin.id);
    ltiMemo = { registrationId: reg.id, contextId: ctx.id };
  }
  return ltiMemo;
}

//                                                         anon student otherSt  ta  otherTa instr otherLead admin
const MATRIX: Record<string, Case> = {
  'POST /api/admin/memberships': {
    expect: [401, 403, 403, 403, 403, 403, 403, 201],
    call: (w) => ({ url: '/api/admin/memberships', body: { email: w.people.nobody.email, courseId: w.course.id, role: 'ta' } }),
  },
  'DELETE /api/admin/memberships/[membershipId]': {
    expect: [401, 403, 403, 403, 403, 403, 403, 200],
    call: async (w, role) => {
      const { membership } = await spareTa(w, `admin-remove-${uniq(role)}`);
      return { url: `/api/admin/memberships/${membership.id}`, params: { membershipId: String(membership.id) } };
    },
  },
  'POST /api/admin/outbox/[id]/retry': {
    // A failed message per caller; the administrator's is queued again and sent.
    expect: [401, 403, 403, 403, 403, 403, 403, 200],
    mails: true,
    call: async (_w, role) => {
      const row = await models().EmailOutbox.create({
        dedupeKey: `matrix-retry:${uniq(role)}`,
        toAddress: 'matrix.retry@test.example',
        subject: 'Matrix retry',
        textBody: 'Test message.',
        htmlBody: null,
        submissionId: null,
        feedbackDocumentId: null,
        status: 'failed',
        attempts: 12,
        nextAttemptAt: new Date(),
        lockedUntil: null,
        lastError: 'test',
        messageId: null,
        sentAt: null,
      });
      return { url: `/api/admin/outbox/${row.id}/retry`, params: { id: String(row.id) }, body: {} };
    },
  },
  'GET /api/courses': {
    expect: [401, 200, 200, 200, 200, 200, 200, 200],
    call: () => ({ url: '/api/courses' }),
  },
  'POST /api/courses': {
    // Instructors and leads of any course (and admins) start courses.
    expect: [401, 403, 403, 403, 403, 201, 201, 201],
    call: (_w, role) => ({ url: '/api/courses', body: { code: `MX-${uniq(role)}`, title: 'Matrix course' } }),
  },
  'GET /api/courses/[courseId]': {
    expect: [401, 403, 403, 200, 200, 200, 403, 200],
    call: (w) => ({ url: `/api/courses/${w.course.id}`, params: { courseId: String(w.course.id) } }),
  },
  'PATCH /api/courses/[courseId]': {
    expect: [401, 403, 403, 403, 403, 200, 403, 200],
    call: (w) => ({ url: `/api/courses/${w.course.id}`, params: { courseId: String(w.course.id) }, body: { title: w.course.title } }),
  },
  'POST /api/courses/[courseId]/cohorts': {
    expect: [401, 403, 403, 403, 403, 201, 403, 201],
    call: (w, role) => ({
      url: `/api/courses/${w.course.id}/cohorts`,
      params: { courseId: String(w.course.id) },
      body: { name: `Matrix ${uniq(role)}`, term: '2027 Spring' },
    }),
  },
  'PATCH /api/courses/[courseId]/cohorts/[cohortId]': {
    expect: [401, 403, 403, 403, 403, 200, 403, 200],
    call: (w) => ({
      url: `/api/courses/${w.course.id}/cohorts/${w.cohort.id}`,
      params: { courseId: String(w.course.id), cohortId: String(w.cohort.id) },
      body: { name: w.cohort.name },
    }),
  },
  'POST /api/courses/[courseId]/practicals': {
    expect: [401, 403, 403, 403, 403, 201, 403, 201],
    call: (w) => ({
      url: `/api/courses/${w.course.id}/practicals`,
      params: { courseId: String(w.course.id) },
      body: {
        title: 'Matrix practical',
        species: ['H35Cl'],
        mode: 'practice',
        maxAttempts: 3,
        lateRule: 'none',
        latePenaltyPerDay: 0,
        latePenaltyCap: 0,
      },
    }),
  },
  'GET /api/courses/[courseId]/roster': {
    expect: [401, 403, 403, 403, 403, 200, 403, 200],
    call: (w) => ({ url: `/api/courses/${w.course.id}/roster`, params: { courseId: String(w.course.id) } }),
  },
  'POST /api/courses/[courseId]/roster': {
    // ?mode=preview (the default) classifies the rows and writes nothing.
    expect: [401, 403, 403, 403, 403, 200, 403, 200],
    call: (w) => ({
      url: `/api/courses/${w.course.id}/roster?mode=preview`,
      params: { courseId: String(w.course.id) },
      rawBody: `name,email,student_number,cohort\nRoster Person,roster.person@test.example,R9001,${w.cohort.name}\n`,
      headers: { 'content-type': 'text/csv' },
    }),
  },
  'POST /api/courses/[courseId]/staff': {
    expect: [401, 403, 403, 403, 403, 201, 403, 201],
    call: async (w, role) => {
      const u = await spareUser(`staff-${uniq(role)}`);
      return { url: `/api/courses/${w.course.id}/staff`, params: { courseId: String(w.course.id) }, body: { email: u.email, role: 'ta' } };
    },
  },
  'DELETE /api/courses/[courseId]/staff/[membershipId]': {
    expect: [401, 403, 403, 403, 403, 200, 403, 200],
    call: async (w, role) => {
      const { membership } = await spareTa(w, `remove-${uniq(role)}`);
      return {
        url: `/api/courses/${w.course.id}/staff/${membership.id}`,
        params: { courseId: String(w.course.id), membershipId: String(membership.id) },
      };
    },
  },
  'POST /api/courses/[courseId]/ta-assignments': {
    expect: [401, 403, 403, 403, 403, 201, 403, 201],
    call: async (w, role) => {
      const { user } = await spareTa(w, `assign-${uniq(role)}`);
      return {
        url: `/api/courses/${w.course.id}/ta-assignments`,
        params: { courseId: String(w.course.id) },
        body: { taId: user.id, cohortId: w.otherCohort.id },
      };
    },
  },
  'DELETE /api/courses/[courseId]/ta-assignments/[assignmentId]': {
    expect: [401, 403, 403, 403, 403, 200, 403, 200],
    call: async (w, role) => {
      const { user } = await spareTa(w, `unassign-${uniq(role)}`);
      const a = await models().TaAssignment.create({ cohortId: w.otherCohort.id, taId: user.id, studentId: null });
      return {
        url: `/api/courses/${w.course.id}/ta-assignments/${a.id}`,
        params: { courseId: String(w.course.id), assignmentId: String(a.id) },
      };
    },
  },
  'POST /api/invitations/accept': {
    // Public: a one-time token is the only credential. An unknown token is 400 for everyone, never 401/403.
    expect: [400, 400, 400, 400, 400, 400, 400, 400],
    call: () => ({
      url: '/api/invitations/accept',
      body: { token: 'matrix-unknown-token-0123456789', password: 'correct-horse-battery-9', confirm: 'correct-horse-battery-9' },
    }),
  },
  'POST /api/password-reset': {
    // Public, and the same answer whether or not the address has an account (no enumeration).
    expect: [200, 200, 200, 200, 200, 200, 200, 200],
    call: (_w, role) => ({
      url: '/api/password-reset',
      body: { email: `no-account.${uniq(role)}@test.example` },
      headers: { 'x-forwarded-for': `192.0.2.${n}` },
    }),
  },
  'GET /api/health': {
    // Public on purpose (load-balancer health check): a fixed body, no database, no session.
    expect: [200, 200, 200, 200, 200, 200, 200, 200],
    call: () => ({ url: '/api/health' }),
  },
  'GET /api/me': {
    expect: [401, 200, 200, 200, 200, 200, 200, 200],
    call: () => ({ url: '/api/me' }),
  },
  'GET /api/marking/queue': {
    // Signed in: each caller sees only what they mark (students: an empty page).
    expect: [401, 200, 200, 200, 200, 200, 200, 200],
    call: () => ({ url: '/api/marking/queue' }),
  },
  'GET /api/marking/[submissionId]': {
    expect: [401, 403, 403, 200, 403, 200, 403, 200],
    call: (w) => ({ url: `/api/marking/${w.submission.id}`, params: { submissionId: String(w.submission.id) } }),
  },
  'PUT /api/marking/[submissionId]': {
    expect: [401, 403, 403, 200, 403, 200, 403, 200],
    call: async (w) => ({
      url: `/api/marking/${w.submission.id}`,
      params: { submissionId: String(w.submission.id) },
      body: { version: await version(w.submission.id), items: [], markerComment: null },
    }),
  },
  'POST /api/marking/[submissionId]/accept': {
    expect: [401, 403, 403, 200, 403, 200, 403, 200],
    call: async (w) => ({
      url: `/api/marking/${w.submission.id}/accept`,
      params: { submissionId: String(w.submission.id) },
      body: { version: await version(w.submission.id) },
    }),
  },
  'GET /api/marking/[submissionId]/preview': {
    expect: [401, 403, 403, 200, 403, 200, 403, 200],
    call: (w) => ({ url: `/api/marking/${w.submission.id}/preview`, params: { submissionId: String(w.submission.id) } }),
  },
  'GET /api/marking/[submissionId]/report': {
    // The student may read their own report; markers of the cohort and managers too.
    expect: [401, 200, 403, 200, 403, 200, 403, 200],
    call: (w) => ({ url: `/api/marking/${w.submission.id}/report`, params: { submissionId: String(w.submission.id) } }),
  },
  'POST /api/marking/[submissionId]/resend': {
    mails: true,
    expect: [401, 403, 403, 200, 403, 200, 403, 200],
    call: async (w, role) => {
      const row = await models().EmailOutbox.create({
        dedupeKey: `matrix-resend:${uniq(role)}`,
        toAddress: w.people.student.email,
        subject: `Matrix resend ${n}`,
        textBody: 'Matrix test message.',
        htmlBody: null,
        submissionId: w.submission.id,
        feedbackDocumentId: null,
        status: 'failed',
        attempts: 5,
        nextAttemptAt: new Date(),
        lockedUntil: null,
        lastError: 'test',
        messageId: null,
        sentAt: null,
      });
      return {
        url: `/api/marking/${w.submission.id}/resend`,
        params: { submissionId: String(w.submission.id) },
        body: { outboxId: row.id },
      };
    },
  },
  'POST /api/marking/[submissionId]/resubmission': {
    mails: true,
    expect: [401, 403, 403, 200, 403, 200, 403, 200],
    call: async (w) => {
      const s = await freshSubmission(w, 'submitted');
      return {
        url: `/api/marking/${s.id}/resubmission`,
        params: { submissionId: String(s.id) },
        body: { message: 'Please redo the band centre.', version: s.version },
      };
    },
  },
  'GET /api/moderation': {
    expect: [401, 403, 403, 403, 403, 200, 403, 200],
    call: (w) => ({ url: `/api/moderation?courseId=${w.course.id}` }),
  },
  'POST /api/moderation/[submissionId]': {
    expect: [401, 403, 403, 403, 403, 200, 403, 200],
    call: async (w) => {
      const s = await freshSubmission(w, 'marked');
      return {
        url: `/api/moderation/${s.id}`,
        params: { submissionId: String(s.id) },
        body: { decision: 'confirmed', version: s.version },
      };
    },
  },
  'POST /api/release': {
    mails: true,
    expect: [401, 403, 403, 200, 403, 200, 403, 200],
    call: async (w) => {
      const s = await freshSubmission(w, 'marked');
      return { url: '/api/release', body: { submissionIds: [s.id] } };
    },
  },
  'POST /api/practicals/markdown': {
    // Staff who set practicals up anywhere (instructors, leads, admins); TAs and students not.
    expect: [401, 403, 403, 403, 403, 200, 200, 200],
    call: () => ({ url: '/api/practicals/markdown', body: { markdown: '# Band\n\nRecord the *fundamental*.' } }),
  },
  'GET /api/practicals/[practicalId]': {
    expect: [401, 403, 403, 403, 403, 200, 403, 200],
    call: (w) => ({ url: `/api/practicals/${w.practical.id}`, params: { practicalId: String(w.practical.id) } }),
  },
  'PUT /api/practicals/[practicalId]': {
    expect: [401, 403, 403, 403, 403, 200, 403, 200],
    call: (w) => ({
      url: `/api/practicals/${w.setup.id}`,
      params: { practicalId: String(w.setup.id) },
      body: {
        title: w.setup.title,
        species: w.setup.species,
        instructions: w.setup.instructions,
        hazardNotes: w.setup.hazardNotes,
        mode: w.setup.mode,
        maxAttempts: w.setup.maxAttempts,
        lateRule: w.setup.lateRule,
        latePenaltyPerDay: w.setup.latePenaltyPerDay,
        latePenaltyCap: w.setup.latePenaltyCap,
        rubric: w.setup.rubric,
        deadlines: [],
      },
    }),
  },
  'PUT /api/practicals/[practicalId]/bands': {
    // The same band again on the practical with checked work, keeping its results (recheck: false).
    expect: [401, 403, 403, 403, 403, 200, 403, 200],
    call: (w) => ({
      url: `/api/practicals/${w.practical.id}/bands`,
      params: { practicalId: String(w.practical.id) },
      body: {
        quantityDefinitionId: w.defs['bandCentre:H35Cl'].id,
        cohortId: null,
        basis: 'accuracy',
        kind: 'absolute',
        inner: 2,
        outer: 5,
        unit: 'cm-1',
        recheck: false,
      },
    }),
  },
  'DELETE /api/practicals/[practicalId]/bands': {
    expect: [401, 403, 403, 403, 403, 200, 403, 200],
    call: async (w) => {
      const [band] = await models().ToleranceBand.findOrCreate({
        where: { quantityDefinitionId: w.setupQuantity.id, cohortId: w.cohort.id, basis: 'accuracy' },
        defaults: {
          quantityDefinitionId: w.setupQuantity.id,
          cohortId: w.cohort.id,
          basis: 'accuracy',
          kind: 'absolute',
          inner: 1,
          outer: null,
          unit: 'cm-1',
          updatedById: null,
        },
      });
      return { url: `/api/practicals/${w.setup.id}/bands`, params: { practicalId: String(w.setup.id) }, body: { bandId: band.id } };
    },
  },
  'GET /api/practicals/[practicalId]/spectrum-settings': {
    expect: [401, 403, 403, 403, 403, 200, 403, 200],
    call: (w) => ({ url: `/api/practicals/${w.practical.id}/spectrum-settings`, params: { practicalId: String(w.practical.id) } }),
  },
  'PUT /api/practicals/[practicalId]/spectrum-settings': {
    expect: [401, 403, 403, 403, 403, 200, 403, 200],
    call: (w) => ({
      url: `/api/practicals/${w.setup.id}/spectrum-settings`,
      params: { practicalId: String(w.setup.id) },
      body: { spectrumAnalysis: true, samples: null },
    }),
  },
  'POST /api/practicals/[practicalId]/copy': {
    expect: [401, 403, 403, 403, 403, 201, 403, 201],
    call: (w) => ({
      url: `/api/practicals/${w.setup.id}/copy`,
      params: { practicalId: String(w.setup.id) },
      body: { title: 'Matrix copy', cohortMap: {}, deadlines: [] },
    }),
  },
  'POST /api/practicals/[practicalId]/preview': {
    expect: [401, 403, 403, 403, 403, 200, 403, 200],
    call: (w) => ({
      url: `/api/practicals/${w.practical.id}/preview`,
      params: { practicalId: String(w.practical.id) },
      body: { quantityDefinitionId: w.defs['bandCentre:H35Cl'].id, cohortId: w.cohort.id, value: 2886.0, unit: 'cm-1' },
    }),
  },
  'POST /api/practicals/[practicalId]/quantities': {
    expect: [401, 403, 403, 403, 403, 201, 403, 201],
    call: async (w) => {
      await models().QuantityDefinition.destroy({ where: { practicalId: w.setup.id, key: 'B1' } });
      return {
        url: `/api/practicals/${w.setup.id}/quantities`,
        params: { practicalId: String(w.setup.id) },
        body: {
          key: 'B1',
          species: 'H35Cl',
          unit: 'cm-1',
          marks: 1,
          uncertaintyRequired: false,
          referenceKind: 'department',
          referenceValue: 10.1,
          referenceNote: 'Matrix test value (invented).',
        },
      };
    },
  },
  'PUT /api/practicals/[practicalId]/quantities/[quantityId]': {
    expect: [401, 403, 403, 403, 403, 200, 403, 200],
    call: (w) => ({
      url: `/api/practicals/${w.setup.id}/quantities/${w.setupQuantity.id}`,
      params: { practicalId: String(w.setup.id), quantityId: String(w.setupQuantity.id) },
      body: { key: 'bandCentre', species: 'H35Cl', unit: 'cm-1', marks: 2, uncertaintyRequired: true, referenceKind: 'literature' },
    }),
  },
  'DELETE /api/practicals/[practicalId]/quantities/[quantityId]': {
    expect: [401, 403, 403, 403, 403, 200, 403, 200],
    call: async (w) => {
      const [q] = await models().QuantityDefinition.findOrCreate({
        where: { practicalId: w.setup.id, key: 'B0', species: 'H35Cl' },
        defaults: {
          practicalId: w.setup.id,
          key: 'B0',
          species: 'H35Cl',
          unit: 'cm-1',
          marks: 1,
          uncertaintyRequired: false,
          referenceKind: 'literature',
          referenceValueSI: null,
          referenceNote: null,
          position: 9,
        },
      });
      return {
        url: `/api/practicals/${w.setup.id}/quantities/${q.id}`,
        params: { practicalId: String(w.setup.id), quantityId: String(q.id) },
      };
    },
  },
  // Statistics of one cohort: its TA and the course's managers; a TA of another cohort not.
  'GET /api/statistics/practicals/[id]': {
    expect: [401, 403, 403, 200, 403, 200, 403, 200],
    call: (w) => ({ url: `/api/statistics/practicals/${w.practical.id}?cohortId=${w.cohort.id}`, params: { id: String(w.practical.id) } }),
  },
  'GET /api/statistics/practicals/[id]/compare': {
    // Side by side over the cohorts the caller may see: each TA sees the cohort they mark.
    expect: [401, 403, 403, 200, 200, 200, 403, 200],
    call: (w) => ({ url: `/api/statistics/practicals/${w.practical.id}/compare?by=cohort`, params: { id: String(w.practical.id) } }),
  },
  'GET /api/statistics/practicals/[id]/export/marks': {
    // Records export: managers only, not TAs.
    expect: [401, 403, 403, 403, 403, 200, 403, 200],
    call: (w) => ({
      url: `/api/statistics/practicals/${w.practical.id}/export/marks?cohortId=${w.cohort.id}`,
      params: { id: String(w.practical.id) },
    }),
  },
  'GET /api/statistics/practicals/[id]/export/statistics': {
    expect: [401, 403, 403, 200, 403, 200, 403, 200],
    call: (w) => ({
      url: `/api/statistics/practicals/${w.practical.id}/export/statistics?cohortId=${w.cohort.id}`,
      params: { id: String(w.practical.id) },
    }),
  },
  'GET /api/statistics/practicals/[id]/export/summary': {
    expect: [401, 403, 403, 200, 403, 200, 403, 200],
    call: (w) => ({
      url: `/api/statistics/practicals/${w.practical.id}/export/summary?cohortId=${w.cohort.id}`,
      params: { id: String(w.practical.id) },
    }),
  },
  'GET /api/submissions/[id]': {
    expect: [401, 200, 403, 200, 403, 200, 403, 200],
    call: (w) => ({ url: `/api/submissions/${w.submission.id}`, params: { id: String(w.submission.id) } }),
  },
  'GET /api/submissions/[id]/feedback': {
    expect: [401, 200, 403, 200, 403, 200, 403, 200],
    call: (w) => ({ url: `/api/submissions/${w.released.id}/feedback`, params: { id: String(w.released.id) } }),
  },
  'GET /api/submissions/[id]/spectrum': {
    expect: [401, 200, 403, 200, 403, 200, 403, 200],
    call: (w) => ({ url: `/api/submissions/${w.submission.id}/spectrum`, params: { id: String(w.submission.id) } }),
  },
  'GET /api/submissions/[id]/spectrum-lines': {
    // The student's own draft only ('allowed': 200 once a spectrum is uploaded, 404 before).
    expect: [401, 'allowed', 403, 403, 403, 403, 403, 403],
    call: (w) => ({ url: `/api/submissions/${w.draftC.id}/spectrum-lines`, params: { id: String(w.draftC.id) } }),
  },
  'POST /api/submissions/[id]/submit': {
    // Only the student themself; not even an admin submits for them. One real submit (201).
    expect: [401, 201, 403, 403, 403, 403, 403, 403],
    call: async (w) => ({
      url: `/api/submissions/${w.draftB.id}/submit`,
      params: { id: String(w.draftB.id) },
      body: { version: await version(w.draftB.id), draft: w.draftB.draft },
    }),
  },
  'POST /api/submissions/check': {
    // The same callers as autosave: only a student of a cohort the practical is set for. Writes nothing.
    expect: [401, 200, 403, 403, 403, 403, 403, 403],
    call: (w) => ({
      url: '/api/submissions/check',
      body: { practicalId: w.draftC.practicalId, draft: { species: {}, spectrumUploadId: null, reportUploadId: null } },
    }),
  },
  'PUT /api/submissions/draft': {
    // Practical C is set only for `student`'s cohort: the other cohort's student is refused too.
    expect: [401, 200, 403, 403, 403, 403, 403, 403],
    call: (w) => ({
      url: '/api/submissions/draft',
      body: { practicalId: w.draftC.practicalId, draft: { species: {}, spectrumUploadId: null, reportUploadId: null } },
    }),
  },
  'POST /api/uploads': {
    expect: [401, 201, 403, 403, 403, 403, 403, 403],
    call: (w) => {
      const form = new FormData();
      form.set('submissionId', String(w.draftC.id));
      form.set('kind', 'spectrum');
      form.set('file', new Blob([new Uint8Array(JCAMP)]), 'matrix.jdx');
      return { url: '/api/uploads', rawBody: form };
    },
  },
  'GET /api/uploads/[id]': {
    expect: [401, 200, 403, 200, 403, 200, 403, 200],
    call: (w) => ({ url: `/api/uploads/${w.spectrumUpload.id}`, params: { id: String(w.spectrumUpload.id) } }),
  },
  // The learning-platform connection (lib/lti). Login and launch are public by design (the platform
  // calls them across sites; the token and the browser-bound state are the proof), so every caller
  // gets the same refusal page for a request without a valid launch.
  'GET /api/lti/jwks': {
    expect: [200, 200, 200, 200, 200, 200, 200, 200],
    call: () => ({ url: '/api/lti/jwks' }),
  },
  'GET /api/lti/login': {
    expect: [400, 400, 400, 400, 400, 400, 400, 400],
    call: () => ({ url: '/api/lti/login?login_hint=x' }),
  },
  'POST /api/lti/login': {
    expect: [400, 400, 400, 400, 400, 400, 400, 400],
    call: () => ({ url: '/api/lti/login', rawBody: 'login_hint=x', headers: { 'content-type': 'application/x-www-form-urlencoded' } }),
  },
  'POST /api/lti/launch': {
    expect: [401, 401, 401, 401, 401, 401, 401, 401],
    call: () => ({
      url: '/api/lti/launch',
      rawBody: 'id_token=x.y.z&state=not-this-browsers&oscillab_relay=1',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
    }),
  },
  'POST /api/lti/deep-link': {
    // Signed in, then the ticket (bound to the account that launched) decides: a forged one is a 400 for everyone.
    expect: [401, 400, 400, 400, 400, 400, 400, 400],
    call: () => ({
      url: '/api/lti/deep-link',
      rawBody: 't=forged&practicalId=1',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
    }),
  },
  'GET /api/lti/registrations': {
    expect: [401, 403, 403, 403, 403, 403, 403, 200],
    call: () => ({ url: '/api/lti/registrations' }),
  },
  'POST /api/lti/registrations': {
    expect: [401, 403, 403, 403, 403, 403, 403, 201],
    call: (_w, role) => ({ url: '/api/lti/registrations', body: { ...LTI_REGISTRATION, issuer: `https://matrix-${uniq(role)}.example` } }),
  },
  'PATCH /api/lti/registrations/[registrationId]': {
    expect: [401, 403, 403, 403, 403, 403, 403, 200],
    call: async (w) => {
      const { registrationId } = await ltiRows(w);
      return {
        url: `/api/lti/registrations/${registrationId}`,
        params: { registrationId: String(registrationId) },
        body: { name: LTI_REGISTRATION.name },
      };
    },
  },
  'DELETE /api/lti/registrations/[registrationId]': {
    expect: [401, 403, 403, 403, 403, 403, 403, 200],
    call: async (_w, role) => {
      const row = await createRegistration({ ...LTI_REGISTRATION, issuer: `https://matrix-del-${uniq(role)}.example` }, null);
      return { url: `/api/lti/registrations/${row.id}`, params: { registrationId: String(row.id) } };
    },
  },
  'GET /api/lti/keys': {
    expect: [401, 403, 403, 403, 403, 403, 403, 200],
    call: () => ({ url: '/api/lti/keys' }),
  },
  'POST /api/lti/keys': {
    expect: [401, 403, 403, 403, 403, 403, 403, 201],
    call: () => ({ url: '/api/lti/keys' }),
  },
  'POST /api/lti/contexts': {
    expect: [401, 403, 403, 403, 403, 403, 403, 201],
    call: async (w, role) => {
      const { registrationId } = await ltiRows(w);
      return { url: '/api/lti/contexts', body: { registrationId, contextId: `matrix-${uniq(role)}`, courseId: w.course.id } };
    },
  },
  'PATCH /api/lti/contexts/[contextId]': {
    // The cohort for arrivals is the course managers' choice.
    expect: [401, 403, 403, 403, 403, 200, 403, 200],
    call: async (w) => {
      const { contextId } = await ltiRows(w);
      return { url: `/api/lti/contexts/${contextId}`, params: { contextId: String(contextId) }, body: { defaultCohortId: w.cohort.id } };
    },
  },
  'DELETE /api/lti/contexts/[contextId]': {
    expect: [401, 403, 403, 403, 403, 403, 403, 200],
    call: async (w, role) => {
      const { registrationId } = await ltiRows(w);
      const row = await models().LtiContext.create({
        registrationId,
        contextId: `matrix-del-${uniq(role)}`,
        courseId: w.course.id,
        defaultCohortId: null,
        title: null,
        membershipsUrl: null,
        lineItemsUrl: null,
        agsScopes: null,
        rosterSyncedAt: null,
      });
      return { url: `/api/lti/contexts/${row.id}`, params: { contextId: String(row.id) } };
    },
  },
  'GET /api/lti/contexts/[contextId]/roster': {
    // Managers get past authorisation to "the platform has not offered its roster yet" (409).
    expect: [401, 403, 403, 403, 403, 409, 403, 409],
    call: async (w) => {
      const { contextId } = await ltiRows(w);
      return { url: `/api/lti/contexts/${contextId}/roster`, params: { contextId: String(contextId) } };
    },
  },
  'POST /api/lti/contexts/[contextId]/roster': {
    expect: [401, 403, 403, 403, 403, 409, 403, 409],
    call: async (w) => {
      const { contextId } = await ltiRows(w);
      return {
        url: `/api/lti/contexts/${contextId}/roster`,
        params: { contextId: String(contextId) },
        body: { fingerprint: '0'.repeat(32) },
      };
    },
  },
  'GET /api/lti/submissions/[submissionId]/scores': {
    expect: [401, 403, 403, 200, 403, 200, 403, 200],
    call: (w) => ({ url: `/api/lti/submissions/${w.submission.id}/scores`, params: { submissionId: String(w.submission.id) } }),
  },
  'POST /api/lti/scores/[scoreId]/resend': {
    expect: [401, 403, 403, 200, 403, 200, 403, 200],
    call: async (w, role) => {
      const { contextId } = await ltiRows(w);
      const row = await models().LtiScoreOutbox.create({
        dedupeKey: `matrix-score:${uniq(role)}`,
        ltiContextId: contextId,
        practicalId: w.submission.practicalId,
        submissionId: w.submission.id,
        userId: w.people.student.id,
        platformUserId: 'matrix-user',
        scoreGiven: 1,
        scoreMaximum: 2,
        comment: null,
        scoredAt: new Date(),
        lineItemUrl: null,
        status: 'failed',
        attempts: 12,
        nextAttemptAt: new Date(),
        lockedUntil: null,
        lastError: 'test',
        sentAt: null,
      });
      return { url: `/api/lti/scores/${row.id}/resend`, params: { scoreId: String(row.id) } };
    },
  },
  // Signing out needs no session (signed out already, it just clears the cookie); each caller's
  // session id is random, so ending it here does not touch the sessions of later calls.
  'POST /api/me/sign-out': {
    expect: [303, 303, 303, 303, 303, 303, 303, 303],
    call: () => ({ url: '/api/me/sign-out', rawBody: '', headers: { 'content-type': 'application/x-www-form-urlencoded' } }),
  },
  // Kept last: each call ends the caller's sessions (their cookies here carry session version 0), so
  // the versions are put back before every call, and no later case runs with the last one raised.
  'POST /api/me/sign-out-everywhere': {
    expect: [401, 200, 200, 200, 200, 200, 200, 200],
    call: async () => {
      await models().User.update({ sessionVersion: 0 }, { where: {} });
      return { url: '/api/me/sign-out-everywhere' };
    },
  },
};

let world: FixtureWorld;
let handlers: RouteHandler[];

beforeAll(async () => {
  process.env.RESET_MIN_ANSWER_MS = '0';
  handlers = await routeHandlers();
  world = await buildFixtureWorld();
});

const userId = (role: Role): number | null => (role === 'anonymous' ? null : world.people[role].id);

/**
 * Wait until the background outbox run a route started has sent everything due (at most 10 s).
 * On SQLite a write committed by that run while a later call's transaction is open makes the
 * later transaction fail with SQLITE_BUSY: lib/db opens deferred transactions, whose read snapshot
 * cannot be upgraded to a write once another connection has written (busy_timeout does not help).
 * That is concurrency (issue 8 item 5/6), not authorisation, so the cases here must not overlap with it.
 */
async function settleOutbox() {
  const { Op } = await import('sequelize');
  // Our own run sends whatever is due (claim() keeps the two runs from sending a row twice)…
  await deliverOutbox();
  // …and then we wait for the background run to finish the row it may still be sending.
  const end = Date.now() + 10_000;
  while (Date.now() < end) {
    const due = await models().EmailOutbox.count({
      where: { [Op.or]: [{ status: 'sending' }, { status: 'queued', nextAttemptAt: { [Op.lte]: new Date() } }] },
    });
    if (due === 0) return;
    await new Promise((r) => setTimeout(r, 50));
  }
}

function matches(expected: Expected, status: number) {
  return expected === 'allowed' ? status !== 401 && status !== 403 && status < 500 : status === expected;
}

describe('authorisation matrix', () => {
  it('has exactly one entry (or a reasoned skip) for every route handler in app/api', () => {
    const found = handlers.map((h) => h.key).sort();
    const listed = [...Object.keys(MATRIX), ...Object.keys(SKIPPED)].sort();
    expect({ missingFromMatrix: found.filter((k) => !listed.includes(k)), noSuchRoute: listed.filter((k) => !found.includes(k)) }).toEqual({
      missingFromMatrix: [],
      noSuchRoute: [],
    });
    expect(Object.keys(MATRIX).filter((k) => k in SKIPPED)).toEqual([]);
  });

  it('there are no server actions (a new one needs rows here, authorised through authorizePage)', () => {
    expect(serverActionFiles()).toEqual([]);
  });

  for (const [key, c] of Object.entries(MATRIX)) {
    it(key, async () => {
      const handler = handlers.find((h) => h.key === key);
      expect(handler, `${key} is not a route handler in app/api`).toBeDefined();
      const method = key.split(' ')[0];
      const actual: Record<string, number | string> = {};
      const wanted: Record<string, number | string> = {};
      for (const [i, role] of ROLES.entries()) {
        const call = await c.call(world, role);
        const request = await apiRequest(call.url, {
          method,
          as: userId(role),
          body: call.body,
          rawBody: call.rawBody,
          headers: call.headers,
        });
        const res = await handler!.handler(request, call.params ? params(call.params) : {});
        const exp = c.expect[i];
        let detail = '';
        if (!matches(exp, res.status) && (res.headers.get('content-type') ?? '').includes('json'))
          detail = ` ${JSON.stringify(await res.json()).slice(0, 200)}`;
        else await res.arrayBuffer();
        if (c.mails) await settleOutbox();
        actual[role] = matches(exp, res.status) ? exp : `${res.status}${detail}`;
        wanted[role] = exp;
      }
      expect(actual).toEqual(wanted);
    });
  }
});
