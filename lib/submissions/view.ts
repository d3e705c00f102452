/**
 * What a student is shown about one of their attempts (or, before submitting, about their draft).
 * Practice mode: verdicts and named slips at once. Assessed mode: only format notes (missing
 * units, impossible values, precision, missing uncertainties) until the marking is released.
 * Staff-only facts (duplicate data) are never part of this view.
 */
import {
  formatTyped,
  isQuantityKey,
  QUANTITIES,
  SLIPS,
  speciesDisplay,
  type SlipCode,
  type SubmissionResult,
  type Verdict,
} from '@/lib/grading';
import { expectedToPrecision } from '@/lib/display';
import { models } from '@/models';
import type { Practical } from '@/models/practical';
import type { Submission } from '@/models/submission';
import type { CheckSummary, SpectrumCheckSummary, TypedValue } from './check';
import { DATA_NOTICE_CODES, describeFit, noticesOf } from './fit-words';

export interface StudentSlipView {
  code: string;
  title: string;
  message: string;
  /** The same slip was already explained on this quantity (shown once, referred to here). */
  explainedWith?: string;
}

export interface StudentQuantityView {
  key: string;
  species: string;
  label: string;
  reportedText: string;
  consistency?: { verdict: Verdict; expectedDisplay: string; expectedSource: string };
  accuracy?: { verdict: Verdict; expectedDisplay: string; expectedSource: string };
  slips: StudentSlipView[];
}

export interface StudentChecksView {
  formatNotes: { species: string; message: string }[];
  quantities: StudentQuantityView[];
  /** The fit of each line list in words, and what the check noticed about it (with the verdicts). */
  fits: { species: string; description: string; notices: { code: string; message: string }[] }[];
}

export interface StudentAttemptView extends StudentChecksView {
  id: number;
  attempt: number;
  status: string;
  submittedAt: string | null;
  daysLate: number;
  latePenalty: number;
  isMarkedAttempt: boolean;
  mode: 'practice' | 'assessed';
  released: boolean;
  showVerdicts: boolean;
  spectrum: SpectrumCheckSummary | null;
  marks: { label: string; maxMarks: number; awarded: number | null; comment: string | null }[] | null;
  total: { awarded: number | null; max: number | null } | null;
  feedbackUrl: string | null;
}

const FORMAT_CODES = new Set([
  'missing-uncertainty',
  'too-many-significant-figures',
  'too-few-significant-figures',
  'uncertainty-too-precise',
]);

/**
 * The format notes and (when shown) the verdicts of one set of engine results, from the values as
 * the student typed them. Pure: the same for a stored attempt and for a draft checked before
 * submitting.
 */
export function studentChecks(input: {
  results: Record<string, SubmissionResult>;
  values: Pick<TypedValue, 'key' | 'species' | 'valueText' | 'unit' | 'uncertaintyText'>[];
  qdefs: { key: string; species: string }[];
  showVerdicts: boolean;
}): StudentChecksView {
  const { results, values, qdefs, showVerdicts } = input;
  const formatNotes: { species: string; message: string }[] = [];
  for (const v of values) {
    if (v.unit.trim() === '' && isQuantityKey(v.key))
      formatNotes.push({ species: v.species, message: `${QUANTITIES[v.key].label} (${speciesDisplay(v.species)}) has no unit.` });
  }
  for (const q of qdefs) {
    if (isQuantityKey(q.key) && !values.some((v) => v.key === q.key && v.species === q.species)) {
      formatNotes.push({ species: q.species, message: `${QUANTITIES[q.key].label} (${speciesDisplay(q.species)}) was not reported.` });
    }
  }
  const quantities: StudentQuantityView[] = [];
  // A slip that touches several quantities (B₀ and B₁ swapped) is explained once, on the first.
  const explained = new Map<string, string>();
  const fits: StudentChecksView['fits'] = [];
  for (const [sp, r] of Object.entries(results)) {
    // Notices about the data as given are format notes; the rest come with the verdicts.
    const notices = noticesOf(r);
    for (const n of notices)
      if (DATA_NOTICE_CODES.has(n.code)) formatNotes.push({ species: sp, message: `${speciesDisplay(sp)}: ${n.message}` });
    if (showVerdicts && r.derived?.fit)
      fits.push({
        species: sp,
        description: describeFit(r.derived.fit, r.derived.fitChoice),
        notices: notices.filter((n) => !DATA_NOTICE_CODES.has(n.code)),
      });
    for (const p of r.problems) {
      if (p.field === '' || p.field.startsWith('reported.') || p.field.startsWith('measured.'))
        formatNotes.push({ species: sp, message: `${speciesDisplay(sp)}: ${p.message}` });
    }
    const byKey = new Map<string, StudentQuantityView>();
    for (const q of r.quantities) {
      for (const n of q.notes) {
        if (FORMAT_CODES.has(n.code) && !formatNotes.some((f) => f.species === sp && f.message.endsWith(n.message)))
          formatNotes.push({ species: sp, message: `${speciesDisplay(sp)}: ${n.message}` });
      }
      if (!showVerdicts) continue;
      const typed = values.find((v) => v.key === q.key && v.species === sp);
      let view = byKey.get(q.key);
      if (!view) {
        const reportedText = typed ? formatTyped(typed.valueText, typed.unit, typed.uncertaintyText) : q.reportedText;
        view = { key: q.key, species: sp, label: QUANTITIES[q.key]?.label ?? q.key, reportedText, slips: [] };
        byKey.set(q.key, view);
        quantities.push(view);
      }
      const expectedDisplay = Number.isFinite(q.expectedSI)
        ? expectedToPrecision(q.expectedSI, q.key, typed?.valueText)
        : q.expectedDisplay;
      view[q.basis] = { verdict: q.verdict, expectedDisplay, expectedSource: q.expectedSource };
      for (const d of q.diagnoses) {
        if (view.slips.some((s) => s.code === d.code)) continue;
        const info = SLIPS[d.code as SlipCode];
        const slip: StudentSlipView = { code: d.code, title: info?.title ?? d.code, message: d.message || info?.explanation || '' };
        const first = explained.get(d.code);
        const here = `${view.label} (${speciesDisplay(sp)})`;
        if (first && first !== here) slip.explainedWith = first;
        else explained.set(d.code, here);
        view.slips.push(slip);
      }
    }
  }
  return { formatNotes, quantities, fits };
}

/** The views of several attempts of one practical, with one query per table (not one per attempt). */
export async function studentAttemptViews(subs: Submission[], practical: Practical): Promise<StudentAttemptView[]> {
  if (!subs.length) return [];
  const { SubmittedValue, Mark, FeedbackDocument, QuantityDefinition } = models();
  const ids = subs.map((s) => s.id);
  const releasedIds = subs.filter((s) => s.releasedAt !== null || s.status === 'released').map((s) => s.id);
  const [values, qdefs, marks, docs] = await Promise.all([
    SubmittedValue.findAll({ where: { submissionId: ids } }),
    QuantityDefinition.findAll({
      where: { practicalId: practical.id },
      order: [
        ['position', 'ASC'],
        ['id', 'ASC'],
      ],
    }),
    releasedIds.length ? Mark.findAll({ where: { submissionId: releasedIds }, order: [['id', 'ASC']] }) : Promise.resolve([]),
    releasedIds.length
      ? FeedbackDocument.findAll({ where: { submissionId: releasedIds }, attributes: ['id', 'submissionId'] })
      : Promise.resolve([]),
  ]);
  return subs.map((sub) => {
    const summary = (sub.checkSummary ?? null) as CheckSummary | null;
    const released = releasedIds.includes(sub.id);
    const showVerdicts = practical.mode === 'practice' || released;
    const checks = studentChecks({
      results: summary?.species ?? {},
      values: values.filter((v) => v.submissionId === sub.id),
      qdefs,
      showVerdicts,
    });
    return {
      id: sub.id,
      attempt: sub.attempt,
      status: sub.status,
      submittedAt: sub.submittedAt ? new Date(sub.submittedAt).toISOString() : null,
      daysLate: sub.daysLate,
      latePenalty: sub.latePenalty,
      isMarkedAttempt: sub.isMarkedAttempt,
      mode: practical.mode,
      released,
      showVerdicts,
      ...checks,
      spectrum: summary?.spectrum ?? null,
      marks: released
        ? marks
            .filter((m) => m.submissionId === sub.id)
            .map((m) => ({ label: m.label, maxMarks: m.maxMarks, awarded: m.awarded ?? m.proposed, comment: m.comment }))
        : null,
      total: released ? { awarded: sub.awardedTotal ?? sub.proposedTotal, max: sub.maxTotal } : null,
      feedbackUrl: released && docs.some((d) => d.submissionId === sub.id) ? `/api/submissions/${sub.id}/feedback` : null,
    };
  });
}

export async function studentAttemptView(sub: Submission, practical: Practical): Promise<StudentAttemptView> {
  return (await studentAttemptViews([sub], practical))[0];
}
