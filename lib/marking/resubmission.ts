/** Ask a student to resubmit: one more attempt, and an e-mail queued in the same transaction. */
import { sequelize } from '@/lib/db';
import { audit } from '@/lib/audit';
import { HttpError } from '@/lib/http';
import { queueEmail } from '@/lib/mail/outbox';
import { renderEmail } from '@/lib/templates';
import { models } from '@/models';
import { appUrl } from './release';
import { STALE_MESSAGE } from './marks';

export async function requestResubmission(actor: { id: number; name: string }, submissionId: number, message: string, version?: number) {
  const { Submission, Practical, Course, Cohort, User } = models();
  return sequelize().transaction(async (t) => {
    const s = await Submission.findByPk(submissionId, { transaction: t });
    if (!s) throw new HttpError(404, 'Not found.');
    if (!['submitted', 'marked'].includes(s.status))
      throw new HttpError(409, `This submission is ${s.status.replace('-', ' ')}; a resubmission can only be asked for before release.`);
    const where: Record<string, unknown> = { id: submissionId, status: s.status, version: version ?? s.version };
    const [count] = await Submission.update(
      {
        status: 'resubmission-requested',
        extraAttempts: s.extraAttempts + 1,
        resubmissionMessage: message,
        version: sequelize().literal('version + 1') as unknown as number,
      },
      { where, transaction: t },
    );
    if (count !== 1) throw new HttpError(409, STALE_MESSAGE);
    const [practical, cohort, student] = await Promise.all([
      Practical.findByPk(s.practicalId, { transaction: t }),
      Cohort.findByPk(s.cohortId, { transaction: t }),
      User.findByPk(s.studentId, { transaction: t }),
    ]);
    const course = await Course.findByPk(practical!.courseId, { transaction: t });
    const mail = renderEmail('resubmission-requested', {
      student: student!.name,
      marker: actor.name,
      practical: practical!.title,
      course: `${course!.code} ${course!.title}`,
      cohort: cohort!.name,
      message,
      link: `${appUrl()}/student`,
    });
    await queueEmail(
      {
        dedupeKey: `resubmit:${submissionId}:${s.extraAttempts + 1}`,
        to: student!.email,
        subject: mail.subject,
        text: mail.text,
        submissionId,
      },
      t,
    );
    await audit(
      {
        actorId: actor.id,
        action: 'submission.request-resubmission',
        entityType: 'submission',
        entityId: submissionId,
        before: { status: s.status, extraAttempts: s.extraAttempts },
        after: { status: 'resubmission-requested', extraAttempts: s.extraAttempts + 1, message },
      },
      t,
    );
    return { status: 'resubmission-requested', extraAttempts: s.extraAttempts + 1 };
  });
}
