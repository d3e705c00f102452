'use strict';

/**
 * Kept statistics (lib/statistics/keep.ts): the cohort statistics are read from counts kept per
 * practical and cohort, brought up to date in the same transaction as the check, mark,
 * moderation or release that changes them, instead of being aggregated from every check result
 * on each request.
 *
 * Two kinds of table:
 * - What each counted submission has contributed ("applied" rows): statistics_submissions,
 *   statistics_values (its check results, with the relative deviation and its fine bin) and
 *   statistics_slip_findings. Keeping them makes an update a difference between what a student's
 *   submissions contribute now and what they contributed before; statistics_values also serves
 *   the exact quartiles through its index.
 * - The aggregates: statistics_groups (per practical and cohort), statistics_quantities (per
 *   practical, cohort, quantity, species and basis), statistics_slips and statistics_slip_codes,
 *   statistics_markers. Sums are exact (lib/statistics/exact.ts), stored as text.
 *
 * No foreign key to submissions: a removed submission's applied rows must still be there to be
 * subtracted. Practical and cohort keys cascade, so a removed practical or cohort takes its rows.
 * Rebuilt from scratch by `npm run stats:rebuild`.
 */

function ref(S, table) {
  return { type: S.INTEGER, allowNull: false, references: { model: table, key: 'id' }, onDelete: 'CASCADE', onUpdate: 'CASCADE' };
}
const count = (S) => ({ type: S.INTEGER, allowNull: false, defaultValue: 0 });
const exact = (S) => ({ type: S.TEXT, allowNull: false, defaultValue: '0:0' });
const id = (S) => ({ type: S.INTEGER, primaryKey: true, autoIncrement: true, allowNull: false });

module.exports = {
  async up(q, S) {
    await q.createTable('statistics_submissions', {
      submissionId: { type: S.INTEGER, primaryKey: true, allowNull: false },
      practicalId: ref(S, 'practicals'),
      cohortId: ref(S, 'cohorts'),
      studentId: { type: S.INTEGER, allowNull: false },
      /** The student has counted submissions in more than one cohort of this practical. */
      spans: { type: S.BOOLEAN, allowNull: false, defaultValue: false },
      late: { type: S.BOOLEAN, allowNull: false },
      marked: { type: S.BOOLEAN, allowNull: false },
      released: { type: S.BOOLEAN, allowNull: false },
      markedById: { type: S.INTEGER, allowNull: true },
      /** 100·awarded/max when marked; 100·(awarded − proposed)/max. */
      markPercent: { type: S.FLOAT, allowNull: true },
      differencePercent: { type: S.FLOAT, allowNull: true },
      overrides: count(S),
      /** "markerId:1" per moderation that changed marks, "markerId:0" per confirmation. */
      moderations: { type: S.TEXT, allowNull: false, defaultValue: '' },
    });
    await q.addIndex('statistics_submissions', ['practicalId', 'studentId'], { name: 'statistics_submissions_student' });
    await q.addIndex('statistics_submissions', ['practicalId', 'spans'], { name: 'statistics_submissions_spans' });

    await q.createTable('statistics_values', {
      id: id(S),
      submissionId: { type: S.INTEGER, allowNull: false },
      practicalId: ref(S, 'practicals'),
      cohortId: ref(S, 'cohorts'),
      key: { type: S.STRING(40), allowNull: false },
      species: { type: S.STRING(40), allowNull: false },
      basis: { type: S.STRING(20), allowNull: false },
      verdict: { type: S.STRING(20), allowNull: false },
      /** Relative deviation in percent; null when not checked. */
      x: { type: S.FLOAT, allowNull: true },
      bin: { type: S.INTEGER, allowNull: true },
    });
    await q.addIndex('statistics_values', ['submissionId'], { name: 'statistics_values_submission' });
    await q.addIndex('statistics_values', ['practicalId', 'key', 'species', 'basis', 'bin', 'cohortId', 'x'], {
      name: 'statistics_values_order',
    });

    await q.createTable('statistics_slip_findings', {
      id: id(S),
      submissionId: { type: S.INTEGER, allowNull: false },
      practicalId: ref(S, 'practicals'),
      cohortId: ref(S, 'cohorts'),
      key: { type: S.STRING(40), allowNull: false },
      code: { type: S.STRING(60), allowNull: false },
    });
    await q.addIndex('statistics_slip_findings', ['submissionId'], { name: 'statistics_slip_findings_submission' });
    await q.addIndex('statistics_slip_findings', ['practicalId', 'cohortId', 'code', 'submissionId'], {
      name: 'statistics_slip_findings_example',
    });

    await q.createTable('statistics_groups', {
      id: id(S),
      practicalId: ref(S, 'practicals'),
      cohortId: ref(S, 'cohorts'),
      students: count(S),
      submitted: count(S),
      late: count(S),
      marked: count(S),
      released: count(S),
      markCount: count(S),
      markSum: exact(S),
      markSquares: exact(S),
      /** A new random token whenever anything kept for this practical and cohort changes (the statistics cache's stamp). */
      changeToken: { type: S.STRING(32), allowNull: false, defaultValue: '' },
    });
    await q.addIndex('statistics_groups', ['practicalId', 'cohortId'], { unique: true, name: 'statistics_groups_key' });

    await q.createTable('statistics_quantities', {
      id: id(S),
      practicalId: ref(S, 'practicals'),
      cohortId: ref(S, 'cohorts'),
      key: { type: S.STRING(40), allowNull: false },
      species: { type: S.STRING(40), allowNull: false },
      basis: { type: S.STRING(20), allowNull: false },
      n: count(S),
      students: count(S),
      within: count(S),
      partial: count(S),
      outside: count(S),
      notChecked: count(S),
      checked: count(S),
      xSum: exact(S),
      xSquares: exact(S),
      /** Fine histogram (lib/statistics/bins.ts) as JSON [[bin, count], …]. */
      bins: { type: S.TEXT, allowNull: false, defaultValue: '[]' },
    });
    await q.addIndex('statistics_quantities', ['practicalId', 'cohortId', 'key', 'species', 'basis'], {
      unique: true,
      name: 'statistics_quantities_key',
    });

    await q.createTable('statistics_slips', {
      id: id(S),
      practicalId: ref(S, 'practicals'),
      cohortId: ref(S, 'cohorts'),
      code: { type: S.STRING(60), allowNull: false },
      key: { type: S.STRING(40), allowNull: false },
      findings: count(S),
    });
    await q.addIndex('statistics_slips', ['practicalId', 'cohortId', 'code', 'key'], { unique: true, name: 'statistics_slips_key' });

    await q.createTable('statistics_slip_codes', {
      id: id(S),
      practicalId: ref(S, 'practicals'),
      cohortId: ref(S, 'cohorts'),
      code: { type: S.STRING(60), allowNull: false },
      submissions: count(S),
      /** The lowest submission id with this slip (the page links to it as an example). */
      example: { type: S.INTEGER, allowNull: true },
    });
    await q.addIndex('statistics_slip_codes', ['practicalId', 'cohortId', 'code'], { unique: true, name: 'statistics_slip_codes_key' });

    await q.createTable('statistics_markers', {
      id: id(S),
      practicalId: ref(S, 'practicals'),
      cohortId: ref(S, 'cohorts'),
      markerId: { type: S.INTEGER, allowNull: false },
      submissions: count(S),
      markCount: count(S),
      markSum: exact(S),
      markSquares: exact(S),
      differenceCount: count(S),
      differenceSum: exact(S),
      differenceSquares: exact(S),
      overrides: count(S),
      moderations: count(S),
      moderationChanges: count(S),
    });
    await q.addIndex('statistics_markers', ['practicalId', 'cohortId', 'markerId'], { unique: true, name: 'statistics_markers_key' });

    // Which build of the kept tables the rows follow: 1 = built (a new database has nothing to
    // build); 0 = to be rebuilt from the check results, which the app does on first use
    // (lib/statistics/keep.ts ensureKeptStatistics) when this migration runs on a database with submissions.
    await q.createTable('statistics_meta', {
      id: { type: S.INTEGER, primaryKey: true, allowNull: false },
      keptVersion: { type: S.INTEGER, allowNull: false },
    });
    const [rows] = await q.sequelize.query('SELECT COUNT(*) AS n FROM submissions WHERE attempt > 0');
    await q.bulkInsert('statistics_meta', [{ id: 1, keptVersion: Number(rows[0].n) > 0 ? 0 : 1 }]);
  },

  async down(q) {
    for (const table of [
      'statistics_meta',
      'statistics_markers',
      'statistics_slip_codes',
      'statistics_slips',
      'statistics_quantities',
      'statistics_groups',
      'statistics_slip_findings',
      'statistics_values',
      'statistics_submissions',
    ]) {
      await q.dropTable(table);
    }
  },
};
