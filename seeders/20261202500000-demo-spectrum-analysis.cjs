'use strict';
/**
 * The demo's HCl/DCl practical shows the third comparison, "from your spectrum" (Oscillab's own
 * reading of each student's spectrum), and its submitted attempts are checked again so the
 * marking screen and the feedback show it. Idempotent; skips quietly without the demo practical.
 */
module.exports = {
  async up(q) {
    const [[row]] = await q.sequelize.query("SELECT id FROM practicals WHERE title = 'HCl/DCl fundamental band'");
    if (!row) {
      console.log('[demo-spectrum-analysis] skipped: no demo HCl/DCl practical');
      return;
    }
    await q.sequelize.query(
      `UPDATE practicals SET "spectrumAnalysis" = ${q.sequelize.getDialect() === 'postgres' ? 'true' : '1'} WHERE id = ${Number(row.id)}`,
    );
    const { recheckPractical } = require('../lib/submissions/recheck.ts');
    const result = await recheckPractical(Number(row.id));
    console.log(`[demo-spectrum-analysis] ${result.rechecked} submissions checked again`);
    const { closeDatabase } = require('../lib/db/index.ts');
    if (closeDatabase) await closeDatabase();
  },
  async down(q) {
    await q.sequelize.query('UPDATE practicals SET "spectrumAnalysis" = false WHERE title = \'HCl/DCl fundamental band\'');
  },
};
