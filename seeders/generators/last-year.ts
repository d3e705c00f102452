/**
 * Demo data for the year-on-year comparison (fictional, Northmere University): last year's CHEM2041
 * cohort "Group A, 2025 Autumn" with a copy of "HCl/DCl fundamental band" and 20 alumni whose
 * submissions went through the real pipeline — line lists simulated from published constants
 * (simulateLineList) with seeded noise, values derived with the engine's own formulas (fitBandModels,
 * forceConstantFromBand, bondLengthFromB), some with one named slip; checked by
 * checkStoredSubmission, marked by ta1 through saveMarks (the engine's proposal for most, a few
 * overrides with a comment), then released. Dates are moved back to autumn 2025.
 * Idempotent: an alumnus who already has a submission to the copy is skipped.
 */
import { Op } from 'sequelize';
import { models } from '@/models';
import { gaussian, mulberry32 } from '@/lib/spectrum';
import { copyPractical } from '@/lib/instructor/practicals';
import { saveMarks } from '@/lib/marking/marks';
import { checkStoredSubmission } from '@/lib/submissions/check';
import { DEMO_PASSWORD, FIRST_NAMES, LAST_NAMES } from '../data/demo-cast.cjs';
import { noisyLineList, reportedValues, type DemoLine, type DemoSlip, type DemoValue } from './report';
import { createDemoAttempt } from './attempt';

export const LAST_YEAR = {
  term: '2025 Autumn',
  name: 'Group A',
  instrument: 'FTIR bench 1 (0.5 cm⁻¹)',
  deadline: '2025-11-14T17:00:00.000Z',
};
const TITLE = 'HCl/DCl fundamental band';
const ALUMNI = 20;
// Last year's briefing did not stress 2π in ν = (1/2π)√(k/μ) or SI masses: more of those slips.
const SLIP_PLAN: readonly DemoSlip[] = [
  'correct',
  'missing-2pi',
  'correct',
  'mass-numbers-used',
  'correct',
  'grams-not-kilograms',
  'missing-2pi',
  'correct',
  'r0-reported-as-re',
  'correct',
];
const OVERRIDES: Record<number, { delta: number; comment: string }> = {
  3: { delta: 0.5, comment: 'Method fully correct; only the masses were taken as mass numbers — some credit restored.' },
  9: { delta: -1, comment: 'Band centre read from the strongest line, not the band origin.' },
  11: { delta: 1, comment: 'Working shows the 2π; the final line dropped it when the result was copied out.' },
  17: { delta: -0.5, comment: 'No uncertainty given for the force constant.' },
};

export async function seedLastYearDemo(): Promise<{ created: number; skipped: string | null }> {
  const { Course, Cohort, Practical, PracticalCohort, User, CourseMembership, Submission, Mark } = models();
  const course = await Course.findOne({ where: { code: 'CHEM2041' } });
  if (!course) return { created: 0, skipped: 'CHEM2041 not seeded' };
  const source = await Practical.findOne({ where: { courseId: course.id, title: TITLE, copiedFromId: null } });
  const ta1 = await User.findOne({ where: { email: 'ta1@northmere.example' } });
  const lead = await User.findOne({ where: { email: 'lead@northmere.example' } });
  if (!source || !ta1 || !lead) return { created: 0, skipped: 'demo practicals or staff not seeded' };

  const [cohort] = await Cohort.findOrCreate({
    where: { courseId: course.id, name: LAST_YEAR.name, term: LAST_YEAR.term },
    defaults: { courseId: course.id, name: LAST_YEAR.name, term: LAST_YEAR.term, instrument: LAST_YEAR.instrument, archivedAt: null },
  });
  const thisYearA = await Cohort.findOne({ where: { courseId: course.id, name: 'Group A', term: '2026 Autumn' } });
  const existingLink = await PracticalCohort.findOne({ where: { cohortId: cohort.id } });
  let practical = existingLink ? await Practical.findOne({ where: { id: existingLink.practicalId, title: TITLE } }) : null;
  if (!practical) {
    // The instructor workspace's own copy: quantities and bands, Group A's overrides mapped onto last year's Group A.
    practical = await copyPractical(
      source,
      {
        title: TITLE,
        cohortMap: thisYearA ? { [String(thisYearA.id)]: cohort.id } : {},
        deadlines: [{ cohortId: cohort.id, deadline: LAST_YEAR.deadline }],
      },
      lead.id,
    );
  }
  const [taDuty] = await models().TaAssignment.findOrCreate({
    where: { cohortId: cohort.id, taId: ta1.id, studentId: null },
    defaults: { cohortId: cohort.id, taId: ta1.id, studentId: null },
  });
  void taDuty;

  const { hashSync } = await import('bcryptjs');
  let hash: string | null = null;
  const deadline = new Date(LAST_YEAR.deadline);
  let created = 0;
  for (let n = 1; n <= ALUMNI; n++) {
    const email = `alumni${String(n).padStart(2, '0')}@northmere.example`;
    let student = await User.findOne({ where: { email } });
    if (!student) {
      hash ??= hashSync(DEMO_PASSWORD, 10);
      // Offsets into the invented name lists that the 2026 students do not use together.
      const name = `${FIRST_NAMES[(n * 5 + 3) % FIRST_NAMES.length]} ${LAST_NAMES[(n * 11 + 4) % LAST_NAMES.length]}`;
      student = await User.create({ email, name, passwordHash: hash, isAdmin: false, studentNumber: `NM25${String(3800 + n)}` });
    }
    await CourseMembership.findOrCreate({
      where: { userId: student.id, courseId: course.id, role: 'student' },
      defaults: { userId: student.id, courseId: course.id, role: 'student', cohortId: cohort.id },
    });
    if (await Submission.findOne({ where: { practicalId: practical.id, studentId: student.id, attempt: { [Op.gt]: 0 } } })) continue;

    const plan = SLIP_PLAN[n % SLIP_PLAN.length];
    const late = n % 7 === 0 ? 1 : 0;
    const submittedAt = new Date(deadline.getTime() + (late ? 20 : -(ALUMNI - n) * 5) * 3600_000);
    const { values, lines } = reportOf(practical.species, plan, 7000 + n);
    const sub = await createDemoAttempt({
      practical,
      cohortId: cohort.id,
      studentId: student.id,
      submittedAt,
      daysLate: late,
      values,
      lines,
    });
    await checkStoredSubmission(sub.id);

    // Marking by ta1: the proposal, hand marks for the rubric, and a few overrides with a reason.
    const marks = await Mark.findAll({ where: { submissionId: sub.id }, order: [['id', 'ASC']] });
    const override = OVERRIDES[n];
    let overridden = false;
    const items = marks.map((m) => {
      if (m.proposed === null) return { itemKey: m.itemKey, awarded: Math.min(m.maxMarks, 2 + ((n * 3 + m.id) % 3)), comment: null };
      if (override && !overridden && (override.delta > 0 ? m.proposed + override.delta <= m.maxMarks : m.proposed + override.delta >= 0)) {
        overridden = true;
        return { itemKey: m.itemKey, awarded: m.proposed + override.delta, comment: override.comment };
      }
      return { itemKey: m.itemKey, awarded: m.proposed, comment: null };
    });
    const fresh = (await Submission.findByPk(sub.id))!;
    await saveMarks(ta1.id, sub.id, { version: fresh.version, items });
    const markedAt = new Date(deadline.getTime() + (6 + n / 4) * 86400_000);
    const releasedAt = new Date(deadline.getTime() + 14 * 86400_000);
    await Submission.update({ status: 'released', markedAt, releasedAt }, { where: { id: sub.id, status: 'marked' } });
    created++;
  }
  return { created, skipped: null };
}

/** A student's reported values and assigned lines, from a simulated line list with seeded noise (slips in H³⁵Cl only). */
function reportOf(speciesList: string[], plan: DemoSlip, seed: number): { values: DemoValue[]; lines: DemoLine[] } {
  const noise = gaussian(mulberry32(seed));
  const values: DemoValue[] = [];
  const lines: DemoLine[] = [];
  for (const sp of speciesList) {
    const own = noisyLineList(sp, 0.04, noise);
    lines.push(...own);
    values.push(...(reportedValues(sp, own, plan, { r0OnlyInH35Cl: true }) ?? []));
  }
  return { values, lines };
}
