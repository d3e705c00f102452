/**
 * Saving marks. A save names the submission version it started from; the version moves on
 * in the same conditional UPDATE that claims the row, so of two markers saving at once one
 * wins and the other gets 409 instead of silently overwriting.
 */
import { Op, type Transaction } from 'sequelize';
import { sequelize } from '@/lib/db';
import { audit } from '@/lib/audit';
import { HttpError } from '@/lib/http';
import { models } from '@/models';
import type { SaveMarksInput } from '@/lib/schemas/marking';
import { totalAfterPenalty } from './totals';
import type { SubmissionStatus } from '@/models/submission';

export const STALE_MESSAGE =
  'Someone else saved marks for this submission after you opened it. Reload to see their marks, then make your change again.';

const MARKABLE = ['submitted', 'marked'];

/** Move the version on if it is still the one the caller started from; otherwise 409. */
export async function claimVersion(submissionId: number, version: number, t: Transaction, statuses = MARKABLE): Promise<void> {
  const { Submission } = models();
  const [count] = await Submission.update(
    { version: sequelize().literal('version + 1') as unknown as number },
    { where: { id: submissionId, version, status: { [Op.in]: statuses } }, transaction: t },
  );
  if (count === 1) return;
  const now = await Submission.findByPk(submissionId, { transaction: t });
  if (now && !statuses.includes(now.status))
    throw new HttpError(409, `This submission is ${now.status.replace('-', ' ')}; its marks can no longer be changed here.`);
  throw new HttpError(409, STALE_MESSAGE);
}

function close(a: number | null, b: number | null): boolean {
  return a !== null && b !== null && Math.abs(a - b) < 1e-9;
}

export type SaveResult = { version: number; status: string; awardedTotal: number | null; unmarked: number };

/**
 * Apply item marks. Departing from the engine's proposal needs a comment (400 otherwise).
 * The submission becomes 'marked' when every item has a mark.
 */
export async function saveMarks(actorId: number, submissionId: number, input: SaveMarksInput, action = 'marks.save'): Promise<SaveResult> {
  const { Submission, Mark } = models();
  return sequelize().transaction(async (t) => {
    const marks = await Mark.findAll({ where: { submissionId }, transaction: t });
    const byKey = new Map(marks.map((m) => [m.itemKey, m]));
    const seen = new Set<string>();
    for (const item of input.items) {
      const mark = byKey.get(item.itemKey);
      if (!mark) throw new HttpError(400, `Unknown mark item: ${item.itemKey}.`, { [item.itemKey]: ['No such item on this submission.'] });
      if (seen.has(item.itemKey)) throw new HttpError(400, `Mark item given twice: ${item.itemKey}.`);
      seen.add(item.itemKey);
      if (item.awarded !== null && item.awarded > mark.maxMarks + 1e-9)
        throw new HttpError(400, `${mark.label}: at most ${mark.maxMarks} marks.`, { [item.itemKey]: [`At most ${mark.maxMarks}.`] });
      const overrides = mark.proposed !== null && item.awarded !== null && !close(item.awarded, mark.proposed);
      if (overrides && !(item.comment && item.comment.trim()))
        throw new HttpError(400, `${mark.label}: say why you changed the proposed mark (a comment is required).`, {
          [item.itemKey]: ['A comment is required when you change the proposed mark.'],
        });
    }
    await claimVersion(submissionId, input.version, t);
    const submission = (await Submission.findByPk(submissionId, { transaction: t }))!;
    const before: Record<string, unknown> = {};
    const after: Record<string, unknown> = {};
    for (const item of input.items) {
      const mark = byKey.get(item.itemKey)!;
      const comment = item.comment?.trim() || null;
      if (close(mark.awarded, item.awarded) && (mark.comment ?? null) === comment) continue;
      before[item.itemKey] = { awarded: mark.awarded, comment: mark.comment };
      after[item.itemKey] = { awarded: item.awarded, comment };
      await mark.update({ awarded: item.awarded, comment, markerId: actorId }, { transaction: t });
    }
    const markerComment = input.markerComment === undefined ? (submission.markerComment ?? null) : input.markerComment?.trim() || null;
    if (markerComment !== (submission.markerComment ?? null)) {
      before.markerComment = submission.markerComment ?? null;
      after.markerComment = markerComment;
    }
    const unmarked = marks.filter((m) => m.awarded === null).length;
    const total = totalAfterPenalty(
      marks.map((m) => m.awarded),
      submission.latePenalty,
    );
    const status: SubmissionStatus = unmarked === 0 && marks.length > 0 ? 'marked' : submission.status;
    const changes = {
      markerComment,
      awardedTotal: unmarked === 0 ? total : null,
      status,
      ...(status === 'marked' ? { markedById: actorId, markedAt: new Date() } : {}),
    };
    before.status = submission.status;
    before.awardedTotal = submission.awardedTotal;
    after.status = status;
    after.awardedTotal = changes.awardedTotal;
    await submission.update(changes, { transaction: t });
    await audit({ actorId, action, entityType: 'submission', entityId: submissionId, before, after }, t);
    return { version: submission.version, status, awardedTotal: changes.awardedTotal, unmarked };
  });
}

/** Accept the engine's proposal for every item it proposes; hand-marked items keep their marks. */
export async function acceptProposal(actorId: number, submissionId: number, version: number): Promise<SaveResult> {
  const { Mark } = models();
  const marks = await Mark.findAll({ where: { submissionId } });
  const items = marks
    .filter((m) => m.proposed !== null)
    .map((m) => ({ itemKey: m.itemKey, awarded: m.proposed as number, comment: m.comment }));
  return saveMarks(actorId, submissionId, { version, items }, 'marks.accept-proposal');
}
