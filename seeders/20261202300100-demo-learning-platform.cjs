'use strict';
/**
 * The demo's learning platform: the local stand-in (scripts/fake-platform.ts, started by
 * `npm run demo`) registered with Oscillab, and its CHEM2041 course connected to Oscillab's, with
 * students from the platform joining Group A. Invented, like all of Northmere University.
 * LTI_DEMO_PLATFORM_URL moves the stand-in (default http://127.0.0.1:3030). Idempotent.
 */
const PLATFORM = () => (process.env.LTI_DEMO_PLATFORM_URL || 'http://127.0.0.1:3030').replace(/\/$/, '');
const CLIENT_ID = 'oscillab-northmere';
const DEPLOYMENT_ID = 'northmere-main';
const CONTEXT_ID = 'nmu-chem2041-2026';

async function findId(q, table, where) {
  const keys = Object.keys(where);
  const sql = `SELECT id FROM ${table} WHERE ${keys.map((k) => `"${k}" = ?`).join(' AND ')}`;
  const rows = await q.sequelize.query(sql, { replacements: keys.map((k) => where[k]), type: q.sequelize.QueryTypes.SELECT });
  return rows[0] ? rows[0].id : null;
}

async function ensure(q, table, where, extra = {}) {
  const found = await findId(q, table, where);
  if (found) return found;
  const now = new Date();
  await q.bulkInsert(table, [{ ...where, ...extra, createdAt: now, updatedAt: now }]);
  return findId(q, table, where);
}

module.exports = {
  async up(q) {
    const chem = await findId(q, 'courses', { code: 'CHEM2041' });
    if (!chem) throw new Error('Run the demo people-and-courses seeder first.');
    const groupA = await findId(q, 'cohorts', { courseId: chem, name: 'Group A', term: '2026 Autumn' });
    const base = PLATFORM();
    const registration = await ensure(
      q,
      'lti_registrations',
      { issuer: base, clientId: CLIENT_ID },
      {
        name: 'Northmere learning platform (local stand-in)',
        authLoginUrl: `${base}/auth`,
        authTokenUrl: `${base}/token`,
        keySetUrl: `${base}/jwks`,
        tokenAudience: null,
        active: true,
      },
    );
    await ensure(q, 'lti_deployments', { registrationId: registration, deploymentId: DEPLOYMENT_ID });
    await ensure(
      q,
      'lti_contexts',
      { registrationId: registration, contextId: CONTEXT_ID },
      {
        courseId: chem,
        defaultCohortId: groupA,
        title: 'CHEM2041 Physical Chemistry Laboratory II (2026)',
        membershipsUrl: null,
        lineItemsUrl: null,
        agsScopes: null,
        rosterSyncedAt: null,
      },
    );
  },

  async down(q) {
    await q.bulkDelete('lti_registrations', { clientId: CLIENT_ID });
  },
};
