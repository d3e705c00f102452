'use strict';
/**
 * Demo practicals for Northmere University (fictional): CHEM2041 "HCl/DCl fundamental band"
 * (practice mode, a coarser band for Group B's instrument) and PHYS2310 "CO fundamental and
 * overtone" (assessed). Idempotent: rows are found by their natural keys before insertion.
 * Tolerances follow common practice (band centre within 1–2 cm⁻¹ at 0.5–1 cm⁻¹ resolution,
 * B within ≈ 1 %, rₑ within ≈ 0.002 Å). No consistency bands are set: the engine's defaults by
 * kind apply (arithmetic to the digits typed, fitted values within three standard errors).
 */

async function findId(q, table, where) {
  const keys = Object.keys(where);
  const sql = `SELECT id FROM ${table} WHERE ${keys.map((k) => (where[k] === null ? `"${k}" IS NULL` : `"${k}" = ?`)).join(' AND ')}`;
  const rows = await q.sequelize.query(sql, {
    replacements: keys.filter((k) => where[k] !== null).map((k) => where[k]),
    type: q.sequelize.QueryTypes.SELECT,
  });
  return rows[0] ? rows[0].id : null;
}

async function ensure(q, table, where, extra = {}) {
  const found = await findId(q, table, where);
  if (found) return found;
  const now = new Date();
  await q.bulkInsert(table, [{ ...where, ...extra, createdAt: now, updatedAt: now }]);
  return findId(q, table, where);
}

const DAY = 86_400_000;
const REL = (inner, outer) => ({ kind: 'relative', inner, outer, unit: null });
const ABS = (inner, outer, unit) => ({ kind: 'absolute', inner, outer, unit });

const HCL_INSTRUCTIONS = `## What to hand in

Record the fundamental band (v = 1 ← 0) of H³⁵Cl and D³⁵Cl from the cell on your bench.

1. Assign each line of the P and R branches to its J and enter the line list.
2. Find the band centre $\\tilde\\nu_0$ from a fit of the line positions against the running index $m$:
   $$\\tilde\\nu(m) = \\tilde\\nu_0 + (B_1 + B_0)\\,m + (B_1 - B_0)\\,m^2$$
3. Compute the reduced mass $\\mu$ from isotopic masses and the force constant
   $k = 4\\pi^2 c^2 \\tilde\\nu^2 \\mu$ (with $c$ in cm s⁻¹ when $\\tilde\\nu$ is in cm⁻¹).
4. From $B_0$ and $B_1$ obtain $\\alpha_e = B_0 - B_1$, $B_e = B_0 + \\alpha_e/2$ and the bond length $r_e$.

Give every number with its unit and a standard uncertainty.`;

const CO_INSTRUCTIONS = `## What to hand in

Record the fundamental (v = 1 ← 0) and the first overtone (v = 2 ← 0) of ¹²C¹⁶O.

- From both band centres: $\\omega_e x_e = (2\\tilde\\nu_{10} - \\tilde\\nu_{20})/2$ and $\\omega_e = \\tilde\\nu_{10} + 2\\omega_e x_e$.
- The force constant from the band centre, $k = 4\\pi^2 c^2 \\tilde\\nu_0^2 \\mu$.
- The Morse estimate of the dissociation energy, $D_e \\approx \\omega_e^2 / (4\\omega_e x_e)$.

This practical is assessed: verdicts are shown when the marking is released.`;

async function practical(q, courseId, title, fields) {
  const id = await findId(q, 'practicals', { courseId, title });
  if (id) return { id, created: false };
  const now = new Date();
  await q.bulkInsert('practicals', [
    {
      courseId,
      title,
      copiedFromId: null,
      archivedAt: null,
      createdAt: now,
      updatedAt: now,
      ...fields,
      species: JSON.stringify(fields.species),
      rubric: JSON.stringify(fields.rubric),
    },
  ]);
  return { id: await findId(q, 'practicals', { courseId, title }), created: true };
}

async function quantities(q, practicalId, list, overrides = {}) {
  let position = 0;
  for (const [key, species, unit, marks, uncertaintyRequired, accuracy] of list) {
    const qd = await ensure(
      q,
      'quantity_definitions',
      { practicalId, key, species },
      {
        unit,
        marks,
        uncertaintyRequired,
        referenceKind: 'literature',
        referenceValueSI: null,
        referenceNote: null,
        position: position++,
      },
    );
    await ensure(q, 'tolerance_bands', { quantityDefinitionId: qd, cohortId: null, basis: 'accuracy' }, { ...accuracy, updatedById: null });
    for (const [cohortId, bands] of Object.entries(overrides)) {
      const band = bands[`${key}:${species}`];
      if (band)
        await ensure(
          q,
          'tolerance_bands',
          { quantityDefinitionId: qd, cohortId: Number(cohortId), basis: 'accuracy' },
          { ...band, updatedById: null },
        );
    }
  }
}

module.exports = {
  async up(q) {
    const chem = await findId(q, 'courses', { code: 'CHEM2041' });
    const phys = await findId(q, 'courses', { code: 'PHYS2310' });
    if (!chem || !phys) throw new Error('Run the demo people-and-courses seeder first.');
    const groupA = await findId(q, 'cohorts', { courseId: chem, name: 'Group A', term: '2026 Autumn' });
    const groupB = await findId(q, 'cohorts', { courseId: chem, name: 'Group B', term: '2026 Autumn' });
    const main = await findId(q, 'cohorts', { courseId: phys, name: 'Main cohort', term: '2026 Autumn' });
    const now = Date.now();

    const hcl = await practical(q, chem, 'HCl/DCl fundamental band', {
      species: ['H35Cl', 'D35Cl'],
      instructions: HCL_INSTRUCTIONS,
      hazardNotes: 'HCl and DCl are toxic and corrosive gases. Cells are filled and vented only by demonstrators in the fume cupboard.',
      mode: 'practice',
      maxAttempts: 3,
      lateRule: 'penalty',
      latePenaltyPerDay: 10,
      latePenaltyCap: 50,
      rubric: [
        {
          key: 'report-presentation',
          title: 'Report: presentation',
          marks: 4,
          guidance: 'Clear figures with labelled axes and units; a readable line table.',
        },
        {
          key: 'discussion-of-errors',
          title: 'Discussion of errors',
          marks: 4,
          guidance: 'Sources of uncertainty named and their size estimated.',
        },
      ],
    });
    await ensure(q, 'practical_cohorts', { practicalId: hcl.id, cohortId: groupA }, { opensAt: null, deadline: new Date(now + 10 * DAY) });
    await ensure(q, 'practical_cohorts', { practicalId: hcl.id, cohortId: groupB }, { opensAt: null, deadline: new Date(now + 17 * DAY) });
    await quantities(
      q,
      hcl.id,
      [
        ['bandCentre', 'H35Cl', 'cm-1', 2, true, ABS(2, 5, 'cm-1')],
        ['reducedMass', 'H35Cl', 'u', 1, false, REL(0.001, 0.005)],
        ['forceConstant', 'H35Cl', 'N m-1', 2, true, REL(0.01, 0.03)],
        ['B0', 'H35Cl', 'cm-1', 1, true, REL(0.01, 0.03)],
        ['B1', 'H35Cl', 'cm-1', 1, true, REL(0.01, 0.03)],
        ['Be', 'H35Cl', 'cm-1', 1, false, REL(0.01, 0.03)],
        ['alphaE', 'H35Cl', 'cm-1', 1, false, REL(0.05, 0.15)],
        ['re', 'H35Cl', 'Å', 2, true, ABS(0.002, 0.005, 'Å')],
        ['bandCentre', 'D35Cl', 'cm-1', 1, true, ABS(2, 5, 'cm-1')],
        ['forceConstant', 'D35Cl', 'N m-1', 1, false, REL(0.01, 0.03)],
      ],
      {
        // Group B works on the 1 cm⁻¹ bench: coarser accuracy bands.
        [groupB]: {
          'bandCentre:H35Cl': ABS(4, 8, 'cm-1'),
          'bandCentre:D35Cl': ABS(4, 8, 'cm-1'),
          'B0:H35Cl': REL(0.02, 0.05),
          'B1:H35Cl': REL(0.02, 0.05),
          're:H35Cl': ABS(0.004, 0.01, 'Å'),
        },
      },
    );

    const co = await practical(q, phys, 'CO fundamental and overtone', {
      species: ['12C16O'],
      instructions: CO_INSTRUCTIONS,
      hazardNotes:
        'Carbon monoxide is a toxic gas without smell. Cells are filled and vented only by demonstrators, with the CO detector switched on.',
      mode: 'assessed',
      maxAttempts: 1,
      lateRule: 'not-accepted',
      latePenaltyPerDay: 0,
      latePenaltyCap: 0,
      rubric: [{ key: 'report-presentation', title: 'Report: presentation', marks: 4, guidance: 'Both bands shown; units on every axis.' }],
    });
    await ensure(q, 'practical_cohorts', { practicalId: co.id, cohortId: main }, { opensAt: null, deadline: new Date(now + 14 * DAY) });
    await quantities(q, co.id, [
      ['bandCentre', '12C16O', 'cm-1', 2, true, ABS(2, 5, 'cm-1')],
      ['omegaE', '12C16O', 'cm-1', 2, true, ABS(3, 8, 'cm-1')],
      ['omegaExe', '12C16O', 'cm-1', 2, true, REL(0.05, 0.15)],
      ['forceConstant', '12C16O', 'N m-1', 2, false, REL(0.01, 0.03)],
      ['dissociationEnergy', '12C16O', 'cm-1', 2, false, REL(0.1, 0.25)],
    ]);
  },

  async down(q) {
    await q.sequelize.query(`DELETE FROM practicals WHERE title IN ('HCl/DCl fundamental band', 'CO fundamental and overtone')`);
  },
};
