'use strict';
/**
 * Demo submissions (fictional) for CHEM2041, made by seeders/generators/submissions.ts from simulated
 * line lists; each is checked by checkStoredSubmission. Skips quietly when the demo practicals
 * are not there. Idempotent.
 */
module.exports = {
  async up() {
    // db:seed runs under `node --conditions=react-server --import tsx`, so the TypeScript module can be required directly.
    const { seedDemoSubmissions } = require('./generators/submissions.ts');
    const result = await seedDemoSubmissions();
    if (result.skipped) console.log(`[demo-submissions] skipped: ${result.skipped}`);
    else console.log(`[demo-submissions] ${result.created} submissions created`);
    const { closeDatabase } = require('./generators/submissions.ts');
    if (closeDatabase) await closeDatabase();
  },
  async down(q) {
    const [[row]] = await q.sequelize.query("SELECT id FROM practicals WHERE title = 'HCl/DCl fundamental band'");
    if (row) await q.sequelize.query(`DELETE FROM submissions WHERE "practicalId" = ${Number(row.id)} AND attempt > 0`);
  },
};
