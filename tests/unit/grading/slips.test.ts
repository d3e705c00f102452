import { describe, expect, it } from 'vitest';
import {
  checkSubmission,
  fitBand,
  forceConstantFromBand,
  bondLengthFromB,
  simulateLineList,
  parseSpecies,
  SLIP_CODES,
  SLIPS,
  u as ATOMIC_MASS_CONSTANT,
  NA,
  c,
  type QuantityKey,
  type SubmissionInput,
} from '@/lib/grading';
import { meanAtomicMass } from '@/lib/grading/isotopes';

// Measured values for the scenarios are the band origins from ../shared/reference-diatomics.md
// (band origin of high-resolution measurements, from memory): H³⁵Cl 2885.98, overtone 5667.98 cm⁻¹.
const NU0_HCL = 2885.98;
const OVERTONE_HCL = 5667.98;

const mu = (formula: string) => {
  const p = parseSpecies(formula);
  if (!p.ok) throw new Error(p.message);
  return p.species;
};

/** Prints a number with n significant figures, as a student would type it. */
const typed = (x: number, n = 5) => x.toPrecision(n);

function codesFor(input: SubmissionInput, key: QuantityKey): string[] {
  const r = checkSubmission(input);
  const entry =
    r.quantities.find((q) => q.key === key && q.verdict === 'outside' && q.diagnoses.length > 0) ?? r.quantities.find((q) => q.key === key);
  expect(entry, `no entry for ${key}`).toBeDefined();
  return entry!.diagnoses.map((d) => d.code).sort();
}

function kSubmission(species: string, kReported: number, unit = 'N/m', extra: Partial<SubmissionInput> = {}): SubmissionInput {
  return {
    species,
    measured: { bandCentre: { value: String(NU0_HCL), unit: 'cm-1' }, ...(extra.measured ?? {}) },
    reported: { forceConstant: { value: typed(kReported), unit } },
    tolerances: { forceConstant: { relative: 0.02 } },
    ...extra,
  };
}

const HCl = mu('H35Cl');
const kRight = forceConstantFromBand(NU0_HCL * 100, HCl.reducedMassKg);

describe('slip diagnosis: each slip rebuilt reproduces exactly its code', () => {
  it('lists every code with a title, explanation and formula', () => {
    expect(SLIP_CODES).toHaveLength(25);
    for (const code of SLIP_CODES) {
      expect(SLIPS[code].title.length).toBeGreaterThan(5);
      expect(SLIPS[code].explanation.length).toBeGreaterThan(20);
      expect(SLIPS[code].formula.length).toBeGreaterThan(3);
    }
  });

  it('mass-numbers-used (μ from 1 and 35)', () => {
    const muSlip = ((1 * 35) / 36) * ATOMIC_MASS_CONSTANT;
    expect(codesFor(kSubmission('H35Cl', forceConstantFromBand(NU0_HCL * 100, muSlip)), 'forceConstant')).toEqual(['mass-numbers-used']);
    const r = checkSubmission({ species: 'H35Cl', reported: { reducedMass: { value: typed((1 * 35) / 36), unit: 'u' } }, tolerances: {} });
    expect(r.quantities[0].diagnoses.map((d) => d.code)).toEqual(['mass-numbers-used']);
  });

  it('average-atomic-mass-used (³⁵Cl₂ with the periodic-table Cl mass)', () => {
    const mCl = meanAtomicMass('Cl')!; // abundance-weighted mean, chemical-elements
    const muSlip = (mCl / 2) * ATOMIC_MASS_CONSTANT;
    // ³⁵Cl₂ band origin from G(1) − G(0) of the reference row (Huber & Herzberg via NIST WebBook, from memory)
    const nu = 559.72 - 2 * 2.675;
    const k = forceConstantFromBand(nu * 100, muSlip);
    const input: SubmissionInput = {
      species: '35Cl2',
      measured: { bandCentre: { value: nu.toFixed(2), unit: 'cm-1' } },
      reported: { forceConstant: { value: typed(k), unit: 'N/m' } },
      tolerances: {},
    };
    expect(codesFor(input, 'forceConstant')).toEqual(['average-atomic-mass-used']);
  });

  it('single-atom-mass-used (mass of H instead of μ)', () => {
    const k = forceConstantFromBand(NU0_HCL * 100, HCl.atoms[0].massU * ATOMIC_MASS_CONSTANT);
    expect(codesFor(kSubmission('H35Cl', k), 'forceConstant')).toEqual(['single-atom-mass-used']);
  });

  it('sum-of-masses-used', () => {
    const k = forceConstantFromBand(NU0_HCL * 100, (HCl.atoms[0].massU + HCl.atoms[1].massU) * ATOMIC_MASS_CONSTANT);
    expect(codesFor(kSubmission('H35Cl', k), 'forceConstant')).toEqual(['sum-of-masses-used']);
  });

  it('molar-mass-not-per-molecule (kg mol⁻¹ not divided by N_A)', () => {
    const k = forceConstantFromBand(NU0_HCL * 100, HCl.reducedMassU * 1e-3);
    expect(codesFor(kSubmission('H35Cl', k), 'forceConstant')).toEqual(['molar-mass-not-per-molecule']);
    const r = checkSubmission({
      species: 'H35Cl',
      reported: { reducedMass: { value: typed(HCl.reducedMassU * 1e-3), unit: 'kg' } },
      tolerances: {},
    });
    expect(r.quantities[0].diagnoses.map((d) => d.code)).toEqual(['molar-mass-not-per-molecule']);
    expect(NA).toBe(6.02214076e23);
  });

  it('grams-not-kilograms', () => {
    expect(codesFor(kSubmission('H35Cl', kRight * 1000), 'forceConstant')).toEqual(['grams-not-kilograms']);
    const r = checkSubmission({
      species: 'H35Cl',
      reported: { reducedMass: { value: typed(HCl.reducedMassKg * 1000), unit: 'kg' } },
      tolerances: {},
    });
    expect(r.quantities[0].diagnoses.map((d) => d.code)).toEqual(['grams-not-kilograms']);
  });

  it('unified-mass-not-converted (μ in u put in as kg)', () => {
    const k = forceConstantFromBand(NU0_HCL * 100, HCl.reducedMassU);
    expect(codesFor(kSubmission('H35Cl', k), 'forceConstant')).toEqual(['unified-mass-not-converted']);
  });

  it('missing-2pi', () => {
    expect(codesFor(kSubmission('H35Cl', kRight / (4 * Math.PI ** 2)), 'forceConstant')).toEqual(['missing-2pi']);
  });

  it('wavenumber-used-as-frequency (c left out)', () => {
    const k = 4 * Math.PI ** 2 * NU0_HCL ** 2 * HCl.reducedMassKg;
    expect(codesFor(kSubmission('H35Cl', k), 'forceConstant')).toEqual(['wavenumber-used-as-frequency']);
  });

  it('speed-of-light-in-m-per-s (c in m/s with ν̃ in cm⁻¹)', () => {
    const k = 4 * Math.PI ** 2 * c ** 2 * NU0_HCL ** 2 * HCl.reducedMassKg;
    expect(codesFor(kSubmission('H35Cl', k), 'forceConstant')).toEqual(['speed-of-light-in-m-per-s']);
  });

  it('per-metre-per-centimetre-confusion (ν̃ in m⁻¹ with c in cm/s; band centre typed in the wrong unit)', () => {
    const k = 4 * Math.PI ** 2 * (c * 100) ** 2 * (NU0_HCL * 100) ** 2 * HCl.reducedMassKg;
    expect(codesFor(kSubmission('H35Cl', k), 'forceConstant')).toEqual(['per-metre-per-centimetre-confusion']);
    const lines = simulateLineList('H35Cl', { jMax: 8, withCentrifugal: false });
    const input: SubmissionInput = {
      species: 'H35Cl',
      measured: { lines },
      reported: { B0: { value: typed(10.43982 * 100), unit: 'cm-1' } },
      tolerances: {},
    };
    expect(codesFor(input, 'B0')).toEqual(['per-metre-per-centimetre-confusion']);
  });

  it('omega-e-instead-of-band-centre and band-centre-instead-of-omega-e', () => {
    const omegaE = 3 * NU0_HCL - OVERTONE_HCL;
    const measured = { bandCentre: { value: String(NU0_HCL), unit: 'cm-1' }, overtone: { value: String(OVERTONE_HCL), unit: 'cm-1' } };
    const kFromOmega = forceConstantFromBand(omegaE * 100, HCl.reducedMassKg);
    expect(
      codesFor(
        { species: 'H35Cl', measured, reported: { forceConstant: { value: typed(kFromOmega), unit: 'N/m' } }, tolerances: {} },
        'forceConstant',
      ),
    ).toEqual(['omega-e-instead-of-band-centre']);
    expect(
      codesFor(
        { species: 'H35Cl', measured, reported: { forceConstantE: { value: typed(kRight), unit: 'N/m' } }, tolerances: {} },
        'forceConstantE',
      ),
    ).toEqual(['band-centre-instead-of-omega-e']);
  });

  it('wrong-isotopologue (masses of D³⁵Cl for H³⁵Cl)', () => {
    const k = forceConstantFromBand(NU0_HCL * 100, mu('D35Cl').reducedMassKg);
    expect(codesFor(kSubmission('H35Cl', k), 'forceConstant')).toEqual(['wrong-isotopologue']);
  });

  it('r-branch-numbered-from-j (the student fitted R(J) at m = J)', () => {
    const lines = simulateLineList('H35Cl', { jMax: 9, withCentrifugal: false });
    const slipped = fitBand(lines, { rBranchIndex: 'J' });
    if (!slipped.ok) throw new Error('fit failed');
    const input: SubmissionInput = {
      species: 'H35Cl',
      measured: { lines },
      reported: { B0: { value: typed(slipped.B0.value), unit: 'cm-1' } },
      tolerances: {},
    };
    expect(codesFor(input, 'B0')).toEqual(['r-branch-numbered-from-j']);
    const input2: SubmissionInput = {
      species: 'H35Cl',
      measured: { lines },
      reported: { bandCentre: { value: typed(slipped.nu0.value, 6), unit: 'cm-1' } },
      tolerances: {},
    };
    expect(codesFor(input2, 'bandCentre')).toEqual(['r-branch-numbered-from-j']);
  });

  it('b0-b1-swapped', () => {
    const lines = simulateLineList('H35Cl', { jMax: 9, withCentrifugal: false });
    const f = fitBand(lines);
    if (!f.ok) throw new Error('fit failed');
    const input: SubmissionInput = {
      species: 'H35Cl',
      measured: { lines },
      reported: { B0: { value: typed(f.B1.value), unit: 'cm-1' }, alphaE: { value: typed(-f.alphaE.value, 4), unit: 'cm-1' } },
      tolerances: {},
    };
    expect(codesFor(input, 'B0')).toEqual(['b0-b1-swapped']);
    expect(codesFor(input, 'alphaE')).toEqual(['b0-b1-swapped']);
  });

  it('r0-reported-as-re', () => {
    const lines = simulateLineList('H35Cl', { jMax: 9, withCentrifugal: false });
    const f = fitBand(lines, { species: 'H35Cl' });
    if (!f.ok) throw new Error('fit failed');
    const r0 = bondLengthFromB(f.B0.value * 100, HCl.reducedMassKg) * 1e10;
    const input: SubmissionInput = {
      species: 'H35Cl',
      measured: { lines },
      reported: { re: { value: typed(r0, 5), unit: 'Å' } },
      tolerances: {},
    };
    expect(codesFor(input, 're')).toEqual(['r0-reported-as-re']);
  });

  it('power-of-ten only when nothing more specific fits (k × 100)', () => {
    expect(codesFor(kSubmission('H35Cl', kRight * 100), 'forceConstant')).toEqual(['power-of-ten']);
  });

  it('unit-mismatch: right number, wrong unit or no unit', () => {
    expect(codesFor(kSubmission('H35Cl', kRight, 'mdyn/Å'), 'forceConstant')).toEqual(['unit-mismatch']);
    expect(codesFor(kSubmission('H35Cl', kRight, ''), 'forceConstant')).toEqual(['unit-mismatch']);
    const r = checkSubmission({
      species: 'H35Cl',
      reported: { reducedMass: { value: typed(HCl.reducedMassU), unit: 'kg' } },
      tolerances: {},
    });
    expect(r.quantities[0].diagnoses.map((d) => d.code)).toEqual(['unit-mismatch']);
  });

  it('never names a slip for a number no model reproduces (k 7 % high)', () => {
    expect(codesFor(kSubmission('H35Cl', kRight * 1.07), 'forceConstant')).toEqual([]);
  });

  it('a correct full submission gets no diagnoses at all', () => {
    const lines = simulateLineList('H35Cl', { jMax: 10, withCentrifugal: true });
    const f = fitBand(lines, { centrifugal: true, species: 'H35Cl' });
    if (!f.ok) throw new Error('fit failed');
    const omegaE = 3 * NU0_HCL - OVERTONE_HCL;
    const omegaExe = (2 * NU0_HCL - OVERTONE_HCL) / 2;
    const rep = (x: number, unit: string, n = 5) => ({ value: typed(x, n), unit });
    const r = checkSubmission({
      species: 'H35Cl',
      measured: { bandCentre: { value: '2885.98', unit: 'cm-1' }, overtone: { value: '5667.98', unit: 'cm-1' }, lines },
      reported: {
        bandCentre: rep(f.nu0.value, 'cm-1', 6),
        reducedMass: rep(HCl.reducedMassU, 'u', 6),
        forceConstant: rep(kRight, 'N m-1', 4),
        forceConstantE: rep(forceConstantFromBand(omegaE * 100, HCl.reducedMassKg), 'N/m', 4),
        B0: rep(f.B0.value, 'cm-1'),
        B1: rep(f.B1.value, 'cm-1'),
        Be: rep(f.Be.value, 'cm-1'),
        alphaE: rep(f.alphaE.value, 'cm-1', 4),
        D: rep(f.D!.value, 'cm-1', 4),
        re: rep(f.re!.value, 'Å'),
        r0: rep(f.r0!.value, 'Å'),
        omegaE: rep(omegaE, 'cm-1', 6),
        omegaExe: rep(omegaExe, 'cm-1', 4),
        zeroPointEnergy: rep(omegaE / 2 - omegaExe / 4, 'cm-1'),
        dissociationEnergy: rep((omegaE * omegaE) / (4 * omegaExe), 'cm-1'),
        dissociationEnergy0: rep((omegaE * omegaE) / (4 * omegaExe) - (omegaE / 2 - omegaExe / 4), 'cm-1'),
      },
      tolerances: {},
    });
    expect(r.problems).toEqual([]);
    const cons = r.quantities.filter((q) => q.basis === 'consistency');
    expect(cons.length).toBe(16);
    for (const q of cons) {
      expect(q.verdict, q.key).toBe('within');
      expect(q.diagnoses, q.key).toEqual([]);
    }
    expect(r.quantities.every((q) => q.diagnoses.length === 0)).toBe(true);
  });
});
