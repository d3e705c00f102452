import type { FeedbackInput } from '@/lib/pdf/feedback';
import type { FeedbackView } from './view';
import { fitPlotModel, residualModel } from './fit-plot';
import { rawSum, totalAfterPenalty } from './totals';
import { speciesDisplay } from '@/lib/grading';
import { SPECTRUM_VERDICT } from '@/lib/submissions/spectrum-analysis-view';

const n = (v: number | null) => (v === null ? '—' : String(Math.round(v * 100) / 100));

// One formatter for every document: toLocaleString would build a new one per call.
const WHEN = new Intl.DateTimeFormat('en-GB', { dateStyle: 'long', timeStyle: 'short', timeZone: 'Europe/London' });

function when(iso: string | null): string {
  return iso ? WHEN.format(new Date(iso)) : '—';
}

/** What the feedback PDF shows, from the marking view. */
export function feedbackInputFromView(view: FeedbackView, now = new Date()): FeedbackInput {
  const marksByKey = new Map(view.marks.map((m) => [m.itemKey, m]));
  const max = view.marks.reduce((s, m) => s + m.maxMarks, 0);
  const awarded = view.marks.map((m) => m.awarded);
  const comments: FeedbackInput['comments'] = [];
  if (view.submission.markerComment) comments.push({ label: '', text: view.submission.markerComment });
  for (const m of view.marks) if (m.comment) comments.push({ label: m.label, text: m.comment });
  return {
    course: `${view.course.code} ${view.course.title}`,
    practical: view.practical.title,
    cohort: `${view.cohort.name}, ${view.cohort.term}`,
    student: view.student.studentNumber ? `${view.student.name} (${view.student.studentNumber})` : view.student.name,
    submittedAt: when(view.submission.submittedAt),
    attempt: view.submission.attempt,
    daysLate: view.submission.daysLate,
    latePenalty: view.submission.latePenalty,
    quantities: view.quantities.map((q) => {
      const mark = marksByKey.get(q.itemKey);
      return {
        label: q.label,
        reported: q.reportedTyped,
        rows: [q.consistency, q.accuracy]
          .filter((r) => r !== null)
          .map((r) => ({ basis: r.basis, expected: r.expectedDisplay, deviation: r.deviationDisplay, verdict: r.verdict })),
        marks: mark ? `${n(mark.awarded ?? mark.proposed)}/${n(mark.maxMarks)}` : '',
      };
    }),
    slips: slipsByCode(view.slips),
    plots: view.fits
      .filter((f) => f.residuals.length > 0)
      .map((f) => ({
        species: speciesDisplay(f.species),
        fit: fitPlotModel(f),
        residuals: residualModel(f),
        description: f.description,
        notices: f.notices.map((x) => x.message),
      })),
    fromSpectrum: view.spectrumAnalysis?.comparison
      ? {
          legend: view.spectrumAnalysis.comparison.legend,
          verdicts: Object.values(SPECTRUM_VERDICT),
          rows: view.spectrumAnalysis.comparison.rows.map((r) => ({
            label: r.label,
            reported: r.reported,
            fromSpectrum: r.fromSpectrum,
            deviation: r.deviation,
            verdict: SPECTRUM_VERDICT[r.verdict],
          })),
        }
      : null,
    rubric: view.marks.filter((m) => m.handMarked).map((m) => ({ label: m.label, marks: `${n(m.awarded)}/${n(m.maxMarks)}` })),
    comments,
    sum: n(rawSum(awarded)),
    total: n(totalAfterPenalty(awarded, view.submission.latePenalty)),
    max: n(max),
    generatedAt: now.toISOString(),
  };
}

/** One entry per slip, naming every quantity it was found on: a slip is explained once, not once per quantity. */
export function slipsByCode(slips: FeedbackView['slips']): FeedbackInput['slips'] {
  const out: (FeedbackInput['slips'][number] & { code: string })[] = [];
  for (const s of slips) {
    const seen = out.find((o) => o.code === s.code);
    if (seen) seen.quantity = `${seen.quantity}, ${s.quantityLabel}`;
    else out.push({ code: s.code, title: s.title, quantity: s.quantityLabel, explanation: s.explanation, formula: s.formula });
  }
  return out.map(({ code: _code, ...rest }) => rest);
}
