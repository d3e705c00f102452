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
