/**
 * Marking: who may mark, overrides need a comment, stale saves are refused, every change is
 * audited, totals subtract the late penalty. Check values come from lib/grading run on a
 * line list simulated from Huber & Herzberg (1979) constants for H³⁵Cl (NIST WebBook).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { apiRequest, params } from '@/tests/helpers/session';
import { buildWorld, type World } from '@/tests/helpers/world';
import { models } from '@/models';
import type { OutboxStatus } from '@/models/email-outbox';
import { GET as queueGET } from '@/app/api/marking/queue/route';
import { COUNT_LIMIT } from '@/lib/marking/queue';
import { withoutKeeping } from '@/lib/statistics/keep';
import { seedSubmissions } from './statistics-seed';
import { GET as viewGET, PUT as savePUT } from '@/app/api/marking/[submissionId]/route';
import { POST as acceptPOST } from '@/app/api/marking/[submissionId]/accept/route';
import { POST as resubmitPOST } from '@/app/api/marking/[submissionId]/resubmission/route';
import { GET as modGET } from '@/app/api/moderation/route';
import { POST as modPOST } from '@/app/api/moderation/[submissionId]/route';
import { createCheckedSubmission, createFixturePractical } from '@/lib/marking/test-fixtures';
import { sampleSize } from '@/lib/marking/moderation';

let w: World;
let ownId: number; // in the TA's cohort, with the mass-number slip
let otherId: number; // in the other TA's cohort
let lateId: number;

beforeAll(async () => {
  w = await buildWorld();
  const practical = await createFixturePractical(w.course.id, [w.cohort.id, w.otherCohort.id]);
  ownId = (await createCheckedSubmission({ practicalId: practical.id, cohortId: w.cohort.id, studentId: w.people.student.id, slip: true }))
    .id;
  otherId = (await createCheckedSubmission({ practicalId: practical.id, cohortId: w.otherCohort.id, studentId: w.people.otherStudent.id }))
    .id;
  const { User, CourseMembership } = models();
  const late = await User.create({
    email: 'late.student@test.example',
    name: 'Late Student',
    passwordHash: null,
    isAdmin: false,
    studentNumber: 'L1',
  });
  await CourseMembership.create({ userId: late.id, courseId: w.course.id, role: 'student', cohortId: w.cohort.id });
  lateId = (await createCheckedSubmission({ practicalId: practical.id, cohortId: w.cohort.id, studentId: late.id, latePenalty: 10 })).id;
});

async function view(id: number, as: number) {
  const res = await viewGET(await apiRequest(`/api/marking/${id}`, { as }), params({ submissionId: String(id) }));
  return { status: res.status, body: await res.json() };
}

describe('queue', () => {
  it('shows a TA only the cohorts assigned to them, and filters by flag in SQL', async () => {
    const res = await queueGET(await apiRequest('/api/marking/queue', { as: w.people.ta.id }), {});
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.rows.map((r: { id: number }) => r.id).sort()).toEqual([ownId, lateId].sort());
    const slip = await (await queueGET(await apiRequest('/api/marking/queue?flag=slip', { as: w.people.ta.id }), {})).json();
    expect(slip.rows.map((r: { id: number }) => r.id)).toEqual([ownId]);
    const inst = await (
      await queueGET(await apiRequest('/api/marking/queue?pageSize=2&sort=student&dir=desc', { as: w.people.instructor.id }), {})
    ).json();
    expect(inst.total).toBe(3);
    expect(inst.rows).toHaveLength(2);
    expect(inst.pages).toBe(2);
  });

  it('pages by cursor (keyset) forwards and back in every sort, NULLs included; rows carry the kept verdict counts and slip names', async () => {
    const get = async (query: string) =>
      (await queueGET(await apiRequest(`/api/marking/queue?${query}`, { as: w.people.instructor.id }), {})).json();
    for (const sort of ['submittedAt', 'student', 'practical', 'status', 'proposedTotal', 'awardedTotal']) {
      for (const dir of ['asc', 'desc']) {
        const all = (await get(`sort=${sort}&dir=${dir}&pageSize=100`)).rows.map((r: { id: number }) => r.id);
        expect(all).toHaveLength(3);
        const forwards: number[] = [];
        let page = await get(`sort=${sort}&dir=${dir}&pageSize=1`);
        const cursors: string[] = [];
        for (;;) {
          forwards.push(page.rows[0].id);
          if (!page.next) break;
          cursors.push(page.next);
          page = await get(`sort=${sort}&dir=${dir}&pageSize=1&after=${page.next}`);
        }
        expect(forwards).toEqual(all); // the same order as one long page
        const backwards: number[] = [page.rows[0].id];
        while (page.prev) {
          page = await get(`sort=${sort}&dir=${dir}&pageSize=1&before=${page.prev}`);
          backwards.unshift(page.rows[0].id);
        }
        expect(backwards).toEqual(all);
        expect(page.prev).toBeNull();
      }
    }
    // awardedTotal is NULL for all three (none marked yet): ties fall back to the id, ascending.
    const byAwarded = await get('sort=awardedTotal&dir=asc&pageSize=100');
    expect(byAwarded.rows.map((r: { id: number }) => r.id)).toEqual(
      [...byAwarded.rows.map((r: { id: number }) => r.id)].sort((a, b) => a - b),
    );
    const own = (await get('pageSize=100')).rows.find((r: { id: number }) => r.id === ownId);
    const { CheckResult } = models();
    const checks = await CheckResult.findAll({ where: { submissionId: ownId } });
    expect(own.summary.within + own.summary.partial + own.summary.outside + own.summary.notChecked).toBe(checks.length);
    expect(own.summary.outside).toBe(checks.filter((c) => c.verdict === 'outside').length);
    expect(own.summary.slips.length).toBeGreaterThan(0); // the mass-number slip, by its title
    expect(own.summary.slips[0].title).not.toBe(own.summary.slips[0].code);
    expect((await queueGET(await apiRequest('/api/marking/queue?after=bm90LWpzb24', { as: w.people.instructor.id }), {})).status).toBe(400);
  });

  it("shows each row's last release e-mail, and counts the queue also on a page past its end", async () => {
    const { EmailOutbox } = models();
    const mail = (dedupeKey: string, status: OutboxStatus) => ({
      dedupeKey,
      toAddress: 'student@test.example',
      subject: 'Feedback',
      textBody: 'Feedback',
      submissionId: ownId,
      status,
      nextAttemptAt: new Date(),
    });
    const rows = await EmailOutbox.bulkCreate([
      mail(`release:${ownId}:1`, 'failed'),
      mail(`release:${ownId}:2`, 'sent'),
      mail(`reminder:${ownId}`, 'queued'),
    ]);
    try {
      const get = async (query: string) =>
        (await queueGET(await apiRequest(`/api/marking/queue?${query}`, { as: w.people.instructor.id }), {})).json();
      const all = await get('pageSize=100');
      expect(all.rows.find((r: { id: number }) => r.id === ownId).delivery).toBe('sent'); // the later release row; not the reminder
      expect(all.rows.find((r: { id: number }) => r.id === otherId).delivery).toBeNull();
      const beyond = await get('pageSize=2&page=5');
      expect(beyond.rows).toHaveLength(0);
      expect(beyond.total).toBe(3);
      const last = await get('pageSize=3');
      const afterLast = await get(
        `pageSize=3&after=${Buffer.from(JSON.stringify({ v: '9999-01-01T00:00:00.000Z', d: 1, i: 999999 })).toString('base64url')}`,
      );
      expect(last.rows).toHaveLength(3);
      expect(afterLast.rows).toHaveLength(0);
      expect(afterLast.total).toBe(3);
    } finally {
      await EmailOutbox.destroy({ where: { id: rows.map((r) => r.id) } });
    }
  });

  it('counts a long queue up to COUNT_LIMIT and says "or more" beyond; pages still run past the limit', { timeout: 60_000 }, async () => {
    // A course of its own, so the other tests (moderation samples per marker) do not see these rows.
    const { User, Course, Cohort, CourseMembership } = models();
    const course = await Course.create({ code: 'LONG1', title: 'Long queue course', archivedAt: null });
    const cohort = await Cohort.create({ courseId: course.id, name: 'Long cohort', term: '2026', instrument: null, archivedAt: null });
    await CourseMembership.create({ userId: w.people.instructor.id, courseId: course.id, role: 'instructor', cohortId: null });
    const practical = await createFixturePractical(course.id, [cohort.id]);
    const students = await User.bulkCreate(
      Array.from({ length: COUNT_LIMIT + 5 }, (_, i) => ({
        email: `long-${i}@queue.example`,
        name: `Long Queue ${i}`,
        passwordHash: null,
        isAdmin: false,
        studentNumber: `LQ${i}`,
      })),
    );
    await CourseMembership.bulkCreate(
      students.map((u) => ({ userId: u.id, courseId: w.course.id, role: 'student' as const, cohortId: w.otherCohort.id })),
    );
    await withoutKeeping(() =>
      seedSubmissions({
        practicalId: practical.id,
        cohortId: w.otherCohort.id,
        studentIds: students.map((u) => u.id),
        markerIds: [w.people.instructor.id],
      }),
    );
    const get = async (query: string) =>
      (
        await queueGET(await apiRequest(`/api/marking/queue?practicalId=${practical.id}&${query}`, { as: w.people.instructor.id }), {})
      ).json();
    const first = await get('pageSize=100');
    expect(first.total).toBe(COUNT_LIMIT);
    expect(first.totalExact).toBe(false);
    expect(first.rows).toHaveLength(100);
    // The matching marked attempts, counted here without the cap: one per student.
    expect(students.length).toBe(COUNT_LIMIT + 5);
    let page = first;
    let seen = page.rows.length;
    while (page.next) {
      page = await get(`pageSize=100&after=${page.next}`);
      seen += page.rows.length;
    }
    expect(seen).toBe(COUNT_LIMIT + 5);
    const marked = await get('pageSize=100&status=marked');
    expect(marked.totalExact).toBe(true); // fewer than the limit are marked (the rest submitted or released)
    expect(marked.total).toBeLessThan(COUNT_LIMIT);
  });

  it('gives a TA removed from the course nothing to mark, though their duty rows remain', async () => {
    const { CourseMembership } = models();
    const membership = (await CourseMembership.findOne({ where: { userId: w.people.ta.id, courseId: w.course.id, role: 'ta' } }))!;
    await membership.destroy();
    try {
      const none = await (await queueGET(await apiRequest('/api/marking/queue', { as: w.people.ta.id }), {})).json();
      expect(none.total).toBe(0);
      expect((await view(ownId, w.people.ta.id)).status).toBe(403);
    } finally {
      await CourseMembership.create({ userId: w.people.ta.id, courseId: w.course.id, role: 'ta', cohortId: membership.cohortId });
    }
    expect((await view(ownId, w.people.ta.id)).status).toBe(200);
  });

  it('refuses a bad filter with 400 and answers an unknown person with an empty queue', async () => {
    expect((await queueGET(await apiRequest('/api/marking/queue?flag=nonsense', { as: w.people.ta.id }), {})).status).toBe(400);
    const none = await (await queueGET(await apiRequest('/api/marking/queue', { as: w.people.nobody.id }), {})).json();
    expect(none.total).toBe(0);
    expect((await queueGET(await apiRequest('/api/marking/queue'), {})).status).toBe(401);
  });
});

describe('marking', () => {
  it('a TA cannot open or mark a cohort not assigned to them (403); a student cannot mark (403); unknown id 404', async () => {
    expect((await view(otherId, w.people.ta.id)).status).toBe(403);
    const res = await savePUT(
      await apiRequest(`/api/marking/${otherId}`, { as: w.people.ta.id, method: 'PUT', body: { version: 0, items: [] } }),
      params({ submissionId: String(otherId) }),
    );
    expect(res.status).toBe(403);
    expect((await view(ownId, w.people.student.id)).status).toBe(403);
    expect((await view(999999, w.people.ta.id)).status).toBe(404);
  });

  it('shows the named slip (mass numbers) on the force constant', async () => {
    const { body } = await view(ownId, w.people.ta.id);
    expect(body.slips.map((s: { code: string }) => s.code)).toContain('mass-numbers-used');
    const k = body.quantities.find((q: { key: string }) => q.key === 'forceConstant');
    expect(k.reportedTyped).toContain('477.1');
    expect(k.consistency.verdict).toBe('outside');
    expect(body.fits[0].residuals.length).toBeGreaterThan(5);
  });

  it('refuses an override without a comment (400) and writes nothing', async () => {
    const { body } = await view(ownId, w.people.ta.id);
    const k = body.marks.find((m: { itemKey: string }) => m.itemKey.startsWith('forceConstant:'));
    const res = await savePUT(
      await apiRequest(`/api/marking/${ownId}`, {
        as: w.people.ta.id,
        method: 'PUT',
        body: { version: body.submission.version, items: [{ itemKey: k.itemKey, awarded: k.maxMarks }] },
      }),
      params({ submissionId: String(ownId) }),
    );
    expect(res.status).toBe(400);
    expect((await res.json()).error).toMatch(/comment/i);
    const after = await models().Submission.findByPk(ownId);
    expect(after!.version).toBe(body.submission.version);
    expect((await models().Mark.findOne({ where: { submissionId: ownId, itemKey: k.itemKey } }))!.awarded).toBeNull();
  });

  it('saves an override with a comment, audits it, and a stale second save gets 409', async () => {
    const { body } = await view(ownId, w.people.ta.id);
    const v0 = body.submission.version;
    const items = body.marks.map((m: { itemKey: string; proposed: number | null; maxMarks: number }) =>
      m.itemKey.startsWith('forceConstant:')
        ? { itemKey: m.itemKey, awarded: 1, comment: 'Method right; masses wrong — half the marks.' }
        : { itemKey: m.itemKey, awarded: m.proposed ?? 1.5 },
    );
    const res = await savePUT(
      await apiRequest(`/api/marking/${ownId}`, {
        as: w.people.ta.id,
        method: 'PUT',
        body: { version: v0, items, markerComment: 'Good spectrum.' },
      }),
      params({ submissionId: String(ownId) }),
    );
    expect(res.status).toBe(200);
    const saved = await res.json();
    expect(saved.status).toBe('marked');
    expect(saved.version).toBe(v0 + 1);
    const expected = items.reduce((s: number, i: { awarded: number }) => s + i.awarded, 0);
    expect(saved.awardedTotal).toBeCloseTo(expected, 6);
    const s = await models().Submission.findByPk(ownId);
    expect(s!.markedById).toBe(w.people.ta.id);
    expect(s!.markedAt).toBeInstanceOf(Date);
    const entries = await models().AuditEntry.findAll({ where: { entityType: 'submission', entityId: ownId, action: 'marks.save' } });
    expect(entries).toHaveLength(1);
    expect(entries[0].actorId).toBe(w.people.ta.id);
    const kKey = items.find((i: { itemKey: string }) => i.itemKey.startsWith('forceConstant:')).itemKey;
    expect((entries[0].before as Record<string, { awarded: number | null }>)[kKey].awarded).toBeNull();
    expect((entries[0].after as Record<string, { awarded: number }>)[kKey].awarded).toBe(1);

    // A second marker who opened the page at v0 must not overwrite silently.
    const stale = await savePUT(
      await apiRequest(`/api/marking/${ownId}`, {
        as: w.people.instructor.id,
        method: 'PUT',
        body: { version: v0, items: [{ itemKey: kKey, awarded: 2, comment: 'I disagree' }] },
      }),
      params({ submissionId: String(ownId) }),
    );
    expect(stale.status).toBe(409);
    expect((await stale.json()).error).toMatch(/someone else saved/i);
    expect((await models().Mark.findOne({ where: { submissionId: ownId, itemKey: kKey } }))!.awarded).toBe(1);
  });

  it('accepting the proposal leaves hand-marked items open; the total subtracts the late penalty (10 %)', async () => {
    const { body } = await view(lateId, w.people.ta.id);
    const res = await acceptPOST(
      await apiRequest(`/api/marking/${lateId}/accept`, { as: w.people.ta.id, body: { version: body.submission.version } }),
      params({ submissionId: String(lateId) }),
    );
    expect(res.status).toBe(200);
    const r = await res.json();
    expect(r.status).toBe('submitted');
    expect(r.unmarked).toBe(1);
    const save = await savePUT(
      await apiRequest(`/api/marking/${lateId}`, {
        as: w.people.ta.id,
        method: 'PUT',
        body: { version: r.version, items: [{ itemKey: 'rubric:discussion', awarded: 2 }] },
      }),
      params({ submissionId: String(lateId) }),
    );
    const saved = await save.json();
    expect(saved.status).toBe('marked');
    const marks = await models().Mark.findAll({ where: { submissionId: lateId } });
    const sum = marks.reduce((s, m) => s + (m.awarded ?? 0), 0);
    expect(saved.awardedTotal).toBeCloseTo(sum * 0.9, 6);
  });

  it('refuses marks above the maximum and unknown items (400)', async () => {
    const s = await models().Submission.findByPk(lateId);
    for (const items of [[{ itemKey: 'rubric:discussion', awarded: 3 }], [{ itemKey: 'rubric:nope', awarded: 1 }]]) {
      const res = await savePUT(
        await apiRequest(`/api/marking/${lateId}`, { as: w.people.ta.id, method: 'PUT', body: { version: s!.version, items } }),
        params({ submissionId: String(lateId) }),
      );
      expect(res.status).toBe(400);
    }
  });
});

describe('moderation', () => {
  it('samples 10 % (at least one) of each marker, instructors only, and records a change with the audit trail', async () => {
    expect(sampleSize(1)).toBe(1);
    expect(sampleSize(10)).toBe(1);
    expect(sampleSize(11)).toBe(2);
    expect((await modGET(await apiRequest(`/api/moderation?courseId=${w.course.id}`, { as: w.people.ta.id }), {})).status).toBe(403);
    const res = await modGET(await apiRequest(`/api/moderation?courseId=${w.course.id}`, { as: w.people.instructor.id }), {});
    const { markers } = await res.json();
    expect(markers).toHaveLength(1);
    expect(markers[0].marker.id).toBe(w.people.ta.id);
    expect(markers[0].markedCount).toBe(2);
    expect(markers[0].sample).toHaveLength(1);
    const pick = markers[0].sample[0];
    const noNote = await modPOST(
      await apiRequest(`/api/moderation/${pick.id}`, {
        as: w.people.instructor.id,
        body: { decision: 'changed', version: pick.version, items: [{ itemKey: 'rubric:discussion', awarded: 1 }] },
      }),
      params({ submissionId: String(pick.id) }),
    );
    expect(noNote.status).toBe(400);
    const ok = await modPOST(
      await apiRequest(`/api/moderation/${pick.id}`, {
        as: w.people.instructor.id,
        body: {
          decision: 'changed',
          version: pick.version,
          items: [{ itemKey: 'rubric:discussion', awarded: 1 }],
          note: 'Discussion is thin.',
        },
      }),
      params({ submissionId: String(pick.id) }),
    );
    expect(ok.status).toBe(200);
    const out = await ok.json();
    expect(out.totalAfter).toBeLessThan(out.totalBefore);
    expect(await models().Moderation.count({ where: { submissionId: pick.id } })).toBe(1);
    expect(await models().AuditEntry.count({ where: { entityId: pick.id, action: 'moderation.changed' } })).toBe(1);
  });
});

describe('resubmission', () => {
  it('reopens the submission for one more attempt and queues an e-mail with the message', async () => {
    const { Submission, EmailOutbox } = models();
    const s = await Submission.findByPk(otherId);
    const res = await resubmitPOST(
      await apiRequest(`/api/marking/${otherId}/resubmission`, {
        as: w.people.otherTa.id,
        body: { version: s!.version, message: 'Please redo the fit with m = J + 1 for the R branch.' },
      }),
      params({ submissionId: String(otherId) }),
    );
    expect(res.status).toBe(200);
    const after = await Submission.findByPk(otherId);
    expect(after!.status).toBe('resubmission-requested');
    expect(after!.extraAttempts).toBe(s!.extraAttempts + 1);
    const mail = await EmailOutbox.findOne({ where: { submissionId: otherId, dedupeKey: `resubmit:${otherId}:1` } });
    expect(mail!.textBody).toContain('m = J + 1');
    expect(mail!.toAddress).toBe(w.people.otherStudent.email);
    const empty = await resubmitPOST(
      await apiRequest(`/api/marking/${otherId}/resubmission`, { as: w.people.otherTa.id, body: { message: '  ' } }),
      params({ submissionId: String(otherId) }),
    );
    expect(empty.status).toBe(400);
  });
});
