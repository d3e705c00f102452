/**
 * "Next submission" on the marking screen: the oldest submitted, not yet marked attempt in the
 * marker's own queue, other than the one open now.
 */
import { Op } from 'sequelize';
import type { Actor } from '@/lib/authz';
import { models } from '@/models';
import { markingScope } from './queue';

export async function nextToMark(actor: Actor, currentId: number): Promise<{ id: number; student: string } | null> {
  const scope = await markingScope(actor);
  if (!scope) return null;
  const { Submission, User } = models();
  const next = await Submission.findOne({
    where: { [Op.and]: [scope, { isMarkedAttempt: true, status: 'submitted', id: { [Op.ne]: currentId } }] },
    attributes: ['id', 'studentId'],
    order: [
      ['submittedAt', 'ASC'],
      ['id', 'ASC'],
    ],
  });
  if (!next) return null;
  const student = await User.findByPk(next.studentId, { attributes: ['name'] });
  return { id: next.id, student: student?.name ?? 'the next student' };
}
