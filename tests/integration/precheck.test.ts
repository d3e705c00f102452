/**
 * "Check without submitting" (POST /api/submissions/check): the draft's format and unit checks —
 * and in practice mode the verdicts — before an attempt is spent; nothing is written. And the
 * proposal for a quantity the student did not report: 0, with the reason on the marking view.
 * Expected k from k = 4π²c²ν̃²μ with CODATA 2018 c and u, AME2020 isotopic masses
 * (tests/fixtures/submissions/practical.ts).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { models } from '@/models';
import { buildWorld, type World } from '@/tests/helpers/world';
import { apiRequest, params } from '@/tests/helpers/session';
import { POST as check } from '@/app/api/submissions/check/route';
import { PUT as saveDraftRoute } from '@/app/api/submissions/draft/route';
import { POST as submit } from '@/app/api/submissions/[id]/submit/route';
import { loadMarkingView } from '@/lib/marking/view';
import type { PrecheckView } from '@/lib/submissions/precheck';
import { buildPractical, CONST, draftFor, kFrom, muU } from '@/tests/fixtures/submissions/practical';

let world: World;
let practiceId: number;
let assessedId: number;
const NU0 = 2886.0;
const MU = muU(CONST.mH, CONST.mCl35);

async function counts() {
  const { Submission, SubmittedValue, CheckResult, Mark, AuditEntry } = models();
  return {
    subs: await Submission.count(),
    values: await SubmittedValue.count(),
    checks: await CheckResult.count(),
    marks: await Mark.count(),
    audit: await AuditEntry.count(),
  };
}

const runCheck = async (as: number, practicalId: number, draft: unknown) =>
  check(await apiRequest('/api/submissions/check', { as, body: { practicalId, draft } }), params({}));

beforeAll(async () => {
  world = await buildWorld();
  practiceId = (await buildPractical(world)).practical.id;
  assessedId = (await buildPractical(world, { mode: 'assessed' })).practical.id;
});

describe('check without submitting', () => {
  it('names a wrong unit and the missing uncertainty, shows verdicts in practice mode, and writes nothing', async () => {
    const before = await counts();
    const draft = draftFor('H35Cl', {
      bandCentre: { value: NU0.toFixed(1), unit: 'cm', uncertainty: '' },
      forceConstant: { value: kFrom(NU0, MU).toFixed(1), unit: 'N/m', uncertainty: '0.3' },
    });
    const res = await runCheck(world.people.student.id, practiceId, draft);
    expect(res.status).toBe(200);
    const view = (await res.json()) as PrecheckView;
    const notes = view.formatNotes.map((n) => n.message).join('\n');
    expect(notes).toMatch(/"cm" is a unit of length/);
    expect(notes).toMatch(/Reduced mass μ \(H³⁵Cl\) was not reported/);
    expect(view.showVerdicts).toBe(true);
    expect(view.quantities.find((q) => q.key === 'forceConstant')).toBeTruthy();
    expect(view.handIn.missing).toEqual(['Reduced mass μ (H³⁵Cl)']);
    expect(view.attemptsLeft).toBe(3);
    expect(await counts()).toEqual(before);
  });

  it('in assessed mode gives the format checks only', async () => {
    const draft = draftFor('H35Cl', { bandCentre: { value: '2886.0', unit: 'cm-1', uncertainty: '0.5' } });
    const view = (await (await runCheck(world.people.student.id, assessedId, draft)).json()) as PrecheckView;
    expect(view.showVerdicts).toBe(false);
    expect(view.quantities).toEqual([]);
    expect(view.formatNotes.length).toBeGreaterThan(0);
  });

  it('is refused to anyone who may not submit to the practical, and for a bad body', async () => {
    const draft = draftFor('H35Cl', {});
    expect((await runCheck(world.people.ta.id, practiceId, draft)).status).toBe(403);
    expect((await check(await apiRequest('/api/submissions/check', { body: { practicalId: practiceId, draft } }), params({}))).status).toBe(
      401,
    );
    expect((await runCheck(world.people.student.id, 999999, draft)).status).toBe(404);
    expect(
      (await check(await apiRequest('/api/submissions/check', { as: world.people.student.id, body: { practicalId: 'x' } }), params({})))
        .status,
    ).toBe(400);
  });
});

describe('a quantity not reported', () => {
  it('is proposed 0, with the reason on the marking view (not left to mark by hand)', async () => {
    const draft = draftFor('H35Cl', {
      bandCentre: { value: NU0.toFixed(1), unit: 'cm-1', uncertainty: '0.5' },
      forceConstant: { value: kFrom(NU0, MU).toFixed(1), unit: 'N/m', uncertainty: '0.3' },
    });
    const saved = await saveDraftRoute(
      await apiRequest('/api/submissions/draft', {
        as: world.people.otherStudent.id,
        method: 'PUT',
        body: { practicalId: practiceId, draft },
      }),
      {},
    );
    const { id, version } = await saved.json();
    const res = await submit(
      await apiRequest(`/api/submissions/${id}/submit`, { as: world.people.otherStudent.id, body: { version, draft } }),
      params({ id: String(id) }),
    );
    expect(res.status).toBe(201);
    const { result } = await res.json();
    const view = await loadMarkingView(result.id);
    const mu = view.marks.find((m) => m.itemKey === 'reducedMass:H35Cl')!;
    expect(mu).toMatchObject({ proposed: 0, handMarked: false, reason: 'Not reported: proposed 0.' });
    expect(view.marks.find((m) => m.itemKey === 'rubric:discussion')).toMatchObject({ proposed: null, handMarked: true, reason: null });
    expect(view.marks.find((m) => m.itemKey === 'forceConstant:H35Cl')!.reason).toBeNull();
  });
});
