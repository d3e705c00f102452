/**
 * checkStoredSubmission on stored H³⁵Cl submissions. Expected numbers are computed here from
 * published constants: CODATA 2018 (c, atomic mass constant) and AME2020 isotopic masses
 * (¹H 1.00782503223 u, ³⁵Cl 34.968852682 u) — see tests/fixtures/submissions/practical.ts.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { models } from '@/models';
import { buildWorld, type World } from '@/tests/helpers/world';
import { apiRequest, params } from '@/tests/helpers/session';
import { PUT as saveDraftRoute } from '@/app/api/submissions/draft/route';
import { POST as submit } from '@/app/api/submissions/[id]/submit/route';
import { checkStoredSubmission } from '@/lib/submissions/check';
import { recheckPractical } from '@/lib/submissions/recheck';
import { buildPractical, CONST, draftFor, kFrom, muU } from '@/tests/fixtures/submissions/practical';

const saveDraft = (r: Request) => saveDraftRoute(r, {});
let world: World;
let practicalId: number;

/** The student's own band centre reading, cm⁻¹ (within 0.1 cm⁻¹ of the generated band origin). */
const NU0 = 2886.0;
const MU = muU(CONST.mH, CONST.mCl35); // AME2020 isotopic masses
const MU_MASS_NUMBERS = muU(1, 35); // the slip: integer mass numbers

async function submitAs(studentId: number, values: Parameters<typeof draftFor>[1]) {
  const draft = draftFor('H35Cl', values);
  const saved = await saveDraft(await apiRequest('/api/submissions/draft', { as: studentId, method: 'PUT', body: { practicalId, draft } }));
  expect(saved.status).toBe(200);
  const { id, version } = await saved.json();
  const res = await submit(
    await apiRequest(`/api/submissions/${id}/submit`, { as: studentId, body: { version, draft } }),
    params({ id: String(id) }),
  );
  const body = await res.json();
  expect(res.status, JSON.stringify(body)).toBe(201);
  return body.result as {
    id: number;
    quantities: { key: string; consistency?: { verdict: string }; accuracy?: { verdict: string }; slips: { code: string }[] }[];
  };
}

beforeAll(async () => {
  world = await buildWorld();
  practicalId = (await buildPractical(world)).practical.id;
});

describe('checkStoredSubmission', () => {
  it('a correct H³⁵Cl submission (μ from AME2020 masses, k = 4π²c²ν̃²μ with CODATA 2018 c) is within on every basis with no slips', async () => {
    const k = kFrom(NU0, MU);
    expect(k).toBeGreaterThan(478); // ≈ 481 N m⁻¹ from the fundamental (domain worked check)
    expect(k).toBeLessThan(484);
    const result = await submitAs(world.people.student.id, {
      bandCentre: { value: NU0.toFixed(1), unit: 'cm-1', uncertainty: '0.5' },
      reducedMass: { value: MU.toFixed(6), unit: 'u' },
      forceConstant: { value: k.toFixed(1), unit: 'N/m', uncertainty: '0.3' },
    });
    const { CheckResult, SlipFinding, Mark, Submission } = models();
    const rows = await CheckResult.findAll({ where: { submissionId: result.id } });
    expect(rows.length).toBeGreaterThanOrEqual(5);
    for (const r of rows) expect([r.key, r.basis, r.verdict]).toEqual([r.key, r.basis, 'within']);
    expect(await SlipFinding.count({ where: { submissionId: result.id } })).toBe(0);
    const sub = await Submission.findByPk(result.id);
    expect(sub!.flagOutside).toBe(false);
    expect(sub!.flagSlip).toBe(false);
    const marks = await Mark.findAll({ where: { submissionId: result.id } });
    expect(marks.map((m) => m.itemKey).sort()).toEqual([
      'bandCentre:H35Cl',
      'forceConstant:H35Cl',
      'reducedMass:H35Cl',
      'rubric:discussion',
    ]);
    expect(marks.find((m) => m.itemKey === 'forceConstant:H35Cl')!.proposed).toBe(2);
    expect(marks.find((m) => m.itemKey === 'rubric:discussion')!.proposed).toBeNull();
    expect(sub!.proposedTotal).toBe(6);
    expect(sub!.maxTotal).toBe(8);
  });

  it('k computed with integer mass numbers (1 and 35) is outside and named mass-numbers-used', async () => {
    const kWrong = kFrom(NU0, MU_MASS_NUMBERS);
    expect(Math.abs(kWrong / kFrom(NU0, MU) - 1)).toBeGreaterThan(0.005); // ≈ 0.7 % off (domain brief)
    const result = await submitAs(world.people.otherStudent.id, {
      bandCentre: { value: NU0.toFixed(1), unit: 'cm-1', uncertainty: '0.5' },
      reducedMass: { value: MU.toFixed(6), unit: 'u' },
      forceConstant: { value: kWrong.toFixed(1), unit: 'N/m', uncertainty: '0.3' },
    });
    const k = result.quantities.find((q) => q.key === 'forceConstant')!;
    expect(k.consistency!.verdict).toBe('outside');
    expect(k.slips.map((s) => s.code)).toContain('mass-numbers-used');
    const { SlipFinding, Submission, Mark } = models();
    const slips = await SlipFinding.findAll({ where: { submissionId: result.id } });
    expect(slips.map((s) => `${s.key}:${s.code}`)).toContain('forceConstant:mass-numbers-used');
    expect((await Submission.findByPk(result.id))!.flagSlip).toBe(true);
    // Accuracy still within (0.7 % inside the 2 % band), consistency outside: half the item's marks.
    expect((await Mark.findOne({ where: { submissionId: result.id, itemKey: 'forceConstant:H35Cl' } }))!.proposed).toBe(1);
  });

  it('re-running keeps a marker’s awarded mark and comment and does not duplicate rows', async () => {
    const { Submission, Mark, CheckResult } = models();
    const sub = await Submission.findOne({ where: { studentId: world.people.otherStudent.id, attempt: 1 } });
    const mark = await Mark.findOne({ where: { submissionId: sub!.id, itemKey: 'forceConstant:H35Cl' } });
    await mark!.update({ awarded: 1.5, comment: 'Check your masses.' });
    const before = await CheckResult.count({ where: { submissionId: sub!.id } });
    await checkStoredSubmission(sub!.id);
    const { rechecked } = await recheckPractical(practicalId);
    expect(rechecked).toBe(2);
    expect(await CheckResult.count({ where: { submissionId: sub!.id } })).toBe(before);
    expect(await Mark.count({ where: { submissionId: sub!.id } })).toBe(4);
    const again = await Mark.findOne({ where: { submissionId: sub!.id, itemKey: 'forceConstant:H35Cl' } });
    expect([again!.awarded, again!.comment, again!.proposed]).toEqual([1.5, 'Check your masses.', 1]);
  });

  it('the same line list in another student’s submission flags both for staff', async () => {
    const { Submission } = models();
    const subs = await Submission.findAll({ where: { practicalId, attempt: 1 } });
    expect(subs).toHaveLength(2);
    for (const s of subs) expect(s.flagDuplicate).toBe(true);
  });
});
