/**
 * Everything the marking screen, the moderation screen and the feedback PDF show about one
 * submission, gathered from the database rows in one place and returned as plain data.
 */
import { QUANTITIES, SLIPS, fromSI, formatNumber, formatTyped, isQuantityKey, speciesDisplay, type SlipCode } from '@/lib/grading';
import { models } from '@/models';
import { HttpError } from '@/lib/http';
import { expectedToPrecision, joinUnit, percentText } from '@/lib/display';
import { worstVerdict, type VerdictKey } from './verdict';
import { describeFit, noticesOf } from '@/lib/submissions/fit-words';
import type { FitChoiceSummary } from '@/lib/grading';
import type { Submission } from '@/models/submission';
import type { Practical } from '@/models/practical';
import type { Cohort } from '@/models/cohort';
import type { Course } from '@/models/course';
import type { User } from '@/models/user';
import type { SubmittedValue } from '@/models/submitted-value';
import type { CheckResult } from '@/models/check-result';
import type { Mark } from '@/models/mark';
import { spectrumAnalysisView } from '@/lib/submissions/spectrum-analysis-view';

export type BasisRow = {
  basis: 'consistency' | 'accuracy';
  expectedDisplay: string;
  deviationDisplay: string;
  relativeDeviationPercent: number | null;
  /** The relative deviation as text: "+0.012 %", "−2.6 %" (Unicode minus, no e-notation). */
  relativeDeviationDisplay: string | null;
  verdict: VerdictKey;
  slipCodes: string[];
};

export type QuantityRow = {
  key: string;
  species: string;
  label: string;
  /** As the student typed it, number and unit. */
  reportedTyped: string;
  reportedDisplay: string;
  consistency: BasisRow | null;
  accuracy: BasisRow | null;
  verdict: VerdictKey;
  itemKey: string;
};

export type MarkRow = {
  itemKey: string;
  label: string;
  maxMarks: number;
  proposed: number | null;
  awarded: number | null;
  comment: string | null;
  guidance: string | null;
  handMarked: boolean;
  /** Why the engine proposed what it did, when that is not a verdict (an unreported quantity: 0). */
  reason: string | null;
};

export type SlipRow = { key: string; code: string; title: string; explanation: string; formula: string; quantityLabel: string };

export type FitData = {
  species: string;
  residuals: { m: number; observed: number; calculated: number; residual: number; branch: string; J: number }[];
  coefficients: number[];
  rms: number | null;
  /** The model used and why, in words. */
  description: string;
  /** What the engine noticed about the line list (few lines, systematic residuals, renumbered P lines, …). */
  notices: { code: string; message: string }[];
};

export type MarkingView = Awaited<ReturnType<typeof loadMarkingView>>;

function display(valueSI: number | null | undefined, key: string, signed = false): string {
  if (valueSI === null || valueSI === undefined || !Number.isFinite(valueSI)) return '—';
  if (!isQuantityKey(key)) return formatNumber(valueSI, 6);
  const info = QUANTITIES[key];
  const r = fromSI(valueSI, info.displayUnit, info.dimension);
  const [v, unit] = r.ok ? [r.value, r.unit] : [valueSI, info.siUnit];
  const text = formatNumber(v, signed ? 3 : 6);
  const sign = signed && v > 0 ? '+' : '';
  return joinUnit(`${sign}${text}`, unit);
}

function labelFor(key: string, species: string): string {
  const base = isQuantityKey(key) ? QUANTITIES[key].label : key;
  return species ? `${base} (${speciesDisplay(species)})` : base;
}

/** Fits with residuals from the stored engine output (one result, or one per species). */
export function fitsFromSummary(summary: unknown): FitData[] {
  const out: FitData[] = [];
  const visit = (node: unknown, speciesHint: string, depth: number) => {
    if (!node || typeof node !== 'object' || depth > 3) return;
    const n = node as Record<string, unknown>;
    const derived = n.derived as Record<string, unknown> | undefined;
    const fit = derived?.fit as Record<string, unknown> | undefined;
    if (fit && fit.ok !== false && Array.isArray(fit.residuals)) {
      const sp = (derived?.species as { formula?: string } | undefined)?.formula ?? speciesHint;
      out.push({
        species: sp,
        residuals: (fit.residuals as FitData['residuals']).filter((r) => r && Number.isFinite(r.m) && Number.isFinite(r.residual)),
        coefficients: Array.isArray(fit.coefficients) ? (fit.coefficients as number[]) : [],
        rms: typeof fit.rms === 'number' ? fit.rms : null,
        description: describeFit(fit, derived?.fitChoice as FitChoiceSummary | undefined),
        notices: noticesOf(n),
      });
      return;
    }
    for (const [k, v] of Object.entries(n))
      if (v && typeof v === 'object' && k !== 'quantities') visit(v, Array.isArray(n) ? speciesHint : k, depth + 1);
  };
  visit(summary, '', 0);
  return out;
}

type Related = {
  submission: Submission;
  practical: Practical;
  cohort: Cohort;
  course: Course;
  student: User;
  marker: User | null;
  values: SubmittedValue[];
  checks: CheckResult[];
  marks: Mark[];
};

const unique = (ids: (number | null | undefined)[]) => [...new Set(ids.filter((id): id is number => typeof id === 'number'))];

function bySubmission<T extends { submissionId: number }>(rows: T[]): Map<number, T[]> {
  const out = new Map<number, T[]>();
  for (const row of rows) {
    const list = out.get(row.submissionId);
    if (list) list.push(row);
    else out.set(row.submissionId, [row]);
  }
  return out;
}

/**
 * The rows a submission's feedback is built from, for any number of submissions at once: one
 * statement per table (then one for the courses), however many submissions. Submissions whose
 * practical, cohort, course or student is gone are left out. `known` holds practicals the caller
 * has already read.
 */
async function readRelated(submissions: Submission[], known: Practical[] = []): Promise<Map<number, Related>> {
  const {
    Practical: PracticalModel,
    Course: CourseModel,
    Cohort: CohortModel,
    User: UserModel,
    SubmittedValue: Values,
    CheckResult: Checks,
    Mark: Marks,
  } = models();
  if (!submissions.length) return new Map();
  const where = { submissionId: submissions.map((s) => s.id) };
  const order: [string, string][] = [['id', 'ASC']];
  const toRead = unique(submissions.map((s) => s.practicalId)).filter((id) => !known.some((p) => p.id === id));
  const [practicals, cohorts, users, values, checks, marks] = await Promise.all([
    toRead.length ? PracticalModel.findAll({ where: { id: toRead } }).then((read) => [...known, ...read]) : known,
    CohortModel.findAll({ where: { id: unique(submissions.map((s) => s.cohortId)) } }),
    UserModel.findAll({ where: { id: unique(submissions.flatMap((s) => [s.studentId, s.markedById])) } }),
    Values.findAll({ where, order }),
    Checks.findAll({ where, order }),
    Marks.findAll({ where, order }),
  ]);
  const courses = await CourseModel.findAll({ where: { id: unique(practicals.map((p) => p.courseId)) } });
  const find = <T extends { id: number }>(rows: T[], id: number | null) => rows.find((r) => r.id === id);
  const [valuesOf, checksOf, marksOf] = [bySubmission(values), bySubmission(checks), bySubmission(marks)];
  const out = new Map<number, Related>();
  for (const submission of submissions) {
    const practical = find(practicals, submission.practicalId);
    const cohort = find(cohorts, submission.cohortId);
    const student = find(users, submission.studentId);
    const course = practical && find(courses, practical.courseId);
    if (!practical || !cohort || !student || !course) continue;
    out.set(submission.id, {
      submission,
      practical,
      cohort,
      course,
      student,
      marker: (submission.markedById && find(users, submission.markedById)) || null,
      values: valuesOf.get(submission.id) ?? [],
      checks: checksOf.get(submission.id) ?? [],
      marks: marksOf.get(submission.id) ?? [],
    });
  }
  return out;
}

/** What a submission's feedback shows (the PDF, the release e-mail, the platform's score), and the head of the marking screen. */
function feedbackViewOf({ submission, practical, cohort, course, student, marker, values, checks, marks }: Related) {
  const rows = quantityRows(values, checks);
  return {
    submission: {
      id: submission.id,
      status: submission.status,
      attempt: submission.attempt,
      submittedAt: submission.submittedAt?.toISOString() ?? null,
      daysLate: submission.daysLate,
      latePenalty: submission.latePenalty,
      proposedTotal: submission.proposedTotal,
      awardedTotal: submission.awardedTotal,
      maxTotal: submission.maxTotal,
      markedAt: submission.markedAt?.toISOString() ?? null,
      releasedAt: submission.releasedAt?.toISOString() ?? null,
      version: submission.version,
      extraAttempts: submission.extraAttempts,
      resubmissionMessage: submission.resubmissionMessage,
      markerComment: submission.markerComment ?? null,
      flags: {
        outside: submission.flagOutside,
        slip: submission.flagSlip,
        late: submission.flagLate,
        duplicate: submission.flagDuplicate,
        spectrumMismatch: submission.flagSpectrumMismatch,
      },
    },
    scope: { courseId: course.id, cohortId: cohort.id, studentId: student.id },
    course: { id: course.id, code: course.code, title: course.title },
    practical: { id: practical.id, title: practical.title, species: practical.species },
    cohort: { id: cohort.id, name: cohort.name, term: cohort.term },
    student: { id: student.id, name: student.name, email: student.email, studentNumber: student.studentNumber },
    marker: marker ? { id: marker.id, name: marker.name } : null,
    quantities: rows,
    marks: markRowsOf(marks, values, practical),
    slips: slipRowsOf(rows),
    fits: fitsFromSummary(submission.checkSummary),
    spectrumAnalysis: spectrumAnalysisView(submission.checkSummary),
  };
}

export type FeedbackView = ReturnType<typeof feedbackViewOf>;

/**
 * Feedback views of a batch of submissions (a release), read a statement per table for the whole
 * batch. Drafts, and submissions that are gone, are not in the answer.
 */
export async function loadFeedbackViews(submissionIds: number[]): Promise<Map<number, FeedbackView>> {
  const submissions = await models().Submission.findAll({ where: { id: submissionIds } });
  const related = await readRelated(submissions.filter((s) => s.status !== 'draft'));
  return new Map([...related].map(([id, r]) => [id, feedbackViewOf(r)]));
}

/**
 * The marking screen's view: the feedback view, and the submission's files, feedback documents,
 * e-mails and moderations. `loaded` passes the submission and practical rows a caller has already
 * read (the marking page reads them to authorise), so they are not read twice; every other read
 * goes out at once.
 */
export async function loadMarkingView(submissionId: number, loaded?: { submission: Submission; practical: Practical }) {
  const { Submission: SubmissionModel, Upload, FeedbackDocument, EmailOutbox, Moderation } = models();
  const submission = loaded?.submission ?? (await SubmissionModel.findByPk(submissionId));
  if (!submission || submission.status === 'draft') throw new HttpError(404, 'Not found.');
  const where = { submissionId };
  const order: [string, string][] = [['id', 'ASC']];
  const [related, uploads, docs, outbox, moderations] = await Promise.all([
    readRelated([submission], loaded ? [loaded.practical] : []),
    Upload.findAll({ where, order: [['id', 'DESC']] }),
    FeedbackDocument.findAll({ where, order }),
    EmailOutbox.findAll({ where, order }),
    Moderation.findAll({ where, order }),
  ]);
  const found = related.get(submission.id);
  if (!found) throw new HttpError(404, 'Not found.');
  const report = uploads.find((u) => u.kind === 'report') ?? null;
  const spectrum = uploads.find((u) => u.kind === 'spectrum') ?? null;

  return {
    ...feedbackViewOf(found),
    report: report ? { id: report.id, originalName: report.originalName } : null,
    spectrumUpload: spectrum ? { id: spectrum.id, storedName: spectrum.storedName, originalName: spectrum.originalName } : null,
    feedbackDocuments: docs.map((d) => ({ id: d.id, createdAt: d.createdAt.toISOString(), size: d.size })),
    deliveries: outbox.map((o) => ({
      id: o.id,
      kind: o.dedupeKey.split(':')[0],
      dedupeKey: o.dedupeKey,
      to: o.toAddress,
      status: o.status,
      attempts: o.attempts,
      lastError: o.lastError,
      sentAt: o.sentAt?.toISOString() ?? null,
      createdAt: o.createdAt.toISOString(),
    })),
    moderations: moderations.map((m) => ({
      id: m.id,
      decision: m.decision,
      totalBefore: m.totalBefore,
      totalAfter: m.totalAfter,
      note: m.note,
      moderatorId: m.moderatorId,
      createdAt: m.createdAt.toISOString(),
    })),
  };
}

/** One row per quantity and species: what the student typed, and each basis the check judged. */
function quantityRows(values: SubmittedValue[], checks: CheckResult[]): QuantityRow[] {
  const rows = new Map<string, QuantityRow>();
  const rowFor = (key: string, species: string) => {
    const id = `${key}:${species}`;
    let row = rows.get(id);
    if (!row) {
      const typed = values.find((v) => v.key === key && v.species === species);
      const typedText = typed ? formatTyped(typed.valueText, typed.unit, typed.uncertaintyText) : '—';
      row = {
        key,
        species,
        label: labelFor(key, species),
        reportedTyped: typedText,
        reportedDisplay: display(typed?.valueSI, key),
        consistency: null,
        accuracy: null,
        verdict: 'not-checked',
        itemKey: id,
      };
      rows.set(id, row);
    }
    return row;
  };
  for (const v of values) rowFor(v.key, v.species);
  for (const c of checks) {
    const row = rowFor(c.key, c.species);
    if (row.reportedDisplay === '—') row.reportedDisplay = display(c.reportedSI, c.key);
    const basis: BasisRow = {
      basis: c.basis,
      // To the precision that matters: one digit finer than the student typed.
      expectedDisplay: expectedToPrecision(c.expectedSI, c.key, values.find((v) => v.key === c.key && v.species === c.species)?.valueText),
      deviationDisplay: display(c.deviation, c.key, true),
      relativeDeviationPercent: c.relativeDeviation === null ? null : c.relativeDeviation * 100,
      relativeDeviationDisplay: c.relativeDeviation === null ? null : percentText(c.relativeDeviation * 100, { signed: true }),
      verdict: worstVerdict(c.verdict, undefined),
      slipCodes: c.slipCodes ? c.slipCodes.split(/[,\s]+/).filter(Boolean) : [],
    };
    if (c.basis === 'consistency') row.consistency = basis;
    else row.accuracy = basis;
  }
  for (const row of rows.values()) row.verdict = worstVerdict(row.consistency?.verdict, row.accuracy?.verdict);
  return [...rows.values()];
}

/** The marks, each with its rubric guidance and why an unreported quantity is proposed 0. */
function markRowsOf(marks: Mark[], values: SubmittedValue[], practical: Practical): MarkRow[] {
  const rubric = Array.isArray(practical.rubric) ? practical.rubric : [];
  const reportedKeys = new Set(values.filter((v) => v.valueText.trim() !== '').map((v) => `${v.key}:${v.species}`));
  return marks.map((m) => {
    const rubricKey = m.itemKey.startsWith('rubric:') ? m.itemKey.slice('rubric:'.length) : null;
    const item = rubricKey ? rubric.find((r) => r.key === rubricKey) : undefined;
    return {
      itemKey: m.itemKey,
      label: m.label,
      maxMarks: m.maxMarks,
      proposed: m.proposed,
      awarded: m.awarded,
      comment: m.comment,
      guidance: item?.guidance ?? null,
      handMarked: m.proposed === null,
      reason: !rubricKey && !reportedKeys.has(m.itemKey) ? 'Not reported: proposed 0.' : null,
    };
  });
}

/** The slips named on the check rows, which name the species; a slip found on both bases is listed once. */
function slipRowsOf(rows: QuantityRow[]): SlipRow[] {
  const slipRows: SlipRow[] = [];
  const seen = new Set<string>();
  const addSlip = (key: string, code: string) => {
    const id = `${key}|${code}`;
    if (seen.has(id)) return;
    seen.add(id);
    const info = SLIPS[code as SlipCode];
    const [qKey, sp = ''] = key.split(':');
    slipRows.push({
      key,
      code,
      title: info?.title ?? code,
      explanation: info?.explanation ?? '',
      formula: info?.formula ?? '',
      quantityLabel: labelFor(qKey, sp),
    });
  };
  for (const row of rows)
    for (const b of [row.consistency, row.accuracy]) for (const code of b?.slipCodes ?? []) addSlip(`${row.key}:${row.species}`, code);
  return slipRows;
}
