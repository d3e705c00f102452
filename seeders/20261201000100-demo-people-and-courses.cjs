'use strict';
/**
 * Demo scenario: Northmere University, a fictional university. Every name here is invented.
 * Idempotent: rows are looked up by their natural keys (e-mail, course code, cohort name) first.
 */
const bcrypt = require('bcryptjs');
const { DEMO_PASSWORD, FIRST_NAMES, LAST_NAMES } = require('./data/demo-cast.cjs');

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
  const row = { ...where, ...extra };
  if (table !== 'audit_log') Object.assign(row, { createdAt: now, updatedAt: now });
  await q.bulkInsert(table, [row]);
  return findId(q, table, where);
}

module.exports = {
  async up(q) {
    const hash = bcrypt.hashSync(DEMO_PASSWORD, 10);
    const user = (email, name, extra = {}) =>
      ensure(q, 'users', { email }, { name, passwordHash: hash, isAdmin: false, studentNumber: null, ...extra });

    const admin = await user('admin@northmere.example', 'Ada Rennick', { isAdmin: true });
    const lead = await user('lead@northmere.example', 'Dr Imogen Tarrant');
    const instructor1 = await user('instructor1@northmere.example', 'Dr Owen Petrakis');
    const instructor2 = await user('instructor2@northmere.example', 'Dr Leena Marsh');
    const tas = [];
    for (const [i, name] of ['Farid Okonkwo-Lane', 'Priya Castell', 'Tomas Vey', 'Greta Lindqvist-Amaro'].entries()) {
      tas.push(await user(`ta${i + 1}@northmere.example`, name));
    }

    const chem = await ensure(q, 'courses', { code: 'CHEM2041' }, { title: 'Physical Chemistry Laboratory II', archivedAt: null });
    const phys = await ensure(q, 'courses', { code: 'PHYS2310' }, { title: 'Molecular Physics Laboratory', archivedAt: null });
    const cohortA = await ensure(
      q,
      'cohorts',
      { courseId: chem, name: 'Group A', term: '2026 Autumn' },
      { instrument: 'FTIR bench 1 (0.5 cm⁻¹)', archivedAt: null },
    );
    const cohortB = await ensure(
      q,
      'cohorts',
      { courseId: chem, name: 'Group B', term: '2026 Autumn' },
      { instrument: 'FTIR bench 2 (1 cm⁻¹)', archivedAt: null },
    );
    const cohortP = await ensure(
      q,
      'cohorts',
      { courseId: phys, name: 'Main cohort', term: '2026 Autumn' },
      { instrument: 'FTIR bench 1 (0.5 cm⁻¹)', archivedAt: null },
    );

    const member = (userId, courseId, role, cohortId = null) => ensure(q, 'course_memberships', { userId, courseId, role }, { cohortId });
    await member(lead, chem, 'lead');
    await member(instructor1, chem, 'instructor');
    await member(instructor2, phys, 'instructor');
    await member(instructor2, phys, 'lead');
    // One person, different roles in different courses: Dr Petrakis also marks in PHYS2310.
    await member(instructor1, phys, 'ta');
    await member(tas[0], chem, 'ta');
    await member(tas[1], chem, 'ta');
    await member(tas[2], chem, 'ta');
    await member(tas[3], phys, 'ta');
    const duty = (cohortId, taId) => ensure(q, 'ta_assignments', { cohortId, taId, studentId: null });
    await duty(cohortA, tas[0]);
    await duty(cohortB, tas[1]);
    await duty(cohortA, tas[2]);
    await duty(cohortB, tas[2]);
    await duty(cohortP, tas[3]);
    await duty(cohortP, instructor1);

    const cohorts = [
      [chem, cohortA],
      [chem, cohortB],
      [phys, cohortP],
    ];
    for (let i = 0; i < 60; i++) {
      const n = String(i + 1).padStart(2, '0');
      const name = `${FIRST_NAMES[i % FIRST_NAMES.length]} ${LAST_NAMES[(i * 7) % LAST_NAMES.length]}`;
      const id = await user(`student${n}@northmere.example`, name, { studentNumber: `NM26${String(4100 + i)}` });
      const [courseId, cohortId] = cohorts[Math.floor(i / 20)];
      await member(id, courseId, 'student', cohortId);
    }
    void admin;
  },

  async down(q) {
    await q.bulkDelete('courses', { code: ['CHEM2041', 'PHYS2310'] });
    await q.sequelize.query(`DELETE FROM users WHERE email LIKE '%@northmere.example'`);
  },
};
