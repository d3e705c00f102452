/**
 * What a student is shown about one of their attempts. Practice mode: verdicts and named slips
 * at once. Assessed mode: only format notes (missing units, impossible values, precision,
 * missing uncertainties) until the marking is released. Staff-only facts (duplicate data) are
 * never part of this view.
 */
import { formatTyped, isQuantityKey, QUANTITIES, SLIPS, speciesDisplay, type SlipCode, type Verdict } from '@/lib/grading';
import { models } from '@/models';
import type { Practical } from '@/models/practical';
import type { Submission } from '@/models/submission';
import type { CheckSummary, SpectrumCheckSummary } from './check';
import { DATA_NOTICE_CODES, describeFit, noticesOf } from './fit-words';

export interface StudentQuantityView {
  key: string;
  species: string;
  label: string;
  reportedText: string;
  consistency?: { verdict: Verdict; expectedDisplay: string; expectedSource: string };
  accuracy?: { verdict: Verdict; expectedDisplay: string; expectedSource: string };
  slips: { code: string; title: string; message: string }[];
}

export interface StudentAttemptView {
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
  formatNotes: { species: string; message: string }[];
  quantities: StudentQuantityView[];
  /** The fit of each line list in words, and what the check noticed about it (with the verdicts). */
  fits: { species: string; description: string; notices: { code: string; message: string }[] }[];
  spectrum: SpectrumCheckSummary | null;
  marks: { label: string; maxMarks: number; awarded: number | null; comment: string | null }[] | null;
  total: { awarded: number | null; max: number | null } | null;
  feedbackUrl: string | null;
}

const FORMAT_CODES = new Set(['missing-uncertainty', 'too-many-significant-figures', 'too-few-significant-figures', 'uncertainty-too-precise']);

export async function studentAttemptView(sub: Submission, practical: Practical): Promise<StudentAttemptView> {
  const { SubmittedValue, Mark, FeedbackDocument, QuantityDefinition } = models();
  const summary = (sub.checkSummary ?? null) as CheckSummary | null;
  const released = sub.releasedAt !== null || sub.status === 'released';
  const showVerdicts = practical.mode === 'practice' || released;
  const values = await SubmittedValue.findAll({ where: { submissionId: sub.id } });
  const formatNotes: { species: string; message: string }[] = [];
  for (const v of values) {
    if (v.unit.trim() === '' && isQuantityKey(v.key)) formatNotes.push({ species: v.species, message: `${QUANTITIES[v.key].label} (${speciesDisplay(v.species)}) has no unit.` });
  }
  for (const q of await QuantityDefinition.findAll({ where: { practicalId: practical.id }, order: [['position', 'ASC']] })) {
    if (isQuantityKey(q.key) && !values.some((v) => v.key === q.key && v.species === q.species)) {
      formatNotes.push({ species: q.species, message: `${QUANTITIES[q.key].label} (${speciesDisplay(q.species)}) was not reported.` });
    }
  }
  const quantities: StudentQuantityView[] = [];
  const fits: StudentAttemptView['fits'] = [];
  for (const [sp, r] of Object.entries(summary?.species ?? {})) {
    const notices = noticesOf(r);
    for (const n of notices) if (DATA_NOTICE_CODES.has(n.code)) formatNotes.push({ species: sp, message: `${speciesDisplay(sp)}: ${n.message}` });
    if (showVerdicts && r.derived?.fit) fits.push({ species: sp, description: describeFit(r.derived.fit, r.derived.fitChoice), notices: notices.filter((n) => !DATA_NOTICE_CODES.has(n.code)) });
    for (const p of r.problems) {
      if (p.field === '' || p.field.startsWith('reported.') || p.field.startsWith('measured.')) formatNotes.push({ species: sp, message: `${speciesDisplay(sp)}: ${p.message}` });
    }
    const byKey = new Map<string, StudentQuantityView>();
    for (const q of r.quantities) {
      for (const n of q.notes) {
        if (FORMAT_CODES.has(n.code) && !formatNotes.some((f) => f.species === sp && f.message.endsWith(n.message))) formatNotes.push({ species: sp, message: `${speciesDisplay(sp)}: ${n.message}` });
      }
      if (!showVerdicts) continue;
      let view = byKey.get(q.key);
      if (!view) {
        const typed = values.find((v) => v.key === q.key && v.species === sp);
        const reportedText = typed ? formatTyped(typed.valueText, typed.unit, typed.uncertaintyText) : q.reportedText;
        view = { key: q.key, species: sp, label: QUANTITIES[q.key]?.label ?? q.key, reportedText, slips: [] };
        byKey.set(q.key, view);
        quantities.push(view);
      }
      view[q.basis] = { verdict: q.verdict, expectedDisplay: q.expectedDisplay, expectedSource: q.expectedSource };
      for (const d of q.diagnoses) {
        if (view.slips.some((s) => s.code === d.code)) continue;
        const info = SLIPS[d.code as SlipCode];
        view.slips.push({ code: d.code, title: info?.title ?? d.code, message: d.message || info?.explanation || '' });
      }
    }
  }
  let marks: StudentAttemptView['marks'] = null;
  let feedbackUrl: string | null = null;
  if (released) {
    const rows = await Mark.findAll({ where: { submissionId: sub.id }, order: [['id', 'ASC']] });
    marks = rows.map((m) => ({ label: m.label, maxMarks: m.maxMarks, awarded: m.awarded ?? m.proposed, comment: m.comment }));
    const doc = await FeedbackDocument.findOne({ where: { submissionId: sub.id }, order: [['id', 'DESC']] });
    if (doc) feedbackUrl = `/api/submissions/${sub.id}/feedback`;
  }
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
    formatNotes,
    quantities,
    fits,
    spectrum: summary?.spectrum ?? null,
    marks,
    total: released ? { awarded: sub.awardedTotal ?? sub.proposedTotal, max: sub.maxTotal } : null,
    feedbackUrl,
  };
}
