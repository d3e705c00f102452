/**
 * One demo attempt written as a student's hand-in would be: the submission row, its typed values
 * and its line list. Shared by the demo's submissions (submissions.ts) and last year's cohort
 * (last-year.ts); the row itself is the submit path's (submittedAttemptRow).
 */
import { models } from '@/models';
import type { Practical } from '@/models/practical';
import type { Submission } from '@/models/submission';
import { submittedAttemptRow } from '@/lib/submissions/service';
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
  const sub = await Submission.create(
    submittedAttemptRow({
      practical: input.practical,
      cohortId: input.cohortId,
      studentId: input.studentId,
      attempt: 1,
      draft: null,
      submittedAt: input.submittedAt,
      daysLate: input.daysLate,
    }),
  );
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
