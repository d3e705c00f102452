'use strict';

/**
 * What a marking-queue row shows, kept on the submission when it is checked (lib/submissions/
 * check.ts), so the queue reads a few narrow columns instead of the engine's whole result:
 * verdict counts over its check results and the codes of its named slips. Existing rows are
 * filled from check_results and slip_findings. Plus the indexes the queue's filters and keyset
 * pages use: a practical's marked attempts in submission-time order, and a cohort's.
 */
const INDEXES = [
  ['submissions', ['practicalId', 'isMarkedAttempt', 'submittedAt', 'id'], 'submissions_queue_practical'],
  ['submissions', ['cohortId', 'isMarkedAttempt', 'submittedAt', 'id'], 'submissions_queue_cohort'],
];

module.exports = {
  async up(q, S) {
    for (const column of ['verdictsWithin', 'verdictsPartial', 'verdictsOutside', 'verdictsNotChecked']) {
      await q.addColumn('submissions', column, { type: S.INTEGER, allowNull: false, defaultValue: 0 });
    }
    await q.addColumn('submissions', 'slipCodes', { type: S.STRING(400), allowNull: false, defaultValue: '' });
    for (const [column, test] of [
      ['verdictsWithin', "cr.verdict = 'within'"],
      ['verdictsPartial', "cr.verdict = 'partial'"],
      ['verdictsOutside', "cr.verdict = 'outside'"],
      ['verdictsNotChecked', "cr.verdict NOT IN ('within', 'partial', 'outside')"],
    ]) {
      await q.sequelize.query(
        `UPDATE submissions SET "${column}" = (SELECT COUNT(*) FROM check_results cr WHERE cr."submissionId" = submissions.id AND ${test})`,
      );
    }
    const [slips] = await q.sequelize.query('SELECT DISTINCT "submissionId", code FROM slip_findings ORDER BY "submissionId", code');
    const bySubmission = new Map();
    for (const r of slips) bySubmission.set(r.submissionId, [...(bySubmission.get(r.submissionId) || []), r.code]);
    for (const [id, codes] of bySubmission) {
      await q.sequelize.query('UPDATE submissions SET "slipCodes" = :codes WHERE id = :id', {
        replacements: { id, codes: codes.join(',').slice(0, 400) },
      });
    }
    for (const [table, fields, name] of INDEXES) await q.addIndex(table, fields, { name });
  },

  async down(q) {
    for (const [table, , name] of [...INDEXES].reverse()) await q.removeIndex(table, name);
    for (const column of ['slipCodes', 'verdictsNotChecked', 'verdictsOutside', 'verdictsPartial', 'verdictsWithin'])
      await q.removeColumn('submissions', column);
  },
};
