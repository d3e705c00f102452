/**
 * Checked submissions for the integration tests and the release benchmark, written through
 * the models the way the submission checker writes them (engine output from lib/grading on a
 * simulated line list). Not used by the app itself.
 */
import { checkSubmission, marksFor, simulateLineList, QUANTITIES, type QuantityKey, type Num } from '@/lib/grading';
import { models } from '@/models';
import { worstVerdict } from './verdict';
import { NOT_YET_CHECKED_OR_MARKED } from '@/lib/submissions/service';

export const FIXTURE_SPECIES = 'H35Cl';

export async function createFixturePractical(courseId: number, cohortIds: number[]) {
  const { Practical, PracticalCohort } = models();
  const practical = await Practical.create({
    courseId,
    title: 'Rotation–vibration band of HCl',
    species: [FIXTURE_SPECIES],
    rubric: [{ key: 'discussion', title: 'Discussion of errors', marks: 2, guidance: 'Names the main sources of error and their size.' }],
    copiedFromId: null,
    archivedAt: null,
  });
  for (const cohortId of cohortIds)
    await PracticalCohort.create({ practicalId: practical.id, cohortId, opensAt: null, deadline: new Date('2026-12-01T17:00:00Z') });
  return practical;
}

/** The reported values: `slip` makes the force constant with mass numbers 1 and 35 (a named slip). */
export function reportedValues(variant: { slip?: boolean; offset?: number } = {}): Partial<Record<QuantityKey, Num>> {
  const nu0 = 2885.9 + (variant.offset ?? 0);
  return {
    bandCentre: { value: nu0.toFixed(1), unit: 'cm-1' },
    reducedMass: { value: variant.slip ? '0.9722' : '0.9796', unit: 'u' },
    forceConstant: { value: variant.slip ? '477.1' : '480.7', unit: 'N/m' },
    B0: { value: '10.44', unit: 'cm-1' },
  };
}

export async function createCheckedSubmission(opts: {
  practicalId: number;
  cohortId: number;
  studentId: number;
  slip?: boolean;
  offset?: number;
  latePenalty?: number;
  submittedAt?: Date;
}) {
  const { Submission, SubmittedValue, CheckResult, SlipFinding, Mark, LineAssignment } = models();
  const lines = simulateLineList(FIXTURE_SPECIES, { jMax: 8 }).map((l) => ({
    branch: l.branch as 'P' | 'R',
    J: l.J,
    wavenumber: Math.round(l.wavenumber * 100) / 100,
  }));
  const reported = reportedValues(opts);
  const result = checkSubmission({
    species: FIXTURE_SPECIES as never,
    measured: { bandCentre: reported.bandCentre, lines },
    reported,
    tolerances: {
      bandCentre: { absolute: 2, unit: 'cm-1' },
      forceConstant: { relative: 0.01 },
      B0: { relative: 0.01, partial: { relative: 0.03 } },
      reducedMass: { relative: 0.001 },
    },
    requireUncertainty: false,
  });
  const quantities = result.quantities;
  const outside = quantities.some((q) => q.verdict === 'outside');
  const slips = quantities.flatMap((q) => q.diagnoses.map((d) => ({ key: `${q.key}:${FIXTURE_SPECIES}`, code: d.code })));
  const submission = await Submission.create({
    practicalId: opts.practicalId,
    cohortId: opts.cohortId,
    studentId: opts.studentId,
    attempt: 1,
    status: 'submitted',
    draft: null,
    submittedAt: opts.submittedAt ?? new Date('2026-11-28T10:15:00Z'),
    latePenalty: opts.latePenalty ?? 0,
    daysLate: opts.latePenalty ? 1 : 0,
    flagLate: !!opts.latePenalty,
    ...NOT_YET_CHECKED_OR_MARKED,
    checkSummary: JSON.parse(JSON.stringify(result)),
    flagOutside: outside,
    flagSlip: slips.length > 0,
  });
  const sid = submission.id;
  await LineAssignment.bulkCreate(
    lines.map((l) => ({
      submissionId: sid,
      species: FIXTURE_SPECIES,
      branch: l.branch,
      J: l.J,
      wavenumber: l.wavenumber,
      source: 'student',
    })),
  );
  for (const [key, num] of Object.entries(reported)) {
    const q = quantities.find((x) => x.key === key);
    await SubmittedValue.create({
      submissionId: sid,
      key,
      species: FIXTURE_SPECIES,
      valueText: String(num!.value),
      unit: num!.unit,
      uncertaintyText: null,
      valueSI: q?.reportedSI ?? null,
    });
  }
  await CheckResult.bulkCreate(
    quantities.map((q) => ({
      submissionId: sid,
      key: q.key,
      species: FIXTURE_SPECIES,
      basis: q.basis,
      reportedSI: q.reportedSI,
      expectedSI: q.expectedSI,
      deviation: q.deviation,
      relativeDeviation: q.relativeDeviation,
      verdict: q.verdict,
      slipCodes: q.diagnoses.map((d) => d.code).join(','),
    })),
  );
  if (slips.length) await SlipFinding.bulkCreate(slips.map((s) => ({ submissionId: sid, ...s })));
  let proposedTotal = 0;
  let maxTotal = 0;
  for (const key of Object.keys(reported) as QuantityKey[]) {
    const checks = quantities.filter((q) => q.key === key);
    const verdict = worstVerdict(
      checks.find((c) => c.basis === 'consistency')?.verdict,
      checks.find((c) => c.basis === 'accuracy')?.verdict,
    );
    const proposed = marksFor(verdict === 'not-checked' ? 'outside' : verdict, 2);
    proposedTotal += proposed;
    maxTotal += 2;
    await Mark.create({
      submissionId: sid,
      itemKey: `${key}:${FIXTURE_SPECIES}`,
      label: `${QUANTITIES[key].label} (${FIXTURE_SPECIES})`,
      maxMarks: 2,
      proposed,
      awarded: null,
      comment: null,
      markerId: null,
    });
  }
  await Mark.create({
    submissionId: sid,
    itemKey: 'rubric:discussion',
    label: 'Discussion of errors',
    maxMarks: 2,
    proposed: null,
    awarded: null,
    comment: null,
    markerId: null,
  });
  maxTotal += 2;
  const count = (v: string) => quantities.filter((q) => q.verdict === v).length;
  await submission.update({
    proposedTotal,
    maxTotal,
    verdictsWithin: count('within'),
    verdictsPartial: count('partial'),
    verdictsOutside: count('outside'),
    verdictsNotChecked: quantities.length - count('within') - count('partial') - count('outside'),
    slipCodes: [...new Set(slips.map((s) => s.code))].sort().join(','),
  });
  return submission;
}
