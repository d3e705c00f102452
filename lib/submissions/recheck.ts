/**
 * Re-run the checks of every submitted attempt of a practical, e.g. after an instructor changed a
 * tolerance band or a reference value. Marks a TA awarded are kept (see check.ts).
 */
import { Op } from 'sequelize';
import { models } from '@/models';
import { checkStoredSubmission } from './check';

export async function recheckPractical(practicalId: number): Promise<{ rechecked: number }> {
  const { Submission } = models();
  const rows = await Submission.findAll({ where: { practicalId, attempt: { [Op.gt]: 0 } }, attributes: ['id'], order: [['id', 'ASC']] });
  for (const r of rows) await checkStoredSubmission(r.id);
  return { rechecked: rows.length };
}

/**
 * Re-run the checks of every submitted attempt of every practical: after the grading engine
 * changed, so that stored verdicts, proposed marks and the statistics follow the engine in use.
 * Marks a TA awarded and their comments are kept; proposed marks follow the new verdicts.
 * `onProgress` is called after each submission (for the command's output).
 */
export async function recheckAll(
  onProgress?: (done: number, total: number) => void,
): Promise<{ rechecked: number; failed: { id: number; message: string }[] }> {
  const { Submission } = models();
  const rows = await Submission.findAll({ where: { attempt: { [Op.gt]: 0 } }, attributes: ['id'], order: [['id', 'ASC']] });
  const failed: { id: number; message: string }[] = [];
  let done = 0;
  for (const r of rows) {
    try {
      await checkStoredSubmission(r.id);
    } catch (error) {
      failed.push({ id: r.id, message: error instanceof Error ? error.message : String(error) });
    }
    onProgress?.(++done, rows.length);
  }
  return { rechecked: rows.length - failed.length, failed };
}
