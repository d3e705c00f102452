import { authorize } from '@/lib/authz';
import { audit } from '@/lib/audit';
import { sequelize } from '@/lib/db';
import { HttpError, idParam, json, route } from '@/lib/http';
import { models } from '@/models';

type Ctx = { params: Promise<{ membershipId: string }> };

/** Site administrators remove a course role (the account stays; its submissions and marks stay). */
export const DELETE = route<Ctx>(async (request, { params }) => {
  const actor = await authorize(request, { kind: 'admin' });
  const id = idParam((await params).membershipId);
  const { CourseMembership } = models();
  await sequelize().transaction(async (transaction) => {
    const row = await CourseMembership.findByPk(id, { transaction });
    if (!row) throw new HttpError(404, 'No such course role.');
    await row.destroy({ transaction });
    await audit(
      {
        actorId: actor.id,
        action: 'membership.remove',
        entityType: 'course_membership',
        entityId: row.id,
        before: row.get({ plain: true }),
      },
      transaction,
    );
  });
  return json({ ok: true });
});
