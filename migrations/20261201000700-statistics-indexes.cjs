'use strict';

/**
 * Indexes for the cohort statistics (lib/statistics/queries.ts). Plain multi-column B-tree
 * indexes, portable to PostgreSQL. The access path is: the counted submissions of a practical
 * (practicalId, isMarkedAttempt, cohortId …) and then, per submission, its check results, slips,
 * marks and moderations by submissionId. The trailing columns make the indexes covering, so the
 * aggregates read only the index and never the wide table rows; the updatedAt columns serve the
 * change stamp of the statistics cache (lib/statistics/cache.ts).
 */
const INDEXES = [
  ['submissions', ['practicalId', 'isMarkedAttempt', 'cohortId', 'status', 'submittedAt', 'studentId'], 'submissions_statistics_scope'],
  ['submissions', ['practicalId', 'cohortId', 'updatedAt'], 'submissions_practical_cohort_updated'],
  [
    'check_results',
    ['submissionId', 'key', 'species', 'basis', 'verdict', 'relativeDeviation', 'updatedAt'],
    'check_results_statistics_covering',
  ],
  ['slip_findings', ['submissionId', 'code', 'key'], 'slip_findings_statistics_covering'],
  ['marks', ['submissionId', 'updatedAt'], 'marks_submission_updated'],
  ['moderations', ['submissionId', 'markerId', 'decision', 'updatedAt'], 'moderations_statistics_covering'],
];

module.exports = {
  async up(q) {
    for (const [table, fields, name] of INDEXES) await q.addIndex(table, fields, { name });
  },
  async down(q) {
    for (const [table, , name] of [...INDEXES].reverse()) await q.removeIndex(table, name);
  },
};
