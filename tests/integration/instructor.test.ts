/**
 * Instructor workspace through its route handlers: roster import (bad files refused or
 * neutralised, nothing written), authorisation (401/403), invitations, tolerance bands
 * (cohort override beats the course default), live preview and copying a practical.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { apiRequest, params } from '../helpers/session';
import { buildWorld, type World } from '../helpers/world';
import { waitForMail } from '../helpers/maildev';
import { models } from '@/models';
import { deliverOutbox } from '@/lib/mail/outbox';
import { inviteUser } from '@/lib/instructor/invitations';
import { resolveBands, toleranceFor } from '@/lib/instructor/bands';
import { renderInstructions } from '@/lib/instructor/markdown';
import * as roster from '@/app/api/courses/[courseId]/roster/route';
import * as staff from '@/app/api/courses/[courseId]/staff/route';
import * as cohorts from '@/app/api/courses/[courseId]/cohorts/route';
import * as course from '@/app/api/courses/[courseId]/route';
import * as courses from '@/app/api/courses/route';
import * as practicals from '@/app/api/courses/[courseId]/practicals/route';
import * as practical from '@/app/api/practicals/[practicalId]/route';
import * as quantities from '@/app/api/practicals/[practicalId]/quantities/route';
import * as bands from '@/app/api/practicals/[practicalId]/bands/route';
import * as preview from '@/app/api/practicals/[practicalId]/preview/route';
import * as copy from '@/app/api/practicals/[practicalId]/copy/route';
import * as accept from '@/app/api/invitations/accept/route';
import * as ta from '@/app/api/courses/[courseId]/ta-assignments/route';

let w: World;
beforeAll(async () => {
  w = await buildWorld();
});

const csvRequest = async (courseId: number, body: BodyInit, mode: 'preview' | 'import', as: number | null, cohortId?: number | string) =>
  roster.POST(
    await apiRequest(`/api/courses/${courseId}/roster?mode=${mode}${cohortId !== undefined ? `&cohortId=${cohortId}` : ''}`, {
      as,
      method: 'POST',
      rawBody: body,
      headers: { 'content-type': 'text/csv' },
    }),
    params({ courseId: String(courseId) }),
  );

async function counts() {
  const { User, CourseMembership, EmailOutbox, OneTimeToken } = models();
  return {
    users: await User.count(),
    memberships: await CourseMembership.count(),
    mail: await EmailOutbox.count(),
    tokens: await OneTimeToken.count(),
  };
}

describe('roster import', () => {
  const good = (n: string) =>
    `name,email,student_number,cohort\nAmira Vance${n},amira${n}@test.example,R${n}01,Cohort 1\nBo Lindgren${n},bo${n}@test.example,R${n}02,Cohort 2\n`;

  it('previews rows as new / already enrolled / invalid with reasons, writing nothing', async () => {
    const before = await counts();
    const student = w.people.student;
    const csv = `${good('p')}${student.name},${student.email},${student.studentNumber},Cohort 1\nNo Cohort,nc@test.example,R9,Cohort 9\n`;
    const res = await csvRequest(w.course.id, csv, 'preview', w.people.instructor.id);
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.counts).toEqual({ new: 2, enrolled: 1, invalid: 1 });
    expect(body.rows[3].reason).toMatch(/No open cohort "Cohort 9"/);
    expect(await counts()).toEqual(before);
  });

  it('refuses wrong columns with a message naming them, and writes nothing', async () => {
    const before = await counts();
    const res = await csvRequest(w.course.id, 'name,mail,number\nA,a@test.example,1\n', 'import', w.people.instructor.id);
    expect(res.status).toBe(400);
    expect((await res.json()).error).toMatch(
      /name, email, student_number, and optionally cohort and term: missing "email"; unexpected "mail"/,
    );
    expect(await counts()).toEqual(before);
  });

  it('refuses a file with duplicate e-mails as a whole, and writes nothing', async () => {
    const before = await counts();
    const csv =
      'name,email,student_number,cohort\nA One,dup@test.example,D1,Cohort 1\nA Two,DUP@test.example,D2,Cohort 1\nC Three,c3@test.example,D3,Cohort 1\n';
    const pre = await (await csvRequest(w.course.id, csv, 'preview', w.people.instructor.id)).json();
    expect(pre.rows[0].reason).toMatch(/more than once in this file \(lines 2, 3\)/);
    const res = await csvRequest(w.course.id, csv, 'import', w.people.instructor.id);
    expect(res.status).toBe(422);
    expect((await res.json()).error).toMatch(/Nothing was imported: 2 row\(s\) are invalid/);
    expect(await counts()).toEqual(before);
  });

  it('refuses 10 MB of junk before reading it whole', async () => {
    const before = await counts();
    const junk = new Uint8Array(10 * 1024 * 1024).map((_, i) => (i * 7919) % 251);
    const res = await csvRequest(w.course.id, junk, 'import', w.people.instructor.id);
    expect(res.status).toBe(413);
    expect((await res.json()).error).toMatch(/larger than 1 MB/);
    expect(await counts()).toEqual(before);
  });

  it('refuses a file that is not UTF-8 (Latin-1 bytes) with advice', async () => {
    const before = await counts();
    const latin1 = Buffer.from('name,email,student_number,cohort\nJos\xe9 Mu\xf1oz,jose@test.example,L1,Cohort 1\n', 'latin1');
    const res = await csvRequest(w.course.id, latin1, 'import', w.people.instructor.id);
    expect(res.status).toBe(400);
    expect((await res.json()).error).toMatch(/not UTF-8.*CSV UTF-8/);
    expect(await counts()).toEqual(before);
  });

  it('neutralises formula-injection cells and says so', async () => {
    const csv =
      'name,email,student_number,cohort\n"=HYPERLINK(""http://evil.example"",""x"")",f1@test.example,F1,Cohort 1\n+Plus Person,f2@test.example,@F2,Cohort 1\n-Minus Person,=f3@test.example,F3,Cohort 1\n';
    const body = await (await csvRequest(w.course.id, csv, 'preview', w.people.instructor.id)).json();
    expect(body.rows[0].name).toBe('HYPERLINK("http://evil.example","x")');
    expect(body.rows[0].notes[0]).toMatch(/formula-like start was removed from name/);
    expect(body.rows[1]).toMatchObject({ name: 'Plus Person', studentNumber: 'F2', status: 'new' });
    expect(body.rows[2]).toMatchObject({ name: 'Minus Person', email: 'f3@test.example', status: 'new' });
    for (const row of body.rows)
      for (const cell of [row.name, row.email, row.studentNumber, row.cohort]) expect(cell).not.toMatch(/^[=+\-@]/);
  });

  describe("two open cohorts with the same name (last year's and this year's)", () => {
    let lastYearId: number;
    let thisYearId: number;
    beforeAll(async () => {
      const { Cohort } = models();
      lastYearId = (
        await Cohort.create({ courseId: w.course.id, name: 'Group A', term: '2025 Autumn', instrument: null, archivedAt: null })
      ).id;
      thisYearId = (
        await Cohort.create({ courseId: w.course.id, name: 'Group A', term: '2026 Autumn', instrument: null, archivedAt: null })
      ).id;
    });
    const file = (tag: string, extra = '') =>
      `name,email,student_number,cohort${extra ? ',term' : ''}\nPia Okafor${tag},pia${tag}@test.example,G${tag}1,Group A${extra}\nRune Halvorsen${tag},rune${tag}@test.example,G${tag}2,Group A${extra}\n`;

    it('without a choice, every "Group A" row says which two cohorts it could mean', async () => {
      const before = await counts();
      const body = await (await csvRequest(w.course.id, file('x'), 'preview', w.people.instructor.id)).json();
      expect(body.counts).toEqual({ new: 0, enrolled: 0, invalid: 2 });
      expect(body.rows[0].reasons[0]).toMatch(/Two open cohorts are called "Group A" \(2026 Autumn and 2025 Autumn\): choose the cohort/);
      expect(await counts()).toEqual(before);
    });

    it('imports into the cohort chosen on the import screen', async () => {
      const res = await csvRequest(w.course.id, file('y'), 'import', w.people.instructor.id, thisYearId);
      expect(res.status).toBe(200);
      expect(await res.json()).toMatchObject({
        enrolled: 2,
        counts: { new: 2, invalid: 0 },
        target: { id: thisYearId, term: '2026 Autumn' },
      });
      const pia = (await models().User.findOne({ where: { email: 'piay@test.example' } }))!;
      expect(await models().CourseMembership.findOne({ where: { userId: pia.id, courseId: w.course.id } })).toMatchObject({
        role: 'student',
        cohortId: thisYearId,
      });
      const audit = await models().AuditEntry.findOne({ where: { action: 'roster.import' }, order: [['id', 'DESC']] });
      expect((audit!.after as { cohortId: number }).cohortId).toBe(thisYearId);
    });

    it('or finds the cohort from an optional term column', async () => {
      const res = await csvRequest(w.course.id, file('z', ',2025 Autumn'), 'import', w.people.instructor.id);
      expect(res.status).toBe(200);
      const pia = (await models().User.findOne({ where: { email: 'piaz@test.example' } }))!;
      expect(await models().CourseMembership.findOne({ where: { userId: pia.id, courseId: w.course.id } })).toMatchObject({
        cohortId: lastYearId,
      });
    });

    it('refuses a row whose cohort disagrees with the chosen one, and a cohort of another course', async () => {
      const before = await counts();
      const body = await (
        await csvRequest(
          w.course.id,
          file('q').replace('Rune Halvorsenq,runeq@test.example,Gq2,Group A', 'Rune Halvorsenq,runeq@test.example,Gq2,Cohort 2'),
          'preview',
          w.people.instructor.id,
          thisYearId,
        )
      ).json();
      expect(body.rows[1].reasons[0]).toMatch(/The file puts this student in "Cohort 2", but the import is into Group A \(2026 Autumn\)/);
      const foreign = await csvRequest(w.course.id, file('r'), 'preview', w.people.instructor.id, w.foreignCohort.id);
      expect(foreign.status).toBe(400);
      expect((await foreign.json()).error).toMatch(/not an open cohort of this course/);
      expect((await csvRequest(w.course.id, file('r'), 'preview', w.people.instructor.id, 'abc')).status).toBe(400);
      expect(await counts()).toEqual(before);
    });
  });

  it('lists every problem of a row, not only the first', async () => {
    const csv = 'name,email,student_number,cohort\n,not-an-address,,Cohort 9\n';
    const body = await (await csvRequest(w.course.id, csv, 'preview', w.people.instructor.id)).json();
    expect(body.rows[0].status).toBe('invalid');
    expect(body.rows[0].reasons).toEqual([
      'The name is empty.',
      '"not-an-address" is not an e-mail address.',
      'The student number is empty.',
      expect.stringMatching(/^No open cohort "Cohort 9" in this course/),
    ]);
  });

  it('imports all rows in one go, queues invitations, and a second import changes nothing', async () => {
    const res = await csvRequest(w.course.id, good('i'), 'import', w.people.instructor.id);
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body).toMatchObject({ created: 2, enrolled: 2, invited: 2 });
    const after = await counts();
    const again = await (await csvRequest(w.course.id, good('i'), 'import', w.people.instructor.id)).json();
    expect(again).toMatchObject({ created: 0, enrolled: 0, invited: 0, counts: { new: 0, enrolled: 2, invalid: 0 } });
    expect(await counts()).toEqual(after);
    const amira = await models().User.findOne({ where: { email: 'amirai@test.example' } });
    expect(amira!.passwordHash).toBeNull();
    const m = await models().CourseMembership.findOne({ where: { userId: amira!.id, courseId: w.course.id } });
    expect(m).toMatchObject({ role: 'student', cohortId: w.cohort.id });
  });
});

describe('authorisation', () => {
  const cases = () =>
    [
      ['roster preview', () => csvRequest(w.course.id, 'name,email,student_number,cohort\n', 'preview', w.people.ta.id)],
      [
        'add staff',
        async () =>
          staff.POST(
            await apiRequest('/x', { as: w.people.ta.id, body: { email: 'n@test.example', role: 'ta', name: 'N' } }),
            params({ courseId: String(w.course.id) }),
          ),
      ],
      [
        'create cohort',
        async () =>
          cohorts.POST(
            await apiRequest('/x', { as: w.people.student.id, body: { name: 'X', term: 'T' } }),
            params({ courseId: String(w.course.id) }),
          ),
      ],
      [
        'rename course',
        async () =>
          course.PATCH(
            await apiRequest('/x', { as: w.people.ta.id, method: 'PATCH', body: { title: 'Mine' } }),
            params({ courseId: String(w.course.id) }),
          ),
      ],
      [
        'other course lead',
        async () =>
          practicals.POST(await apiRequest('/x', { as: w.people.otherLead.id, body: {} }), params({ courseId: String(w.course.id) })),
      ],
      [
        'assign TA',
        async () =>
          ta.POST(
            await apiRequest('/x', { as: w.people.ta.id, body: { taId: w.people.ta.id, cohortId: w.otherCohort.id } }),
            params({ courseId: String(w.course.id) }),
          ),
      ],
    ] as const;

  it('gives a TA, a student or a lead of another course 403 and an anonymous caller 401', async () => {
    const before = await counts();
    for (const [name, call] of cases()) {
      const res = await call();
      expect(res.status, name).toBe(403);
    }
    const anon = await staff.POST(
      await apiRequest('/x', { as: null, body: { email: 'n@test.example', role: 'ta' } }),
      params({ courseId: String(w.course.id) }),
    );
    expect(anon.status).toBe(401);
    const anonRoster = await csvRequest(w.course.id, 'name,email,student_number,cohort\n', 'preview', null);
    expect(anonRoster.status).toBe(401);
    expect(await counts()).toEqual(before);
  });

  it('lets only instructors and leads create courses', async () => {
    const res = await courses.POST(await apiRequest('/api/courses', { as: w.people.ta.id, body: { code: 'TA101', title: 'No' } }), {});
    expect(res.status).toBe(403);
    const ok = await courses.POST(
      await apiRequest('/api/courses', { as: w.people.instructor.id, body: { code: `NEW${w.course.id}`, title: 'New course' } }),
      {},
    );
    expect(ok.status).toBe(201);
  });

  it('refuses an unknown staff role with 400', async () => {
    const res = await staff.POST(
      await apiRequest('/x', { as: w.people.instructor.id, body: { email: 'r@test.example', role: 'dean', name: 'R' } }),
      params({ courseId: String(w.course.id) }),
    );
    expect(res.status).toBe(400);
    expect((await res.json()).error).toMatch(/Role must be ta, instructor or lead/);
  });
});

describe('invitations', () => {
  it('reaches the mail catcher, and its link sets a password once', async () => {
    const email = `newta-${Date.now()}@test.example`;
    const res = await staff.POST(
      await apiRequest('/x', { as: w.people.instructor.id, body: { email, role: 'ta', name: 'New Marker' } }),
      params({ courseId: String(w.course.id) }),
    );
    expect(res.status).toBe(201);
    await deliverOutbox();
    const [mail] = await waitForMail(email);
    expect(mail.subject).toMatch(/Your Oscillab account for TEST/);
    const token = /\/welcome\/([A-Za-z0-9_-]{30,})/.exec(mail.text)![1];
    const stored = await models().OneTimeToken.findAll();
    expect(stored.some((t) => t.tokenHash === token)).toBe(false); // only the hash is stored

    const weak = await accept.POST(
      await apiRequest('/api/invitations/accept', { body: { token, password: 'aaaaaaaaaaaa', confirm: 'aaaaaaaaaaaa' } }),
      {},
    );
    expect(weak.status).toBe(400);
    const first = await accept.POST(
      await apiRequest('/api/invitations/accept', { body: { token, password: 'spectral-lines-42', confirm: 'spectral-lines-42' } }),
      {},
    );
    expect(first.status).toBe(200);
    const second = await accept.POST(
      await apiRequest('/api/invitations/accept', { body: { token, password: 'another-pass-99', confirm: 'another-pass-99' } }),
      {},
    );
    expect(second.status).toBe(410);
    expect((await second.json()).error).toMatch(/already been used/);
    const { verifyPassword } = await import('@/lib/auth/password');
    const user = await models().User.findOne({ where: { email } });
    expect(await verifyPassword('spectral-lines-42', user!.passwordHash!)).toBe(true);
  });

  it('refuses an expired link', async () => {
    const user = await models().User.create({
      email: `late-${Date.now()}@test.example`,
      name: 'Late',
      passwordHash: null,
      isAdmin: false,
      studentNumber: null,
    });
    const token = await inviteUser(user, { courseTitle: 'T', role: 'student' }, undefined, new Date(Date.now() - 8 * 86_400_000));
    const res = await accept.POST(
      await apiRequest('/api/invitations/accept', { body: { token, password: 'spectral-lines-42', confirm: 'spectral-lines-42' } }),
      {},
    );
    expect(res.status).toBe(410);
    expect((await res.json()).error).toMatch(/expired/);
    expect((await user.reload()).passwordHash).toBeNull();
  });
});

describe('practicals, bands and preview', () => {
  let practicalId: number;
  let bandCentreId: number;
  let kId: number;
  const as = () => w.people.instructor.id;
  const pp = () => params({ practicalId: String(practicalId) });

  it('creates a practical for H35Cl and D35Cl with deadlines per cohort', async () => {
    const res = await practicals.POST(
      await apiRequest('/x', {
        as: as(),
        body: {
          title: 'HCl fundamental',
          species: ['H35Cl', 'D³⁵Cl'],
          instructions: 'Use $k = 4\\pi^2 c^2 \\tilde\\nu^2 \\mu$.',
          hazardNotes: 'Toxic gas.',
          mode: 'practice',
          maxAttempts: 3,
          lateRule: 'penalty',
          latePenaltyPerDay: 10,
          latePenaltyCap: 50,
          deadlines: [
            { cohortId: w.cohort.id, deadline: '2026-12-10T17:00:00Z' },
            { cohortId: w.otherCohort.id, deadline: '2026-12-17T17:00:00Z' },
          ],
        },
      }),
      params({ courseId: String(w.course.id) }),
    );
    expect(res.status).toBe(201);
    practicalId = (await res.json()).practical.id;
    const foreign = await practical.PUT(
      await apiRequest('/x', {
        as: as(),
        method: 'PUT',
        body: {
          title: 'x',
          species: ['H35Cl'],
          mode: 'practice',
          maxAttempts: 1,
          lateRule: 'none',
          latePenaltyPerDay: 0,
          latePenaltyCap: 0,
          deadlines: [{ cohortId: w.foreignCohort.id, deadline: '2026-12-10' }],
        },
      }),
      pp(),
    );
    expect(foreign.status).toBe(400);
    const bad = await practicals.POST(
      await apiRequest('/x', {
        as: as(),
        body: {
          title: 'x',
          species: ['HCl3'],
          mode: 'practice',
          maxAttempts: 1,
          lateRule: 'none',
          latePenaltyPerDay: 0,
          latePenaltyCap: 0,
        },
      }),
      params({ courseId: String(w.course.id) }),
    );
    expect(bad.status).toBe(400);
  });

  it('adds quantities with literature references shown with their source', async () => {
    const add = async (body: object) => quantities.POST(await apiRequest('/x', { as: as(), body }), pp());
    const r1 = await add({
      key: 'bandCentre',
      species: 'H35Cl',
      unit: 'cm-1',
      marks: 2,
      uncertaintyRequired: true,
      referenceKind: 'literature',
    });
    expect(r1.status).toBe(201);
    bandCentreId = (await r1.json()).quantity.id;
    const r2 = await add({
      key: 'forceConstant',
      species: 'H35Cl',
      unit: 'N/m',
      marks: 2,
      uncertaintyRequired: false,
      referenceKind: 'department',
      referenceValue: 480.0,
      referenceNote: 'Demonstrator run, bench 2, 2026',
    });
    kId = (await r2.json()).quantity.id;
    expect(
      (await add({ key: 'bandCentre', species: 'H79Br', unit: 'cm-1', marks: 1, uncertaintyRequired: false, referenceKind: 'literature' }))
        .status,
    ).toBe(400);
    expect(
      (await add({ key: 'bandCentre', species: 'D35Cl', unit: 'kg', marks: 1, uncertaintyRequired: false, referenceKind: 'literature' }))
        .status,
    ).toBe(400);
    const detail = await (await practical.GET(await apiRequest('/x', { as: as() }), pp())).json();
    const bc = detail.quantities.find((q: { id: number }) => q.id === bandCentreId);
    // H³⁵Cl band origin 2885.98 cm⁻¹ (high-resolution measurements, as lib/grading's reference table cites it)
    expect(bc.reference.value).toBeCloseTo(2885.98, 2);
    expect(bc.reference.source).toMatch(/band origin/);
    const k = detail.quantities.find((q: { id: number }) => q.id === kId);
    expect(k.reference).toMatchObject({ kind: 'department', source: 'Demonstrator run, bench 2, 2026' });
    expect(k.reference.value).toBeCloseTo(480.0, 6);
    expect(detail.instructionsHtml).toContain('class="katex"');
  });

  it('lets a cohort override beat the course default, in resolveBands and in the preview', async () => {
    const put = async (body: object) => bands.PUT(await apiRequest('/x', { as: as(), method: 'PUT', body }), pp());
    expect(
      (
        await put({
          quantityDefinitionId: bandCentreId,
          cohortId: null,
          basis: 'accuracy',
          kind: 'absolute',
          inner: 2,
          outer: 5,
          unit: 'cm-1',
        })
      ).status,
    ).toBe(200);
    expect(
      (
        await put({
          quantityDefinitionId: bandCentreId,
          cohortId: w.otherCohort.id,
          basis: 'accuracy',
          kind: 'absolute',
          inner: 4,
          outer: 8,
          unit: 'cm-1',
        })
      ).status,
    ).toBe(200);
    expect(
      (await put({ quantityDefinitionId: bandCentreId, cohortId: null, basis: 'consistency', kind: 'relative', inner: 0.005, outer: 0.02 }))
        .status,
    ).toBe(200);
    expect(
      (
        await put({
          quantityDefinitionId: bandCentreId,
          cohortId: w.foreignCohort.id,
          basis: 'accuracy',
          kind: 'absolute',
          inner: 1,
          unit: 'cm-1',
        })
      ).status,
    ).toBe(400);
    expect(
      (
        await put({
          quantityDefinitionId: bandCentreId,
          cohortId: null,
          basis: 'accuracy',
          kind: 'absolute',
          inner: 5,
          outer: 2,
          unit: 'cm-1',
        })
      ).status,
    ).toBe(400);

    const forA = (await resolveBands([bandCentreId], w.cohort.id)).get(bandCentreId)!;
    const forB = (await resolveBands([bandCentreId], w.otherCohort.id)).get(bandCentreId)!;
    expect(forA.accuracy).toMatchObject({ cohortId: null, inner: 2, outer: 5 });
    expect(forB.accuracy).toMatchObject({ cohortId: w.otherCohort.id, inner: 4, outer: 8 });
    expect(forB.consistency).toMatchObject({ cohortId: null, kind: 'relative', inner: 0.005 });
    expect(toleranceFor(forB.accuracy!)).toEqual({ absolute: 4, unit: 'cm-1', partial: { absolute: 8 } });
    expect(toleranceFor(forB.consistency!)).toEqual({ relative: 0.005, partial: { relative: 0.02 } });

    // 2889.0 cm⁻¹ is 3.0 cm⁻¹ from the H³⁵Cl band origin 2885.98 cm⁻¹ (reference table of lib/grading)
    const ask = async (cohortId: number) =>
      (
        await preview.POST(
          await apiRequest('/x', {
            as: as(),
            body: { quantityDefinitionId: bandCentreId, cohortId, value: 2889.0, unit: 'cm-1', recomputed: 2889.5 },
          }),
          pp(),
        )
      ).json();
    const a = await ask(w.cohort.id);
    const b = await ask(w.otherCohort.id);
    expect(a.results[1]).toMatchObject({ basis: 'accuracy', verdict: 'partial', marks: 0.5, maxMarks: 1, bandFrom: 'course' });
    expect(b.results[1]).toMatchObject({ basis: 'accuracy', verdict: 'within', marks: 1, bandFrom: 'cohort' });
    expect(a.results[0]).toMatchObject({ basis: 'consistency', verdict: 'within' });
  });

  it('asks whether to re-check when submissions exist, and audits who changed what', async () => {
    const { Submission, AuditEntry } = models();
    await Submission.create({
      practicalId,
      cohortId: w.cohort.id,
      studentId: w.people.student.id,
      attempt: 1,
      status: 'submitted',
      draft: null,
      submittedAt: new Date(),
      checkSummary: null,
      lineListHash: null,
      markedById: null,
      markedAt: null,
      releasedAt: null,
      resubmissionMessage: null,
      proposedTotal: null,
      awardedTotal: null,
      maxTotal: null,
    });
    const body = {
      quantityDefinitionId: bandCentreId,
      cohortId: null,
      basis: 'accuracy',
      kind: 'absolute',
      inner: 3,
      outer: 6,
      unit: 'cm-1',
    };
    const conflict = await bands.PUT(await apiRequest('/x', { as: as(), method: 'PUT', body }), pp());
    expect(conflict.status).toBe(409);
    expect(await conflict.json()).toMatchObject({ needsRecheckDecision: true, submissions: 1 });
    expect((await resolveBands([bandCentreId], w.cohort.id)).get(bandCentreId)!.accuracy!.inner).toBe(2);
    const ok = await bands.PUT(await apiRequest('/x', { as: as(), method: 'PUT', body: { ...body, recheck: true } }), pp());
    expect(await ok.json()).toMatchObject({ submissions: 1, rechecked: 1 });
    const entry = await AuditEntry.findOne({ where: { action: 'band.update' }, order: [['id', 'DESC']] });
    expect(entry).toMatchObject({ actorId: as() });
    expect((entry!.before as { inner: number }).inner).toBe(2);
    expect((entry!.after as { inner: number }).inner).toBe(3);
    expect(await AuditEntry.count({ where: { action: 'practical.recheck', entityId: practicalId } })).toBe(1);
  });

  it('copies a practical with quantities and bands, mapping or dropping cohort overrides', async () => {
    const newCohort = await models().Cohort.create({
      courseId: w.course.id,
      name: 'Cohort 1',
      term: '2027 Spring',
      instrument: null,
      archivedAt: null,
    });
    const run = async (cohortMap: Record<string, number | null>) =>
      (
        await copy.POST(
          await apiRequest('/x', {
            as: as(),
            body: { title: 'HCl fundamental (2027)', cohortMap, deadlines: [{ cohortId: newCohort.id, deadline: '2027-03-01T17:00:00Z' }] },
          }),
          pp(),
        )
      ).json();
    const mapped = await run({ [String(w.otherCohort.id)]: newCohort.id });
    const d = await (
      await practical.GET(await apiRequest('/x', { as: as() }), params({ practicalId: String(mapped.practical.id) }))
    ).json();
    expect(d.practical.copiedFromId).toBe(practicalId);
    expect(d.quantities.map((q: { key: string }) => q.key).sort()).toEqual(['bandCentre', 'forceConstant']);
    const bc = d.quantities.find((q: { key: string }) => q.key === 'bandCentre');
    expect(bc.bands).toHaveLength(3);
    expect(bc.bands.find((b: { cohortId: number | null }) => b.cohortId === newCohort.id)).toMatchObject({
      inner: 4,
      outer: 8,
      basis: 'accuracy',
    });
    expect(d.deadlines).toEqual([{ cohortId: newCohort.id, deadline: '2027-03-01T17:00:00.000Z' }]);
    const dropped = await run({});
    const d2 = await (
      await practical.GET(await apiRequest('/x', { as: as() }), params({ practicalId: String(dropped.practical.id) }))
    ).json();
    expect(
      d2.quantities
        .find((q: { key: string }) => q.key === 'bandCentre')
        .bands.every((b: { cohortId: number | null }) => b.cohortId === null),
    ).toBe(true);
  });

  it('refuses the practical APIs to a TA (403) and to anonymous callers (401)', async () => {
    const taRes = await preview.POST(
      await apiRequest('/x', { as: w.people.ta.id, body: { quantityDefinitionId: bandCentreId, cohortId: null, value: 1, unit: 'cm-1' } }),
      pp(),
    );
    expect(taRes.status).toBe(403);
    const stRes = await practical.GET(await apiRequest('/x', { as: w.people.student.id }), pp());
    expect(stRes.status).toBe(403);
    const anon = await bands.PUT(await apiRequest('/x', { as: null, method: 'PUT', body: {} }), pp());
    expect(anon.status).toBe(401);
  });
});

describe('instructions', () => {
  it('renders KaTeX and strips script', () => {
    const html = renderInstructions(
      'Force constant $k = 4\\pi^2 c^2 \\tilde\\nu^2 \\mu$\n\n$$B = \\frac{h}{8\\pi^2 c \\mu r^2}$$\n\n<script>alert(1)</script><img src=x onerror=alert(1)>',
    );
    expect(html).toContain('class="katex"');
    expect(html).toContain('katex-display');
    expect(html).not.toMatch(/<script|onerror/);
  });
});
