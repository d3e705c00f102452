/**
 * "Check without submitting": the same format checks (and, in practice mode, the same verdicts)
 * a submission would get, computed from the student's draft as it is now. Writes nothing and
 * uses no attempt; the summary says what Submit would hand in, for the confirmation.
 */
import type { Actor } from '@/lib/authz';
import { QUANTITIES, isQuantityKey, speciesDisplay } from '@/lib/grading';
import { models } from '@/models';
import type { Practical } from '@/models/practical';
import type { Draft } from '@/lib/schemas/submission';
import { bandsForCohort, compareWithSpectrum, runChecks, type SpectrumCheckSummary } from './check';
import { assertOwnUploads, attemptsUsed, daysLate, draftLines, draftValues, latePenaltyFor } from './service';
import { studentChecks, type StudentChecksView } from './view';

export interface PrecheckView extends StudentChecksView {
  mode: 'practice' | 'assessed';
  showVerdicts: boolean;
  /** What Submit would hand in now. */
  handIn: {
    species: { name: string; display: string; lines: number; assigned: number; values: number }[];
    missing: string[];
    spectrum: string | null;
    report: string | null;
  };
  spectrum: SpectrumCheckSummary | null;
  attemptsLeft: number;
  attemptsTotal: number;
  /** Days late if submitted now, the penalty that would apply, and whether it would be accepted. */
  late: { days: number; penalty: number; accepted: boolean };
}

export async function precheckDraft(
  actor: Actor,
  practical: Practical,
  cohortId: number,
  draft: Draft,
  now = new Date(),
): Promise<PrecheckView> {
  const { QuantityDefinition, PracticalCohort, Upload } = models();
  await assertOwnUploads(draft, actor.id);
  const [qdefs, pc, attempts, uploads] = await Promise.all([
    QuantityDefinition.findAll({
      where: { practicalId: practical.id },
      order: [
        ['position', 'ASC'],
        ['id', 'ASC'],
      ],
    }),
    PracticalCohort.findOne({ where: { practicalId: practical.id, cohortId } }),
    attemptsUsed(practical.id, actor.id),
    Upload.findAll({
      where: { id: [draft.spectrumUploadId, draft.reportUploadId].filter((x): x is number => x !== null), ownerId: actor.id },
    }),
  ]);
  const bands = await bandsForCohort(
    qdefs.map((q) => q.id),
    cohortId,
  );
  const values = draftValues(draft, practical.species);
  const lines = draftLines(draft, practical.species);
  const results = runChecks(practical, qdefs, bands, values, lines);
  const showVerdicts = practical.mode === 'practice';
  const checks = studentChecks({ results, values, qdefs, showVerdicts });

  const spectrumUpload = uploads.find((u) => u.id === draft.spectrumUploadId && u.kind === 'spectrum') ?? null;
  const reportUpload = uploads.find((u) => u.id === draft.reportUploadId && u.kind === 'report') ?? null;
  const days = pc ? daysLate(now, pc.deadline) : 0;
  const total = practical.maxAttempts + attempts.extra;
  return {
    mode: practical.mode,
    showVerdicts,
    ...checks,
    handIn: {
      species: practical.species.map((sp) => ({
        name: sp,
        display: speciesDisplay(sp),
        lines: lines.filter((l) => l.species === sp).length,
        assigned: lines.filter((l) => l.species === sp && l.branch && l.J !== null).length,
        values: values.filter((v) => v.species === sp).length,
      })),
      missing: qdefs
        .filter((q) => isQuantityKey(q.key) && !values.some((v) => v.key === q.key && v.species === q.species))
        .map((q) => `${QUANTITIES[q.key as keyof typeof QUANTITIES].label} (${speciesDisplay(q.species)})`),
      spectrum: spectrumUpload?.originalName ?? null,
      report: reportUpload?.originalName ?? null,
    },
    spectrum: spectrumUpload ? compareWithSpectrum(spectrumUpload, lines) : null,
    attemptsLeft: Math.max(0, total - attempts.used),
    attemptsTotal: total,
    late: { days, penalty: latePenaltyFor(practical, days), accepted: !(days > 0 && practical.lateRule === 'not-accepted') },
  };
}
