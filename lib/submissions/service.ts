/**
 * Drafts and submitted attempts.
 *
 * A student's draft is one submissions row with attempt 0 and status 'draft' (the form's state in
 * `draft`). Submitting copies the draft into a new row with attempt n = 1, 2, …, writes its
 * submitted values and line assignments, moves (or copies) the uploads to it, applies the late
 * rule and runs checkStoredSubmission, all in one transaction.
 *
 * Double submits: the request names the draft version it was built from; the first submit bumps
 * the version in a conditional UPDATE, so a second request with the same version changes
 * nothing and is answered 409. The unique index (practicalId, studentId, attempt) backs this up.
 */
import crypto from 'node:crypto';
import fs from 'node:fs';
import { Op, QueryTypes, UniqueConstraintError, type CreationAttributes, type Transaction } from 'sequelize';
import type { Actor } from '@/lib/authz';
import { audit } from '@/lib/audit';
import { sequelize } from '@/lib/db';
import { HttpError } from '@/lib/http';
import { uploadPath } from '@/lib/storage';
import { isQuantityKey } from '@/lib/grading';
import { models } from '@/models';
import type { Practical } from '@/models/practical';
import type { Submission } from '@/models/submission';
import type { Draft } from '@/lib/schemas/submission';
import { checkStoredSubmission, type TypedLine, type TypedValue } from './check';
export { readDraft } from './draft';
import type { StudentAttemptView } from './view';

const DAY_MS = 86_400_000;

/** Days late, counting every day started after the deadline. */
export function daysLate(submittedAt: Date, deadline: Date): number {
  const ms = submittedAt.getTime() - deadline.getTime();
  return ms > 0 ? Math.ceil(ms / DAY_MS) : 0;
}

/** Percentage deducted from the total: per day started, up to the cap (rule 'penalty' only). */
export function latePenaltyFor(practical: Pick<Practical, 'lateRule' | 'latePenaltyPerDay' | 'latePenaltyCap'>, days: number): number {
  if (days <= 0 || practical.lateRule !== 'penalty') return 0;
  return Math.min(practical.latePenaltyCap, practical.latePenaltyPerDay * days);
}

/** A submission's columns before anything has checked, marked or released it (a draft, or an attempt just submitted). */
export const NOT_YET_CHECKED_OR_MARKED = {
  checkSummary: null,
  lineListHash: null,
  proposedTotal: null,
  awardedTotal: null,
  maxTotal: null,
  markedById: null,
  markedAt: null,
  releasedAt: null,
  resubmissionMessage: null,
} as const;

/**
 * The row of a freshly submitted attempt: counted (the student's marked attempt), unchecked and
 * unmarked, its late penalty from the practical's rule. The submit path and the demo seed write it.
 */
export function submittedAttemptRow(a: {
  practical: Pick<Practical, 'id' | 'lateRule' | 'latePenaltyPerDay' | 'latePenaltyCap'>;
  cohortId: number;
  studentId: number;
  attempt: number;
  draft: Draft | null;
  submittedAt: Date;
  daysLate: number;
}): CreationAttributes<Submission> {
  return {
    practicalId: a.practical.id,
    cohortId: a.cohortId,
    studentId: a.studentId,
    attempt: a.attempt,
    status: 'submitted',
    draft: a.draft,
    submittedAt: a.submittedAt,
    daysLate: a.daysLate,
    latePenalty: latePenaltyFor(a.practical, a.daysLate),
    flagLate: a.daysLate > 0,
    isMarkedAttempt: true,
    ...NOT_YET_CHECKED_OR_MARKED,
    version: 0,
  };
}

export async function attemptsUsed(practicalId: number, studentId: number, transaction?: Transaction) {
  const rows = await models().Submission.findAll({
    where: { practicalId, studentId },
    attributes: ['attempt', 'extraAttempts'],
    transaction,
  });
  const used = rows.filter((r) => r.attempt > 0).length;
  const lastAttempt = rows.reduce((m, r) => Math.max(m, r.attempt), 0);
  const extra = rows.reduce((m, r) => Math.max(m, r.extraAttempts), 0);
  return { used, lastAttempt, extra };
}

export async function findDraft(practicalId: number, studentId: number, transaction?: Transaction) {
  return models().Submission.findOne({ where: { practicalId, studentId, attempt: 0 }, transaction });
}

/** Every upload a draft names: the spectrum, the spectra of further samples, the report. */
function draftUploads(draft: Draft): { field: string; kind: 'spectrum' | 'report'; id: number }[] {
  const out: { field: string; kind: 'spectrum' | 'report'; id: number }[] = [];
  if (draft.spectrumUploadId !== null) out.push({ field: 'spectrumUploadId', kind: 'spectrum', id: draft.spectrumUploadId });
  for (const [key, id] of Object.entries(draft.spectra ?? {})) if (id !== null) out.push({ field: `spectra.${key}`, kind: 'spectrum', id });
  if (draft.reportUploadId !== null) out.push({ field: 'reportUploadId', kind: 'report', id: draft.reportUploadId });
  return out;
}

/** Uploads named by the draft must be the student's own. */
export async function assertOwnUploads(draft: Draft, studentId: number, transaction?: Transaction) {
  for (const { field, kind, id } of draftUploads(draft)) {
    const up = await models().Upload.findByPk(id, { transaction });
    if (!up || up.ownerId !== studentId || up.kind !== kind)
      throw new HttpError(400, `The ${kind} file named in the draft is not one of your uploads.`, { [field]: ['Upload the file again.'] });
  }
}

/** Drop species the practical does not have, so a draft cannot grow without bound. */
function trimDraft(draft: Draft, practical: Pick<Practical, 'species'>): Draft {
  const species = Object.fromEntries(Object.entries(draft.species).filter(([s]) => practical.species.includes(s)));
  return { ...draft, species };
}

/**
 * Autosave, every few seconds per student while the form is open, so it is kept to one
 * statement: a conditional UPDATE of the draft row that returns its new version (no transaction,
 * no read of the old draft). Only the first save inserts the row; if two tabs insert at once, the
 * unique index (practicalId, studentId, attempt) lets one win and the other updates it.
 */
/** PUT /api/submissions/draft's answer. */
export type DraftSaved = { id: number; version: number; savedAt: string };
/** POST /api/submissions/[id]/submit's answer: the attempt's result and the draft's new version. */
export type SubmitAnswer = { result: StudentAttemptView; draftVersion: number };

export async function saveDraft(
  actor: Actor,
  practical: Pick<Practical, 'id' | 'species'>,
  cohortId: number,
  draftIn: Draft,
): Promise<{ id: number; version: number; updatedAt: Date }> {
  const draft = trimDraft(draftIn, practical);
  await assertOwnUploads(draft, actor.id);
  const update = async () => {
    const updatedAt = new Date();
    const [rows] = (await sequelize().query(
      'UPDATE "submissions" SET "draft" = :draft, "version" = "version" + 1, "updatedAt" = :updatedAt ' +
        'WHERE "practicalId" = :practicalId AND "studentId" = :studentId AND "attempt" = 0 RETURNING "id", "version"',
      { replacements: { draft: JSON.stringify(draft), updatedAt, practicalId: practical.id, studentId: actor.id }, type: QueryTypes.RAW },
    )) as [{ id: number; version: number }[], unknown];
    return rows[0] ? { id: Number(rows[0].id), version: Number(rows[0].version), updatedAt } : null;
  };
  const updated = await update();
  if (updated) return updated;
  try {
    const row = await models().Submission.create({
      practicalId: practical.id,
      cohortId,
      studentId: actor.id,
      attempt: 0,
      status: 'draft',
      draft,
      submittedAt: null,
      isMarkedAttempt: false,
      ...NOT_YET_CHECKED_OR_MARKED,
      version: 1,
    });
    return { id: row.id, version: row.version, updatedAt: row.updatedAt };
  } catch (e) {
    if (!(e instanceof UniqueConstraintError)) throw e;
    const second = await update();
    if (!second) throw new HttpError(409, 'Your draft was saved from another tab at the same moment; reload the page.');
    return second;
  }
}

/**
 * A submission must contain something: at least one line or one reported value. Missing
 * quantities are not refused (partial work may be handed in); they are shown as format notes
 * and earn no proposed marks.
 */
export function validateForSubmit(draft: Draft, practical: Practical, _qdefs: { key: string; species: string }[]) {
  const anything = practical.species.some((sp) => {
    const d = draft.species[sp];
    return d && (d.lines.length > 0 || Object.values(d.values).some((v) => v.value.trim() !== ''));
  });
  if (!anything)
    throw new HttpError(400, 'The submission is empty: enter your line list and the required values first.', {
      species: ['At least one line or one value is required.'],
    });
}

/** The values a draft reports, as they would be stored on submitting (blank values left out). */
export function draftValues(draft: Draft, species: string[]): TypedValue[] {
  const out: TypedValue[] = [];
  for (const sp of species) {
    const d = draft.species[sp];
    if (!d) continue;
    const put = (key: string, v: { value: string; unit: string; uncertainty: string } | undefined) => {
      if (v && v.value.trim() !== '')
        out.push({ key, species: sp, valueText: v.value.trim(), unit: v.unit.trim(), uncertaintyText: v.uncertainty.trim() || null });
    };
    put('bandCentre', d.values.bandCentre ?? d.bandCentre);
    put('overtone', d.overtone);
    for (const [key, v] of Object.entries(d.values)) if (key !== 'bandCentre' && key !== 'overtone' && isQuantityKey(key)) put(key, v);
  }
  return out;
}

/** The lines of a draft, per isotopologue of the practical. */
export function draftLines(draft: Draft, species: string[]): TypedLine[] {
  return species.flatMap((sp) =>
    (draft.species[sp]?.lines ?? []).map((l) => ({ species: sp, branch: l.branch, J: l.J, wavenumber: l.wavenumber })),
  );
}

function randomName(ext: string) {
  return `${crypto.randomBytes(16).toString('hex')}${ext}`;
}

/**
 * SQLite allows one writer; two submits of the same draft at the same moment would otherwise
 * collide on the database lock. Within one server process they queue here; across processes
 * (PostgreSQL) the conditional version update decides.
 */
const submitQueues = new Map<number, Promise<unknown>>();
function serialised<T>(key: number, fn: () => Promise<T>): Promise<T> {
  const prev = submitQueues.get(key) ?? Promise.resolve();
  const next = prev.catch(() => undefined).then(fn);
  submitQueues.set(key, next);
  void next
    .finally(() => {
      if (submitQueues.get(key) === next) submitQueues.delete(key);
    })
    .catch(() => undefined);
  return next;
}

export async function submitDraft(
  actor: Actor,
  draftRow: Submission,
  practical: Practical,
  version: number,
  draftIn: Draft,
  now = new Date(),
) {
  return serialised(draftRow.id, () => submitDraftNow(actor, draftRow, practical, version, draftIn, now));
}

async function submitDraftNow(actor: Actor, draftRow: Submission, practical: Practical, version: number, draftIn: Draft, now = new Date()) {
  if (draftRow.attempt !== 0) throw new HttpError(409, 'This attempt was already submitted.');
  const draft = trimDraft(draftIn, practical);
  await assertOwnUploads(draft, actor.id);
  const { Submission, PracticalCohort, QuantityDefinition, SubmittedValue, LineAssignment, Upload } = models();
  const pc = await PracticalCohort.findOne({ where: { practicalId: practical.id, cohortId: draftRow.cohortId } });
  if (!pc) throw new HttpError(409, 'This practical is no longer set for your cohort.');
  const qdefs = await QuantityDefinition.findAll({ where: { practicalId: practical.id } });
  validateForSubmit(draft, practical, qdefs);

  const late = daysLate(now, pc.deadline);
  if (late > 0 && practical.lateRule === 'not-accepted') {
    throw new HttpError(409, 'The deadline has passed and this practical does not accept late submissions. Speak to your instructor.');
  }
  const copied: string[] = [];
  try {
    return await sequelize().transaction(async (transaction) => {
      const { used, lastAttempt, extra } = await attemptsUsed(practical.id, actor.id, transaction);
      if (used >= practical.maxAttempts + extra)
        throw new HttpError(409, `You have used all ${practical.maxAttempts + extra} attempts for this practical.`);
      const [bumped] = await Submission.update({ version: version + 1, draft }, { where: { id: draftRow.id, version }, transaction });
      if (bumped === 0)
        throw new HttpError(409, 'This draft was already submitted or changed in another tab. Reload the page to see your latest attempt.');

      await Submission.update(
        { isMarkedAttempt: false },
        { where: { practicalId: practical.id, studentId: actor.id, attempt: { [Op.gt]: 0 } }, transaction },
      );
      const attempt = await Submission.create(
        submittedAttemptRow({
          practical,
          cohortId: draftRow.cohortId,
          studentId: actor.id,
          attempt: lastAttempt + 1,
          draft,
          submittedAt: now,
          daysLate: late,
        }),
        { transaction },
      );
      const valueRows = draftValues(draft, practical.species).map((v) => ({ ...v, submissionId: attempt.id, valueSI: null }));
      const lineRows = draftLines(draft, practical.species).map((l) => ({ ...l, submissionId: attempt.id, source: 'student' as const }));
      if (valueRows.length) await SubmittedValue.bulkCreate(valueRows, { transaction });
      if (lineRows.length) await LineAssignment.bulkCreate(lineRows, { transaction });

      for (const id of [...new Set(draftUploads(draft).map((u) => u.id))]) {
        const up = await Upload.findByPk(id, { transaction });
        if (!up) continue;
        if (up.submissionId === draftRow.id || up.submissionId === null) {
          await up.update({ submissionId: attempt.id }, { transaction });
        } else {
          // Already part of an earlier attempt: that attempt keeps its file, this one gets a copy.
          const ext = up.storedName.includes('.') ? up.storedName.slice(up.storedName.indexOf('.')) : '';
          const storedName = randomName(ext);
          fs.copyFileSync(uploadPath(up.storedName), uploadPath(storedName));
          copied.push(storedName);
          const copy = await Upload.create(
            {
              ownerId: up.ownerId,
              submissionId: attempt.id,
              kind: up.kind,
              originalName: up.originalName,
              storedName,
              sha256: up.sha256,
              size: up.size,
              contentType: up.contentType,
              sample: up.sample,
            },
            { transaction },
          );
          // The same bytes: the analysis made at upload holds for the copy too.
          if (up.analysis) await copy.update({ analysis: { ...up.analysis, uploadId: copy.id } }, { transaction });
        }
      }
      await checkStoredSubmission(attempt.id, { transaction });
      await audit(
        {
          actorId: actor.id,
          action: 'submission.submit',
          entityType: 'submission',
          entityId: attempt.id,
          after: { attempt: attempt.attempt, daysLate: late },
        },
        transaction,
      );
      return attempt;
    });
  } catch (e) {
    for (const name of copied) fs.rmSync(uploadPath(name), { force: true });
    if (e instanceof UniqueConstraintError)
      throw new HttpError(409, 'This attempt was already submitted (a second click?). Reload the page to see it.');
    if (e instanceof Error && /SQLITE_BUSY/.test(String((e as { parent?: unknown }).parent ?? e.message)))
      throw new HttpError(409, 'Another change to this submission is being saved; try again in a moment.');
    throw e;
  }
}
