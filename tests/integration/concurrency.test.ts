/**
 * Concurrency (issue 8, item 5): no submission, mark or e-mail is lost or duplicated when many
 * requests arrive at the same moment. Route handlers are called directly and all requests of a
 * round are started together with Promise.all, so they interleave on the one database exactly as
 * they would in one server process.
 */
import fs from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Op } from 'sequelize';
import { apiRequest, params } from '@/tests/helpers/session';
import { buildWorld, type World } from '@/tests/helpers/world';
import { correctValues } from '@/tests/helpers/fixture-world';
import { buildPractical, draftFor } from '@/tests/fixtures/submissions/practical';
import { mailTo } from '@/tests/helpers/maildev';
import { startCatcher, clearMail, waitForOutboxIdle, type Catcher } from '@/tests/helpers/fault-tools';
import { models } from '@/models';
import { feedbackDir } from '@/lib/storage';
import { STALE_MESSAGE, acceptProposal } from '@/lib/marking/marks';
import { createCheckedSubmission, createFixturePractical } from '@/lib/marking/test-fixtures';
import { PUT as saveDraftRoute } from '@/app/api/submissions/draft/route';
import { POST as submitRoute } from '@/app/api/submissions/[id]/submit/route';
import { PUT as saveMarksRoute } from '@/app/api/marking/[submissionId]/route';
import { POST as releaseRoute } from '@/app/api/release/route';

// A catcher of this file's own, beside the suite's; moved with the suite's ports so two checkouts' runs cannot collide.
const SMTP = Number(process.env.OSCILLAB_TEST_SMTP_PORT ?? 1125) + 600;
const WEB = Number(process.env.OSCILLAB_TEST_WEB_PORT ?? 1180) + 600;
let catcher: Catcher;
let w: World;

beforeAll(async () => {
  catcher = await startCatcher(SMTP, WEB);
  w = await buildWorld();
}, 60_000);

afterAll(async () => {
  try {
    await waitForOutboxIdle(10_000).catch(() => undefined);
  } finally {
    await catcher?.stop();
  }
});

async function body(res: Response) {
  return { status: res.status, body: (await res.json()) as Record<string, unknown> };
}

describe('students submitting at once', () => {
  it('50 students submitting at the same moment: 50 × 201, 50 attempts, none duplicated, each checked', { timeout: 90_000 }, async () => {
    const { User, CourseMembership, Submission, CheckResult, LineAssignment, SubmittedValue } = models();
    const { practical } = await buildPractical(w);
    const students: { id: number; email: string }[] = [];
    for (let i = 0; i < 50; i++) {
      const s = await User.create({
        email: `crowd.${i}@test.example`,
        name: `Crowd Student ${i}`,
        passwordHash: null,
        isAdmin: false,
        studentNumber: `C${1000 + i}`,
      });
      await CourseMembership.create({ userId: s.id, courseId: w.course.id, role: 'student', cohortId: w.cohort.id });
      students.push(s);
    }
    // Every draft through the real autosave route, all at once too.
    const draft = draftFor('H35Cl', correctValues());
    const drafts = await Promise.all(
      students.map(async (s) =>
        body(
          await saveDraftRoute(
            await apiRequest('/api/submissions/draft', { as: s.id, method: 'PUT', body: { practicalId: practical.id, draft } }),
            {},
          ),
        ),
      ),
    );
    expect(drafts.map((d) => d.status)).toEqual(students.map(() => 200));

    const answers = await Promise.all(
      students.map(async (s, i) => {
        const d = drafts[i].body as { id: number; version: number };
        return body(
          await submitRoute(
            await apiRequest(`/api/submissions/${d.id}/submit`, { as: s.id, body: { version: d.version, draft } }),
            params({ id: String(d.id) }),
          ),
        );
      }),
    );
    expect(answers.map((a) => a.status)).toEqual(students.map(() => 201));

    const attempts = await Submission.findAll({ where: { practicalId: practical.id, attempt: { [Op.gt]: 0 } } });
    expect(attempts).toHaveLength(50);
    expect(new Set(attempts.map((a) => a.studentId)).size).toBe(50);
    expect(attempts.every((a) => a.attempt === 1 && a.status === 'submitted' && a.isMarkedAttempt)).toBe(true);
    // The answer of each request names that student's own new attempt.
    const byStudent = new Map(attempts.map((a) => [a.studentId, a.id]));
    answers.forEach((a, i) => expect((a.body.result as { id: number }).id).toBe(byStudent.get(students[i].id)));

    const ids = attempts.map((a) => a.id);
    const lines = draft.species.H35Cl.lines.length;
    for (const id of ids) {
      // Three quantities on the practical, each judged on at least the accuracy basis.
      expect(await CheckResult.count({ where: { submissionId: id } })).toBeGreaterThanOrEqual(3);
      expect(await LineAssignment.count({ where: { submissionId: id, source: 'student' } })).toBe(lines);
      expect(await SubmittedValue.count({ where: { submissionId: id } })).toBe(3);
    }
    // Every draft moved on exactly once.
    const after = await Submission.findAll({ where: { practicalId: practical.id, attempt: 0 } });
    expect(after).toHaveLength(50);
    for (const d of after)
      expect(d.version).toBe((drafts.find((x) => (x.body as { id: number }).id === d.id)!.body as { version: number }).version + 1);
  });

  it('one student double-submitting (5 requests at once): exactly one attempt, four clear 409s, no 500', { timeout: 30_000 }, async () => {
    const { Submission } = models();
    const { practical } = await buildPractical(w);
    const draft = draftFor('H35Cl', correctValues());
    const saved = await body(
      await saveDraftRoute(
        await apiRequest('/api/submissions/draft', { as: w.people.student.id, method: 'PUT', body: { practicalId: practical.id, draft } }),
        {},
      ),
    );
    const { id, version } = saved.body as { id: number; version: number };
    const answers = await Promise.all(
      Array.from({ length: 5 }, async () =>
        body(
          await submitRoute(
            await apiRequest(`/api/submissions/${id}/submit`, { as: w.people.student.id, body: { version, draft } }),
            params({ id: String(id) }),
          ),
        ),
      ),
    );
    const statuses = answers.map((a) => a.status).sort();
    expect(statuses).toEqual([201, 409, 409, 409, 409]);
    for (const a of answers.filter((x) => x.status === 409)) expect(a.body.error).toMatch(/already submitted|changed in another tab/i);
    expect(await Submission.count({ where: { practicalId: practical.id, studentId: w.people.student.id, attempt: { [Op.gt]: 0 } } })).toBe(
      1,
    );
  });
});

describe('one student autosaving from several tabs at once', () => {
  it(
    'the first save from 4 tabs at the same moment: one draft row, four 200s with distinct versions, the stored draft is the last one counted',
    { timeout: 30_000 },
    async () => {
      const { Submission } = models();
      const { practical } = await buildPractical(w);
      const student = await models().User.create({
        email: 'tabs@test.example',
        name: 'Four Tabs',
        passwordHash: null,
        isAdmin: false,
        studentNumber: 'T4000',
      });
      await models().CourseMembership.create({ userId: student.id, courseId: w.course.id, role: 'student', cohortId: w.cohort.id });
      const drafts = [2885.1, 2885.2, 2885.3, 2885.4].map((centre) =>
        draftFor('H35Cl', { ...correctValues(), bandCentre: { value: String(centre), unit: 'cm-1', uncertainty: '0.5' } }),
      );
      const answers = await Promise.all(
        drafts.map(async (draft) =>
          body(
            await saveDraftRoute(
              await apiRequest('/api/submissions/draft', { as: student.id, method: 'PUT', body: { practicalId: practical.id, draft } }),
              {},
            ),
          ),
        ),
      );
      expect(answers.map((a) => a.status)).toEqual([200, 200, 200, 200]);
      const rows = await Submission.findAll({ where: { practicalId: practical.id, studentId: student.id } });
      expect(rows).toHaveLength(1);
      expect(new Set(answers.map((a) => a.body.id))).toEqual(new Set([rows[0].id]));
      const versions = answers.map((a) => a.body.version as number).sort();
      expect(versions).toEqual([1, 2, 3, 4]);
      expect(rows[0].version).toBe(4);
      // The row holds the draft of the save that was counted last, read back intact.
      const last = answers.findIndex((a) => a.body.version === 4);
      expect(rows[0].draft).toEqual(JSON.parse(JSON.stringify(drafts[last])));
    },
  );
});

describe('two TAs saving marks on the same submission at once', () => {
  it('one 200, the other 409 "someone else saved"; the stored marks are the winner\'s', { timeout: 60_000 }, async () => {
    const { User, CourseMembership, TaAssignment, Mark, Submission, AuditEntry } = models();
    const ta2 = await User.create({
      email: 'second.ta@test.example',
      name: 'Second TA',
      passwordHash: null,
      isAdmin: false,
      studentNumber: null,
    });
    await CourseMembership.create({ userId: ta2.id, courseId: w.course.id, role: 'ta', cohortId: null });
    await TaAssignment.create({ cohortId: w.cohort.id, taId: ta2.id, studentId: null });
    // Several rounds: which TA wins is up to the scheduler; the rule must hold either way.
    const winners = new Set<number>();
    for (let round = 0; round < 4; round++) {
      // A practical of its own per round (attempt numbers are unique per practical and student).
      const practical = await createFixturePractical(w.course.id, [w.cohort.id]);
      const sub = await createCheckedSubmission({
        practicalId: practical.id,
        cohortId: w.cohort.id,
        studentId: w.people.student.id,
        offset: round,
      });
      const start = (await acceptProposal(w.people.ta.id, sub.id, sub.version)).version;
      const tas = [
        { id: w.people.ta.id, awarded: 2, comment: `TA one, round ${round}` },
        { id: ta2.id, awarded: 0, comment: `TA two, round ${round}` },
      ];
      const answers = await Promise.all(
        tas.map(async (t) =>
          body(
            await saveMarksRoute(
              await apiRequest(`/api/marking/${sub.id}`, {
                as: t.id,
                method: 'PUT',
                body: { version: start, items: [{ itemKey: 'rubric:discussion', awarded: t.awarded, comment: t.comment }] },
              }),
              params({ submissionId: String(sub.id) }),
            ),
          ),
        ),
      );
      expect(answers.map((a) => a.status).sort()).toEqual([200, 409]);
      const winner = tas[answers.findIndex((a) => a.status === 200)];
      const loser = answers.find((a) => a.status === 409)!;
      expect(loser.body.error).toBe(STALE_MESSAGE);
      expect(loser.body.error).toMatch(/someone else saved/i);
      winners.add(winner.id);

      const mark = (await Mark.findOne({ where: { submissionId: sub.id, itemKey: 'rubric:discussion' } }))!;
      expect(mark.awarded).toBe(winner.awarded);
      expect(mark.comment).toBe(winner.comment);
      expect(mark.markerId).toBe(winner.id);
      const fresh = (await Submission.findByPk(sub.id))!;
      expect(fresh.version).toBe(start + 1); // one save went through, not two
      // Only the winner's save is in the audit trail.
      const saves = await AuditEntry.findAll({ where: { entityType: 'submission', entityId: sub.id, action: 'marks.save' } });
      expect(saves.map((s) => s.actorId)).toEqual([winner.id]);

      // The loser reloads (new version) and saves again: now it is accepted, nothing silently lost.
      const retry = await saveMarksRoute(
        await apiRequest(`/api/marking/${sub.id}`, {
          as: tas.find((t) => t.id !== winner.id)!.id,
          method: 'PUT',
          body: { version: fresh.version, items: [{ itemKey: 'rubric:discussion', awarded: 1, comment: 'after reload' }] },
        }),
        params({ submissionId: String(sub.id) }),
      );
      expect(retry.status).toBe(200);
    }
    console.log('[concurrency] mark-save winners over 4 rounds:', [...winners]);
  });
});

describe('concurrent releases of the same submission', () => {
  it('two staff releasing the same batch at once: one feedback document and one e-mail per student', { timeout: 60_000 }, async () => {
    const { Submission, EmailOutbox, FeedbackDocument, User, CourseMembership } = models();
    await clearMail();
    const practical = await createFixturePractical(w.course.id, [w.cohort.id]);
    const ids: number[] = [];
    const emails: string[] = [];
    for (let i = 0; i < 3; i++) {
      const s = await User.create({
        email: `release.race.${i}@test.example`,
        name: `Race Student ${i}`,
        passwordHash: null,
        isAdmin: false,
        studentNumber: `RR${i}`,
      });
      await CourseMembership.create({ userId: s.id, courseId: w.course.id, role: 'student', cohortId: w.cohort.id });
      const sub = await createCheckedSubmission({ practicalId: practical.id, cohortId: w.cohort.id, studentId: s.id });
      const v = (await acceptProposal(w.people.ta.id, sub.id, sub.version)).version;
      const r = await saveMarksRoute(
        await apiRequest(`/api/marking/${sub.id}`, {
          as: w.people.ta.id,
          method: 'PUT',
          body: { version: v, items: [{ itemKey: 'rubric:discussion', awarded: 1 }] },
        }),
        params({ submissionId: String(sub.id) }),
      );
      expect(r.status).toBe(200);
      ids.push(sub.id);
      emails.push(s.email);
    }
    const pdfsBefore = fs.readdirSync(feedbackDir()).length;
    const callers = [w.people.ta.id, w.people.instructor.id, w.people.ta.id, w.people.lead.id];
    const answers = await Promise.all(
      callers.map(async (as) => body(await releaseRoute(await apiRequest('/api/release', { as, body: { submissionIds: ids } }), {}))),
    );
    expect(answers.map((a) => a.status)).toEqual(callers.map(() => 200));
    // Each submission released by exactly one of the four requests.
    expect(answers.reduce((n, a) => n + (a.body.released as number), 0)).toBe(ids.length);
    for (const a of answers) {
      for (const r of a.body.results as { ok: boolean; message?: string }[])
        if (!r.ok) expect(r.message).toMatch(/already released|changed while it was being released/i);
    }

    expect(await Submission.count({ where: { id: ids, status: 'released' } })).toBe(ids.length);
    for (const id of ids) {
      expect(await FeedbackDocument.count({ where: { submissionId: id } })).toBe(1);
      expect(await EmailOutbox.count({ where: { submissionId: id } })).toBe(1);
    }
    // The losers' PDFs were removed with their rolled-back transactions: one file per document.
    expect(fs.readdirSync(feedbackDir()).length - pdfsBefore).toBe(ids.length);

    // The routes' own background deliveries race each other too; each student gets one message.
    await waitForOutboxIdle();
    for (const e of emails) expect(await mailTo(e)).toHaveLength(1);
    expect(await EmailOutbox.count({ where: { submissionId: ids, status: 'sent' } })).toBe(ids.length);
  });
});
