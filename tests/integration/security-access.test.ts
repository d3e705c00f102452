/**
 * Security and robustness, round two (issue 14): drafts (item 9), the roster preview across courses
 * (item 5), resend (item 8), the policy for user files (item 6) and the informational items (11):
 * 401 before any lookup, one moderation rule, object-src 'none', the demo on loopback.
 */
import fs from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
// @ts-expect-error Next's own compiled copy of path-to-regexp (the matcher of next.config headers) ships no types
import { pathToRegexp } from 'next/dist/compiled/path-to-regexp';
import { apiRequest, params } from '../helpers/session';
import { routeHandlers, type RouteHandler } from '../helpers/routes';
import { buildFixtureWorld, type FixtureWorld } from '../helpers/fixture-world';
import { waitForMail } from '../helpers/maildev';
import { can, coursesWhere } from '@/lib/authz';
import { loadActor } from '@/lib/auth/session';
import { deliverOutbox, outboxMessageId, RESEND_WINDOW_MS } from '@/lib/mail/outbox';
import { hashPassword } from '@/lib/auth/password';
import { models } from '@/models';
import { uploadPath } from '@/lib/storage';

let w: FixtureWorld;
let handlers: RouteHandler[];
beforeAll(async () => {
  handlers = await routeHandlers();
  w = await buildFixtureWorld();
});
const handler = (key: string) => handlers.find((h) => h.key === key)!.handler;
const call = async (key: string, url: string, as: number | null, p: Record<string, string>, body?: unknown) =>
  handler(key)(await apiRequest(url, { as, method: key.split(' ')[0], body }), params(p));

describe("drafts are the student's own until submitted (item 9)", () => {
  it('staff and the administrator get 404 for a draft through the submission API, as on the marking pages; the student reads it', async () => {
    const id = String(w.draftB.id);
    expect((await models().Submission.findByPk(w.draftB.id))!.status).toBe('draft');
    for (const who of [w.people.ta, w.people.instructor, w.people.lead, w.people.admin]) {
      const res = await call('GET /api/submissions/[id]', `/api/submissions/${id}`, who.id, { id });
      expect(res.status, who.email).toBe(404);
      const spectrum = await call('GET /api/submissions/[id]/spectrum', `/api/submissions/${id}/spectrum`, who.id, { id });
      expect(spectrum.status, who.email).toBe(404);
      const marking = await call('GET /api/marking/[submissionId]', `/api/marking/${id}`, who.id, { submissionId: id });
      expect(marking.status, who.email).toBe(404);
    }
    const own = await call('GET /api/submissions/[id]', `/api/submissions/${id}`, w.people.student.id, { id });
    expect(own.status).toBe(200);
    expect((await own.json()).attempt).toBe(0);
  });

  it('a file uploaded to a draft is not readable by staff either; once submitted, it is', async () => {
    const storedName = `${'d'.repeat(32)}.pdf`;
    fs.writeFileSync(uploadPath(storedName), '%PDF-1.4\n%%EOF\n');
    const draftUpload = await models().Upload.create({
      ownerId: w.people.student.id,
      submissionId: w.draftB.id,
      kind: 'report',
      originalName: 'draft.pdf',
      storedName,
      sha256: 'x'.repeat(64),
      size: 15,
      contentType: 'application/pdf',
    });
    const id = String(draftUpload.id);
    expect((await call('GET /api/uploads/[id]', `/api/uploads/${id}`, w.people.ta.id, { id })).status).toBe(404);
    expect((await call('GET /api/uploads/[id]', `/api/uploads/${id}`, w.people.student.id, { id })).status).toBe(200);
    const submitted = String(w.spectrumUpload.id);
    expect((await call('GET /api/uploads/[id]', `/api/uploads/${submitted}`, w.people.ta.id, { id: submitted })).status).toBe(200);
  });

  it('the rule lives in lib/authz/decision.ts: can() says no to everyone but the student for a draft scope', async () => {
    const scope = { courseId: w.course.id, cohortId: w.cohort.id, studentId: w.people.student.id, draft: true };
    const admin = (await loadActor(w.people.admin.id))!;
    const student = (await loadActor(w.people.student.id))!;
    expect(can(admin, { kind: 'submission-read', ...scope })).toBe(false);
    expect(can(admin, { kind: 'submission-read', ...scope, draft: false })).toBe(true);
    expect(can(student, { kind: 'submission-read', ...scope })).toBe(true);
    expect(can(student, { kind: 'submission-mark', ...scope })).toBe(false);
  });
});

describe('roster preview across courses (item 5)', () => {
  async function preview(csv: string) {
    const req = await apiRequest(`/api/courses/${w.course.id}/roster?mode=preview`, {
      as: w.people.instructor.id,
      method: 'POST',
      rawBody: csv,
      headers: { 'content-type': 'text/csv' },
    });
    const r = await handler('POST /api/courses/[courseId]/roster')(req, params({ courseId: String(w.course.id) }));
    expect(r.status).toBe(200);
    return (await r.json()).rows as { email: string; status: string; reason?: string; newAccount?: boolean }[];
  }

  it('says nothing about an account outside the course: not whether it exists, nor its student number', async () => {
    const { User, Course, Cohort, CourseMembership } = models();
    const elsewhere = await Course.create({ code: `ELSE${w.course.id}`, title: 'Another department', archivedAt: null });
    const cohort = await Cohort.create({ courseId: elsewhere.id, name: 'X', term: 'T', instrument: null, archivedAt: null });
    const outsider = await User.create({
      email: `outsider.${w.course.id}@test.example`,
      name: 'Outsider',
      passwordHash: await hashPassword('outsider-password-1'),
      isAdmin: false,
      studentNumber: 'NM264100',
    });
    await CourseMembership.create({ userId: outsider.id, courseId: elsewhere.id, role: 'student', cohortId: cohort.id });
    const known = await User.create({
      email: `known.${w.course.id}@test.example`,
      name: 'Known',
      passwordHash: null,
      isAdmin: false,
      studentNumber: 'NM264200',
    });
    await CourseMembership.create({ userId: known.id, courseId: elsewhere.id, role: 'student', cohortId: cohort.id });
    const rows = await preview(
      `name,email,student_number,cohort\nOutsider,${outsider.email},ZZZ000,Cohort 1\nSomeone,someone.${w.course.id}@test.example,NM264100,Cohort 1\nNobody,nobody.new.${w.course.id}@test.example,NEW001,Cohort 1\nKnown,${known.email},NM264200,Cohort 1\n`,
    );
    const text = JSON.stringify(rows);
    expect(text).not.toContain('has student number');
    expect(rows[0].status).toBe('invalid');
    expect(rows[0].reason).not.toContain('NM264100');
    expect(rows[1].status).toBe('invalid');
    expect(rows[1].reason).toBe(rows[0].reason); // the same words, whichever of the two did not match
    // A person new to the course reads the same whether or not they have an account elsewhere.
    expect(rows[2]).toMatchObject({ status: 'new' });
    expect(rows[3]).toMatchObject({ status: 'new' });
    expect('newAccount' in rows[2] || 'newAccount' in rows[3]).toBe(false);
  });

  it('still names the student number of someone in this course', async () => {
    const student = w.people.student;
    const rows = await preview(`name,email,student_number,cohort\nStudent,${student.email},WRONG1,Cohort 1\n`);
    expect(rows[0].reason).toContain(`In this course this person has student number ${student.studentNumber}, not WRONG1.`);
  });
});

describe('resend (item 8)', () => {
  it('ten simultaneous clicks queue the message once, and it goes out with its own Message-ID again', async () => {
    const to = `resend.${Date.now()}.${w.course.id}@test.example`;
    const { EmailOutbox } = models();
    const row = await EmailOutbox.create({
      dedupeKey: `resend-test:${w.submission.id}`,
      toAddress: to,
      subject: 'Feedback released (resend test)',
      textBody: 'Your feedback.',
      htmlBody: null,
      submissionId: w.submission.id,
      feedbackDocumentId: null,
      nextAttemptAt: new Date(),
      lockedUntil: null,
      lastError: null,
      messageId: null,
      sentAt: null,
    });
    await deliverOutbox();
    expect((await EmailOutbox.findByPk(row.id))!.status).toBe('sent');
    const id = String(w.submission.id);
    const answers = await Promise.all(
      Array.from({ length: 10 }, () =>
        call(
          'POST /api/marking/[submissionId]/resend',
          `/api/marking/${id}/resend`,
          w.people.ta.id,
          { submissionId: id },
          { outboxId: row.id },
        ),
      ),
    );
    const statuses = answers.map((r) => r.status).sort();
    expect(statuses).toEqual([200, 409, 409, 409, 409, 409, 409, 409, 409, 409]);
    for (const r of answers.filter((a) => a.status === 409)) expect((await r.json()).error).toMatch(/already|still waiting/);
    await deliverOutbox();
    const mail = await waitForMail(to, 2);
    expect(mail).toHaveLength(2);
    const expected = outboxMessageId(row);
    expect(mail.map((m) => m.headers['message-id'])).toEqual([expected, expected]);
    expect(await EmailOutbox.count({ where: { toAddress: to } })).toBe(1);
    // Another click within the window is refused; after it, allowed again.
    const again = await call(
      'POST /api/marking/[submissionId]/resend',
      `/api/marking/${id}/resend`,
      w.people.ta.id,
      { submissionId: id },
      { outboxId: row.id },
    );
    expect(again.status).toBe(409);
    await EmailOutbox.update({ resentAt: new Date(Date.now() - RESEND_WINDOW_MS - 1000) }, { where: { id: row.id } });
    const later = await call(
      'POST /api/marking/[submissionId]/resend',
      `/api/marking/${id}/resend`,
      w.people.ta.id,
      { submissionId: id },
      { outboxId: row.id },
    );
    expect(later.status).toBe(200);
  });
});

describe('informational items (item 11)', () => {
  // Public by design: the learning platform calls login and launch across sites (the signed token and
  // the browser-bound state are the proof) and fetches Oscillab's public keys; signing out when
  // already signed out just clears the cookie and goes to sign-in (it looks nothing up).
  const PUBLIC = new Set([
    'GET /api/health',
    'POST /api/password-reset',
    'POST /api/invitations/accept',
    'GET /api/auth/[...nextauth]',
    'POST /api/auth/[...nextauth]',
    'GET /api/lti/jwks',
    'GET /api/lti/login',
    'POST /api/lti/login',
    'POST /api/lti/launch',
    'POST /api/me/sign-out',
  ]);

  it('signed out, every route answers 401 whether or not the id exists (never 404 first)', async () => {
    const wrong: string[] = [];
    for (const h of handlers) {
      if (PUBLIC.has(h.key)) continue;
      const names = [...h.pattern.matchAll(/\[(\w+)\]/g)].map((m) => m[1]);
      for (const value of ['999999', String(w.submission.id)]) {
        const p = Object.fromEntries(names.map((n) => [n, value]));
        const url = h.pattern.replace(/\[(\w+)\]/g, value);
        const res = await h.handler(
          await apiRequest(url, { method: h.method, body: h.method === 'GET' || h.method === 'DELETE' ? undefined : {} }),
          params(p),
        );
        if (res.status !== 401) wrong.push(`${h.key} (${value}): ${res.status}`);
      }
    }
    expect(wrong).toEqual([]);
  });

  it('the administrator may moderate every course, and the moderation page lists exactly the courses its API allows', async () => {
    const admin = (await loadActor(w.people.admin.id))!;
    const listed = await coursesWhere(admin, 'moderate');
    const open = (await models().Course.findAll({ where: { archivedAt: null } })).map((c) => c.id);
    expect(listed.sort()).toEqual(open.sort());
    const res = await handler('GET /api/moderation')(
      await apiRequest(`/api/moderation?courseId=${w.course.id}`, { as: w.people.admin.id }),
      {},
    );
    expect(res.status).toBe(200);
    const instructor = (await loadActor(w.people.instructor.id))!;
    expect(await coursesWhere(instructor, 'moderate')).toEqual([w.course.id]);
    const page = fs.readFileSync(path.resolve(__dirname, '../../app/moderation/page.tsx'), 'utf8');
    expect(page).toContain("coursesWhere(actor, 'moderate')");
  });

  it("the site-wide policy has object-src 'none'; user files get a sandboxed policy of their own", async () => {
    const config = (await import('@/next.config.mjs')).default as {
      headers: () => Promise<{ source: string; headers: { key: string; value: string }[] }[]>;
    };
    const rules = await config.headers();
    const effective = (pathname: string) => {
      const out: Record<string, string> = {};
      for (const rule of rules)
        if ((pathToRegexp(rule.source) as RegExp).test(pathname)) for (const h of rule.headers) out[h.key.toLowerCase()] = h.value; // later rules win, as in Next
      return out;
    };
    expect(effective('/signin')['content-security-policy']).toContain("object-src 'none'");
    expect(effective('/signin')['content-security-policy']).not.toContain('sandbox');
    for (const [p, frame] of [
      ['/api/uploads/12', 'SAMEORIGIN'],
      ['/api/marking/3/report', 'SAMEORIGIN'],
      ['/api/marking/3/preview', 'DENY'],
      ['/api/submissions/4/feedback', 'DENY'],
    ]) {
      const h = effective(p);
      expect(h['content-security-policy'], p).toMatch(/^sandbox; default-src 'none'; object-src 'none'; frame-ancestors/);
      expect(h['x-frame-options'], p).toBe(frame);
      expect(h['x-content-type-options'], p).toBe('nosniff');
    }
  });

  it('the demo and `npm start` listen on 127.0.0.1 unless HOST says otherwise', () => {
    const demo = fs.readFileSync(path.resolve(__dirname, '../../scripts/demo.mjs'), 'utf8');
    expect(demo).toContain("const DEMO_HOST = process.env.HOST || '127.0.0.1';");
    expect(demo).toMatch(/'next', 'start', '-p', '3000', '-H', DEMO_HOST/);
    const pkg = JSON.parse(fs.readFileSync(path.resolve(__dirname, '../../package.json'), 'utf8'));
    expect(pkg.scripts.start).toBe('next start -p ${PORT:-3000} -H ${HOST:-127.0.0.1}');
  });
});
