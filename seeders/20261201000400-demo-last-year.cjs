'use strict';
/**
 * Demo (fictional): last year's CHEM2041 cohort "Group A, 2025 Autumn" with a copy of "HCl/DCl
 * fundamental band" and 20 alumni's checked, marked and released submissions, so the statistics
 * page can compare 2025 with 2026. Built by seeders/generators/last-year.ts with the real engine
 * and marking code. Idempotent.
 */
module.exports = {
  async up() {
    // db:seed runs under `node --conditions=react-server --import tsx`, so the TypeScript module can be required directly.
    const { seedLastYearDemo } = require('./generators/last-year.ts');
    const result = await seedLastYearDemo();
    if (result.skipped) console.log(`[demo-last-year] skipped: ${result.skipped}`);
    else console.log(`[demo-last-year] ${result.created} submissions created`);
    const { closeDatabase } = require('./generators/last-year.ts');
    if (closeDatabase) await closeDatabase();
  },
  async down(q) {
    const [[cohort]] = await q.sequelize.query(
      `SELECT c.id FROM cohorts c JOIN courses k ON k.id = c."courseId" WHERE k.code = 'CHEM2041' AND c.name = 'Group A' AND c.term = '2025 Autumn'`,
    );
    if (cohort) {
      const id = Number(cohort.id);
      await q.sequelize.query(
        `DELETE FROM practicals WHERE id IN (SELECT "practicalId" FROM practical_cohorts WHERE "cohortId" = ${id}) AND "copiedFromId" IS NOT NULL`,
      );
      await q.sequelize.query(`DELETE FROM cohorts WHERE id = ${id}`);
    }
    await q.sequelize.query(`DELETE FROM users WHERE email LIKE 'alumni%@northmere.example'`);
  },
};
