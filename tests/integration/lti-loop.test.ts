/**
 * The whole loop with the learning platform (issue 18), against the local stand-in running in its own
 * process and Oscillab's route handlers served over HTTP: register → connect the course → deep link
 * → instructor launch → roster sync → student launch → submit → mark → release → score received;
 * then the grade service down during a release (scores wait, then arrive once each), and key
 * rotation on both sides. The browser is a small cookie jar that applies SameSite=Lax as browsers do.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { apiRequest, params } from '@/tests/helpers/session';
import { buildWorld, type World } from '@/tests/helpers/world';
import { Browser, serveHandlers, startFakePlatform, testPorts, type FakePlatform, type Page } from '@/tests/helpers/fake-platform';
import { JCAMP, PDF, correctValues, uploadAs } from '@/tests/helpers/fixture-world';
import { tableChecksums } from '@/tests/helpers/routes';
import { buildPractical, draftFor } from '@/tests/fixtures/submissions/practical';
import { models } from '@/models';
import { acceptProposal, saveMarks } from '@/lib/marking/marks';
import { createCheckedSubmission } from '@/lib/marking/test-fixtures';
import { deliverScores } from '@/lib/lti/scores';
import { forgetAccessTokens } from '@/lib/lti/services';
import { forgetPlatformKeys } from '@/lib/lti/platform-keys';
import * as jwks from '@/app/api/lti/jwks/route';
import * as login from '@/app/api/lti/login/route';
import * as launch from '@/app/api/lti/launch/route';
import * as deepLink from '@/app/api/lti/deep-link/route';
import * as roster from '@/app/api/lti/contexts/[contextId]/roster/route';
import * as registrations from '@/app/api/lti/registrations/route';
import * as contexts from '@/app/api/lti/contexts/route';
import * as keys from '@/app/api/lti/keys/route';
import * as me from '@/app/api/me/route';
import { PUT as saveDraft } from '@/app/api/submissions/draft/route';
import { POST as submitRoute } from '@/app/api/submissions/[id]/submit/route';
import { POST as releaseRoute } from '@/app/api/release/route';

const PORTS = testPorts(0);
process.env.NEXTAUTH_URL = `http://localhost:${PORTS.oscillab}`;
process.env.LTI_KEYSET_COOLDOWN_MS = '0';
const OSCILLAB = process.env.NEXTAUTH_URL;

// People of the stand-in's invented course (scripts/fake-platform.ts).
const P = {
  instructor: 'nmu-8f31c0',
  ta: 'nmu-2b77d4',
  amara: 'nmu-40d1b8',
  bram: 'nmu-40d1b9',
  celeste: 'nmu-40d1ba',
  ottilie: 'nmu-77e0f5',
  mentor: 'nmu-c3b6a0',
};
const CONTEXT_ID = 'nmu-chem2041-2026';

let platform: FakePlatform;
let server: { url: string; close: () => Promise<void> };
let w: World;
let practicalId: number;
let ltiContextId: number;
let itemId: string;

const follow = (url: string) => url.startsWith(platform.url) || url.startsWith(`${OSCILLAB}/api/`);

/** From a launch-as on the platform to wherever Oscillab sends the person (relay included). */
async function launchAs(browser: Browser, user: string, target: { item?: string; deeplink?: true }): Promise<Page> {
  const form: Record<string, string> = { user, mode: 'window', ...(target.item ? { item: target.item } : { deeplink: '1' }) };
  let page = await browser.go(`${platform.url}/as`, { form, initiator: `${platform.url}/`, follow });
  expect(page.url).toBe(`${platform.url}/auth?${new URL(page.url).searchParams}`);
  page = await browser.submit(page, {}, follow); // the platform's form_post to the launch URL (cross-site: no state cookie)
  expect(page.html).toContain('oscillab_relay'); // Oscillab's same-site relay of the same fields
  return browser.submit(page, {}, follow);
}

const session = (b: Browser) => b.cookie('localhost', 'next-auth.session-token');
const asCookie = (b: Browser) => ({ cookie: `next-auth.session-token=${session(b)}` });

beforeAll(async () => {
  server = await serveHandlers(PORTS.oscillab, [
    ['GET', /^\/api\/lti\/jwks$/, jwks.GET],
    ['GET', /^\/api\/lti\/login$/, login.GET],
    ['POST', /^\/api\/lti\/login$/, login.POST],
    ['POST', /^\/api\/lti\/launch$/, launch.POST],
    ['POST', /^\/api\/lti\/deep-link$/, deepLink.POST],
    ['GET', /^\/api\/lti\/contexts\/(\d+)\/roster$/, roster.GET as never, ['contextId']],
    ['POST', /^\/api\/lti\/contexts\/(\d+)\/roster$/, roster.POST as never, ['contextId']],
    ['GET', /^\/api\/me$/, me.GET],
  ]);
  platform = await startFakePlatform(PORTS.platform, OSCILLAB);
  w = await buildWorld();
  practicalId = (await buildPractical(w)).practical.id;
}, 60_000);

afterAll(async () => {
  await platform?.stop();
  await server?.close();
  forgetPlatformKeys();
  forgetAccessTokens();
});

describe('the whole loop with the learning platform', () => {
  const instructor = new Browser();
  const student = new Browser();

  it('the site administrator registers the platform and connects its course', async () => {
    const reg = await registrations.POST(
      await apiRequest('/api/lti/registrations', {
        as: w.people.admin.id,
        body: {
          name: 'Northmere learning platform',
          issuer: platform.url,
          clientId: 'oscillab-northmere',
          deploymentIds: ['northmere-main'],
          authLoginUrl: `${platform.url}/auth`,
          authTokenUrl: `${platform.url}/token`,
          keySetUrl: `${platform.url}/jwks`,
        },
      }),
      {},
    );
    expect(reg.status).toBe(201);
    const { id: registrationId } = await reg.json();
    const ctx = await contexts.POST(
      await apiRequest('/api/lti/contexts', {
        as: w.people.admin.id,
        body: { registrationId, contextId: CONTEXT_ID, courseId: w.course.id, defaultCohortId: w.cohort.id },
      }),
      {},
    );
    expect(ctx.status).toBe(201);
    ltiContextId = (await ctx.json()).id;
    // Not for an instructor: registering is the administrator's.
    expect(
      (await registrations.POST(await apiRequest('/api/lti/registrations', { as: w.people.instructor.id, body: {} }), {})).status,
    ).toBe(403);
  });

  it('the instructor places an item by deep linking: Oscillab signs the answer, the platform checks it against Oscillab’s key set', async () => {
    const page = await launchAs(instructor, P.instructor, { deeplink: true });
    expect(page.status).toBe(303);
    const chooser = new URL(page.url);
    expect(chooser.pathname).toBe('/lti/deep-link');
    expect(session(instructor)).toBeTruthy();
    // What the chooser page's form posts (the page itself is covered by the browser test).
    const answer = await instructor.go(`${OSCILLAB}/api/lti/deep-link`, {
      form: { t: chooser.searchParams.get('t')!, practicalId: String(practicalId) },
      initiator: page.url,
      follow,
    });
    expect(answer.status).toBe(200);
    const placed = await instructor.submit(answer, {}, follow);
    expect(placed.html).toContain('Item placed');
    const state = await platform.state();
    const item = state.items.find((i) => i.custom.oscillab_practical === String(practicalId))!;
    expect(item).toBeDefined();
    itemId = item.id;
    const lineItem = state.lineItems.find((l) => l.id === item.lineItemId)!;
    expect(lineItem.resourceId).toBe(`oscillab-practical-${practicalId}`);
    // 3 quantities × 2 marks + the 2-mark rubric item (tests/fixtures/submissions/practical.ts)
    expect(lineItem.scoreMaximum).toBe(8);
  });

  it('the instructor launch signs them in as instructor of this course only, and shows the roster that differs', async () => {
    const page = await launchAs(instructor, P.instructor, { item: itemId });
    const landing = new URL(page.url);
    expect(landing.pathname).toBe(`/courses/${w.course.id}/learning-platform`);
    expect(landing.searchParams.get('next')).toBe(`/courses/${w.course.id}/practicals/${practicalId}`);
    const who = await (await me.GET(new Request(`${OSCILLAB}/api/me`, { headers: asCookie(instructor) }), {})).json();
    expect(who.email).toBe('instructor1@northmere.example');
    expect(who.memberships).toEqual([{ courseId: w.course.id, role: 'instructor', cohortId: null }]);
    const ctx = (await models().LtiContext.findByPk(ltiContextId))!;
    expect(ctx.membershipsUrl).toContain('/memberships');
    expect(ctx.lineItemsUrl).toContain('/lineitems');
  });

  it('roster sync: the preview writes nothing; confirming adds, renames and ends roles as shown', async () => {
    const before = await tableChecksums();
    const previewRes = await roster.GET(
      new Request(`${OSCILLAB}/api/lti/contexts/${ltiContextId}/roster`, { headers: asCookie(instructor) }),
      params({ contextId: String(ltiContextId) }),
    );
    expect(previewRes.status).toBe(200);
    const preview = await previewRes.json();
    expect(await tableChecksums()).toEqual(before);
    const status = (sub: string) => preview.rows.find((r: { sub: string }) => r.sub === sub)?.status;
    // Learners, the TA, the content developer and the course administrator are new; the instructor launched already.
    expect(preview.counts).toMatchObject({ new: 8, changed: 0, leaving: 0, unchanged: 1 });
    expect(status(P.instructor)).toBe('unchanged');
    expect(status(P.mentor)).toBe('not-taken');
    expect(status('nmu-40d1bc')).toBe('not-taken'); // inactive on the platform and not in the course

    const confirm = (fingerprint: string) =>
      roster.POST(
        new Request(`${OSCILLAB}/api/lti/contexts/${ltiContextId}/roster`, {
          method: 'POST',
          headers: { ...asCookie(instructor), origin: OSCILLAB, 'content-type': 'application/json' },
          body: JSON.stringify({ fingerprint }),
        }),
        params({ contextId: String(ltiContextId) }),
      );
    const stale = await confirm('0'.repeat(32));
    expect(stale.status).toBe(409);
    expect(await tableChecksums()).toEqual(before);
    const done = await confirm(preview.fingerprint);
    expect(done.status).toBe(200);
    expect((await done.json()).applied).toMatchObject({ added: 8, removed: 0 });
    const { User, CourseMembership } = models();
    const amara = (await User.findOne({ where: { email: 'student01@northmere.example' } }))!;
    expect(await CourseMembership.findOne({ where: { userId: amara.id, courseId: w.course.id } })).toMatchObject({
      role: 'student',
      cohortId: w.cohort.id,
    });
    const tomas = (await User.findOne({ where: { email: 'ta3@northmere.example' } }))!;
    expect((await CourseMembership.findAll({ where: { userId: tomas.id } })).map((m) => [m.courseId, m.role])).toEqual([
      [w.course.id, 'ta'],
    ]);

    // On the platform: Celeste withdraws, Bram's name changes.
    await platform.control('users', { set: { id: P.celeste, status: 'Inactive' } });
    await platform.control('users', { set: { id: P.bram, name: 'Bram Hartigan' } });
    const again = await (
      await roster.GET(
        new Request(`${OSCILLAB}/api/lti/contexts/${ltiContextId}/roster`, { headers: asCookie(instructor) }),
        params({ contextId: String(ltiContextId) }),
      )
    ).json();
    expect(again.counts).toMatchObject({ new: 0, changed: 1, leaving: 1 });
    const applied = await (await confirm(again.fingerprint)).json();
    expect(applied.applied).toMatchObject({ renamed: 1, removed: 1 });
    const celeste = (await User.findOne({ where: { email: 'student03@northmere.example' } }))!;
    expect(await CourseMembership.count({ where: { userId: celeste.id, courseId: w.course.id } })).toBe(0);
  });

  it('the student launch lands on the practical; they submit, are marked and released, and the score reaches the gradebook once', async () => {
    const page = await launchAs(student, P.amara, { item: itemId });
    expect(new URL(page.url).pathname).toBe(`/student/practicals/${practicalId}`);
    const who = await (await me.GET(new Request(`${OSCILLAB}/api/me`, { headers: asCookie(student) }), {})).json();
    expect(who.email).toBe('student01@northmere.example');
    const amaraId: number = who.id;

    // Submit with the session the launch issued.
    const call = (path: string, method: string, body: unknown) =>
      new Request(new URL(path, OSCILLAB), {
        method,
        headers: { ...asCookie(student), origin: OSCILLAB, 'content-type': 'application/json' },
        body: JSON.stringify(body),
      });
    const draft = draftFor('H35Cl', correctValues());
    const saved = await saveDraft(call('/api/submissions/draft', 'PUT', { practicalId, draft }), {});
    expect(saved.status).toBe(200);
    const savedBody = await saved.json();
    const spectrum = await (await uploadAs(amaraId, savedBody.id, 'spectrum', 'hcl.jdx', JCAMP)).json();
    const report = await (await uploadAs(amaraId, savedBody.id, 'report', 'report.pdf', PDF)).json();
    const submitted = await submitRoute(
      call(`/api/submissions/${savedBody.id}/submit`, 'POST', {
        version: report.version,
        draft: { ...draft, spectrumUploadId: spectrum.id, reportUploadId: report.id },
      }),
      params({ id: String(savedBody.id) }),
    );
    expect(submitted.status).toBe(201);
    const submissionId: number = (await submitted.json()).result.id;

    const sub = (await models().Submission.findByPk(submissionId))!;
    const r = await acceptProposal(w.people.ta.id, submissionId, sub.version);
    await saveMarks(w.people.ta.id, submissionId, { version: r.version, items: [{ itemKey: 'rubric:discussion', awarded: 2 }] });
    const released = await releaseRoute(
      await apiRequest('/api/release', { as: w.people.instructor.id, body: { submissionIds: [submissionId] } }),
      {},
    );
    expect((await released.json()).released).toBe(1);
    const marked = (await models().Submission.findByPk(submissionId))!;
    const queued = await models().LtiScoreOutbox.findAll({ where: { submissionId } });
    expect(queued.map((q) => [q.status, q.platformUserId, q.scoreGiven, q.scoreMaximum])).toEqual([
      ['queued', P.amara, marked.awardedTotal, 8],
    ]);

    expect(await deliverScores()).toMatchObject({ sent: 1, failed: 0, remaining: 0 });
    const state = await platform.state();
    const results = state.results.filter((x) => x.userId === P.amara);
    expect(results).toHaveLength(1);
    expect(results[0]).toMatchObject({
      scoreGiven: marked.awardedTotal,
      scoreMaximum: 8,
      activityProgress: 'Completed',
      gradingProgress: 'FullyGraded',
    });
    expect(results[0].comment).toBe(`Feedback: ${OSCILLAB}/student/practicals/${practicalId}`);
    const gradebook = await (await fetch(`${platform.url}/gradebook`)).text();
    expect(gradebook).toContain(`data-score="${marked.awardedTotal}"`);
    expect(await deliverScores()).toMatchObject({ sent: 0 });
    expect((await platform.state()).deliveries.filter((d) => d.userId === P.amara)).toHaveLength(1);
  });

  it('a launch never grants a role in another course', async () => {
    const { User, CourseMembership } = models();
    const platformPeople = await User.findAll({
      where: { email: ['instructor1@northmere.example', 'student01@northmere.example', 'ta3@northmere.example'] },
    });
    const courses = await CourseMembership.findAll({ where: { userId: platformPeople.map((u) => u.id) } });
    expect(new Set(courses.map((m) => m.courseId))).toEqual(new Set([w.course.id]));
  });
});

describe('the grade service down during a release', () => {
  it('keeps the scores queued with back-off and sends each exactly once when it is back', async () => {
    const { User, LtiScoreOutbox } = models();
    await platform.control('ags', { down: true });
    const ids: number[] = [];
    for (const email of ['student02@northmere.example', 'student61@northmere.example']) {
      const u = (await User.findOne({ where: { email } }))!;
      const s = await createCheckedSubmission({ practicalId, cohortId: w.cohort.id, studentId: u.id });
      const r = await acceptProposal(w.people.ta.id, s.id, s.version);
      await saveMarks(w.people.ta.id, s.id, { version: r.version, items: [{ itemKey: 'rubric:discussion', awarded: 1 }] });
      ids.push(s.id);
    }
    const res = await releaseRoute(await apiRequest('/api/release', { as: w.people.ta.id, body: { submissionIds: ids } }), {});
    expect((await res.json()).released).toBe(2);
    const deliveredBefore = (await platform.state()).deliveries.length;

    const down = await deliverScores();
    expect(down).toMatchObject({ sent: 0, failed: 2, remaining: 2 });
    let rows = await LtiScoreOutbox.findAll({ where: { submissionId: ids } });
    for (const row of rows) {
      expect(row.status).toBe('queued');
      expect(row.attempts).toBe(1);
      expect(row.lastError).toMatch(/503/);
      expect(row.nextAttemptAt.getTime()).toBeGreaterThan(Date.now());
    }
    // Not yet due: nothing is tried before the back-off ends.
    expect(await deliverScores()).toMatchObject({ sent: 0, failed: 0, remaining: 2 });

    await platform.control('ags', { down: false });
    const later = () => new Date(Date.now() + 60_000);
    expect(await deliverScores({ now: later })).toMatchObject({ sent: 2, failed: 0, remaining: 0 });
    expect(await deliverScores({ now: later })).toMatchObject({ sent: 0, remaining: 0 });
    rows = await LtiScoreOutbox.findAll({ where: { submissionId: ids } });
    expect(rows.map((r) => r.status)).toEqual(['sent', 'sent']);

    // A worker that died after the platform took a score, before recording it: the row is sent again
    // with the same timestamp, and the platform keeps the score once.
    await LtiScoreOutbox.update({ status: 'sending', lockedUntil: new Date(Date.now() - 1000) }, { where: { id: rows[0].id } });
    expect(await deliverScores()).toMatchObject({ sent: 1 });
    const state = await platform.state();
    const forUser = (sub: string) => state.results.filter((r) => r.userId === sub);
    expect(forUser(P.bram)).toHaveLength(1);
    expect(forUser(P.ottilie)).toHaveLength(1);
    const applied = state.deliveries.slice(deliveredBefore).filter((d) => d.applied);
    expect(applied.map((d) => d.userId).sort()).toEqual([P.bram, P.ottilie].sort());
  });
});

describe('key rotation on both sides', () => {
  it('the platform rotates its key: Oscillab fetches the key set again for the new key id', async () => {
    await platform.control('rotate-key', { drop: true });
    const b = new Browser();
    const page = await launchAs(b, P.ottilie, { item: itemId });
    expect(new URL(page.url).pathname).toBe(`/student/practicals/${practicalId}`);
  });

  it('Oscillab rotates its key: the old one stays published, and the platform accepts what the new one signs', async () => {
    const before = await (await jwks.GET(new Request(`${OSCILLAB}/api/lti/jwks`), {})).json();
    expect(before.keys).toHaveLength(1);
    const rotated = await keys.POST(await apiRequest('/api/lti/keys', { as: w.people.admin.id, method: 'POST' }), {});
    expect(rotated.status).toBe(201);
    const { kid } = await rotated.json();
    const after = await (await jwks.GET(new Request(`${OSCILLAB}/api/lti/jwks`), {})).json();
    expect(after.keys.map((k: { kid: string }) => k.kid)).toEqual([kid, before.keys[0].kid]);

    // A token request signed with the new key (the cached token is dropped to force one), for a
    // practical never placed by deep linking: its line item is made on this first release.
    forgetAccessTokens();
    const { User } = models();
    const amara = (await User.findOne({ where: { email: 'student01@northmere.example' } }))!;
    const second = (await buildPractical(w)).practical;
    const s = await createCheckedSubmission({ practicalId: second.id, cohortId: w.cohort.id, studentId: amara.id });
    const r = await acceptProposal(w.people.ta.id, s.id, s.version);
    await saveMarks(w.people.ta.id, s.id, { version: r.version, items: [{ itemKey: 'rubric:discussion', awarded: 2 }] });
    expect(
      (await (await releaseRoute(await apiRequest('/api/release', { as: w.people.ta.id, body: { submissionIds: [s.id] } }), {})).json())
        .released,
    ).toBe(1);
    expect(await deliverScores()).toMatchObject({ sent: 1, failed: 0 });
    const state = await platform.state();
    const made = state.lineItems.find((l) => l.resourceId === `oscillab-practical-${second.id}`)!;
    expect(made).toMatchObject({ label: second.title });
    expect(state.results.filter((x) => x.lineItemId === made.id).map((x) => x.userId)).toEqual([P.amara]);

    // A deep-linking answer signed with the new key.
    const b = new Browser();
    const page = await launchAs(b, P.instructor, { deeplink: true });
    const t = new URL(page.url).searchParams.get('t')!;
    const answer = await b.go(`${OSCILLAB}/api/lti/deep-link`, {
      form: { t, practicalId: String(practicalId) },
      initiator: page.url,
      follow,
    });
    const jwt = /name="JWT" value="([^"]+)"/.exec(answer.html)![1];
    expect(JSON.parse(Buffer.from(jwt.split('.')[0], 'base64url').toString()).kid).toBe(kid);
    expect((await b.submit(answer, {}, follow)).html).toContain('Item placed');

    // After the grace period the retired key is no longer published.
    process.env.LTI_KEY_GRACE_HOURS = '0';
    try {
      const later = await (await jwks.GET(new Request(`${OSCILLAB}/api/lti/jwks`), {})).json();
      expect(later.keys.map((k: { kid: string }) => k.kid)).toEqual([kid]);
    } finally {
      delete process.env.LTI_KEY_GRACE_HOURS;
    }
  });
});
