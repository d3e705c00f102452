/**
 * One demo attempt written as a student's hand-in would be: the submission row, its typed values
 * and its line list. Shared by the demo's submissions (submissions.ts) and last year's cohort
 * (last-year.ts); the late penalty follows the practical's rule (latePenaltyFor).
 */
import { models } from '@/models';
import type { Practical } from '@/models/practical';
import type { Submission } from '@/models/submission';
import { latePenaltyFor } from '@/lib/submissions/service';
import type { DemoLine, DemoValue } from './report';

export async function createDemoAttempt(input: {
  practical: Practical;
  cohortId: number;
  studentId: number;
  submittedAt: Date;
  daysLate: number;
  values: readonly DemoValue[];
  lines: readonly DemoLine[];
}): Promise<Submission> {
  const { Submission, SubmittedValue, LineAssignment } = models();
  const { practical, daysLate } = input;
  const sub = await Submission.create({
    practicalId: practical.id,
    cohortId: input.cohortId,
    studentId: input.studentId,
    attempt: 1,
    status: 'submitted',
    draft: null,
    submittedAt: input.submittedAt,
    daysLate,
    latePenalty: latePenaltyFor(practical, daysLate),
    flagLate: daysLate > 0,
    isMarkedAttempt: true,
    checkSummary: null,
    lineListHash: null,
    proposedTotal: null,
    awardedTotal: null,
    maxTotal: null,
    markedById: null,
    markedAt: null,
    releasedAt: null,
    resubmissionMessage: null,
    version: 0,
  });
  await SubmittedValue.bulkCreate(input.values.map((v) => ({ ...v, submissionId: sub.id, valueSI: null })));
  await LineAssignment.bulkCreate(
    input.lines.map((l) => ({
      submissionId: sub.id,
      species: l.species,
      branch: l.branch,
      J: l.J,
      wavenumber: l.wavenumber,
      source: 'student' as const,
    })),
  );
  return sub;
}
