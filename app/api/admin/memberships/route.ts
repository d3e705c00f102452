import { z } from 'zod';
import { authorize } from '@/lib/authz';
import { json, readJson, route, HttpError } from '@/lib/http';
import { models } from '@/models';
import { COURSE_ROLES } from '@/models/course-membership';
import { audit } from '@/lib/audit';
import { sequelize } from '@/lib/db';

export const grantRoleSchema = z.object({
  email: z.string().trim().toLowerCase().email('Enter an e-mail address.').max(254),
  courseId: z.number().int().positive(),
  role: z.enum(COURSE_ROLES, { message: `Role must be one of: ${COURSE_ROLES.join(', ')}.` }),
  cohortId: z.number().int().positive().nullable().optional(),
});

/** Site administrators grant a course role to an existing account. */
export const POST = route(async (request) => {
  const actor = await authorize(request, { kind: 'admin' });
  const input = await readJson(request, grantRoleSchema);
  const { User, Course, Cohort, CourseMembership } = models();
  const user = await User.findOne({ where: { email: input.email } });
  if (!user) throw new HttpError(404, 'No account has that e-mail address.');
  if (!(await Course.findByPk(input.courseId))) throw new HttpError(404, 'No such course.');
  if (input.cohortId) {
    const cohort = await Cohort.findByPk(input.cohortId);
    if (!cohort || cohort.courseId !== input.courseId) throw new HttpError(400, 'That cohort is not part of the course.');
  }
  if (input.role === 'student' && !input.cohortId) throw new HttpError(400, 'A student needs a cohort.');
  const membership = await sequelize().transaction(async (transaction) => {
    const [row, created] = await CourseMembership.findOrCreate({
      where: { userId: user.id, courseId: input.courseId, role: input.role },
      defaults: { userId: user.id, courseId: input.courseId, role: input.role, cohortId: input.cohortId ?? null },
      transaction,
    });
    if (created)
      await audit(
        { actorId: actor.id, action: 'membership.grant', entityType: 'course_membership', entityId: row.id, after: row.toJSON() },
        transaction,
      );
    return row;
  });
  return json({ membership }, 201);
});
