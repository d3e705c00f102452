import { describe, expect, it } from 'vitest';
import {
  forceConstantFromBand,
  bandCentreFromForceConstant,
  predictIsotopologueBand,
  referenceValues,
  referenceEntry,
  listKnownSpecies,
  parseSpecies,
  REFERENCE_TABLE,
  anharmonicFromOvertone,
} from '@/lib/grading';

const sp = (f: string) => {
  const p = parseSpecies(f);
  if (!p.ok) throw new Error(p.message);
  return p.species;
};

describe('harmonic analysis against published constants', () => {
  it('worked check (domain.md): H³⁵Cl kₑ ≈ 516.3 N m⁻¹ from ωₑ = 2990.946 cm⁻¹, k ≈ 481 N m⁻¹ from ν̃₀ ≈ 2886 cm⁻¹', () => {
    const mu = sp('H35Cl').reducedMassKg;
    expect(forceConstantFromBand(2990.946 * 100, mu)).toBeCloseTo(516.3, 1);
    expect(forceConstantFromBand(2886 * 100, mu)).toBeCloseTo(481, 0);
  });

  // ωₑ: Huber & Herzberg (1979) via NIST WebBook (reference-diatomics.md, mostly from memory);
  // textbook kₑ: a standard physical chemistry textbook table, from memory. Expect ≤ 1.5 %.
  it.each([
    ['H2', 575],
    ['H19F', 966],
    ['H35Cl', 516],
    ['H79Br', 412],
    ['H127I', 314],
    ['12C16O', 1902],
    ['14N2', 2294],
    ['16O2', 1177],
    ['35Cl2', 323],
  ])('kₑ of %s from ωₑ agrees with the textbook %i N m⁻¹ (from memory)', (formula, kTextbook) => {
    const entry = referenceEntry(formula)!;
    const kE = forceConstantFromBand(entry.constants.omegaE * 100, sp(formula).reducedMassKg);
    expect(Math.abs(kE / kTextbook - 1)).toBeLessThan(0.015);
  });

  it('band centre from k inverts k from the band centre', () => {
    const mu = sp('12C16O').reducedMassKg;
    expect(bandCentreFromForceConstant(forceConstantFromBand(214327, mu), mu)).toBeCloseTo(214327, 6);
  });

  it('isotopologue prediction: H³⁷Cl from H³⁵Cl by √(μ ratio) lands within 0.3 cm⁻¹ of the measured 2883.88 cm⁻¹ (band origins from memory)', () => {
    const pred = predictIsotopologueBand(2885.98, sp('H35Cl').reducedMassU, sp('H37Cl').reducedMassU);
    expect(Math.abs(pred - 2883.88)).toBeLessThan(0.3);
  });

  it('G(1) − G(0) from the table rows is within 0.2 cm⁻¹ of the measured band origins (reference-diatomics.md)', () => {
    for (const row of REFERENCE_TABLE.filter((r) => r.bandOrigin)) {
      const k = row.constants;
      const g = (v: number) => k.omegaE * (v + 0.5) - k.omegaExe * (v + 0.5) ** 2 + (k.omegaEye ?? 0) * (v + 0.5) ** 3;
      expect(Math.abs(g(1) - g(0) - row.bandOrigin!.value), row.formula).toBeLessThan(0.2);
    }
  });

  it('anharmonic analysis of H³⁵Cl fundamental 2885.98 and overtone 5667.98 cm⁻¹ (band origins from memory) is near the table ωₑ, ωₑxₑ', () => {
    const a = anharmonicFromOvertone(2885.98, 5667.98, { reducedMassKg: sp('H35Cl').reducedMassKg });
    if (!a.ok) throw new Error(a.message);
    // Huber & Herzberg: ωₑ 2990.946, ωₑxₑ 52.8186 (the three-term fit includes ωₑyₑ, so ~1 cm⁻¹ apart)
    expect(Math.abs(a.omegaE - 2990.946)).toBeLessThan(2);
    expect(Math.abs(a.omegaExe - 52.8186)).toBeLessThan(1.5);
    expect(a.dissociationEnergy0).toBeCloseTo(a.dissociationEnergyE - a.zeroPointEnergy, 9);
    expect(anharmonicFromOvertone(2885.98, 6000).ok).toBe(false);
  });
});

describe('reference values', () => {
  it('H³⁵Cl literature values carry provenance and the documented choices', () => {
    const r = referenceValues('H35Cl');
    expect(r.bandCentre!.valueSI).toBeCloseTo(288598, 6);
    expect(r.bandCentre!.display).toBe('2885.98 cm⁻¹');
    expect(r.forceConstant!.source).toMatch(/band centre/);
    expect(r.B0!.valueSI / 100).toBeCloseTo(10.59341 - 0.30718 / 2, 9);
    expect(r.B1!.valueSI / 100).toBeCloseTo(10.59341 - (3 * 0.30718) / 2, 9);
    expect(r.re!.valueSI).toBeCloseTo(1.27455e-10, 15);
    expect(r.r0!.valueSI).toBeGreaterThan(r.re!.valueSI);
    expect(r.Be!.source).toMatch(/Huber & Herzberg \(1979\) via NIST Chemistry WebBook, from memory/);
    expect(r.isotopeShift!.valueSI / 100).toBeCloseTo(2883.88 - 2885.98, 6);
  });

  it('isotopologues outside the table are computed and say so', () => {
    const e = referenceEntry('D37Cl')!;
    expect(e.provenance).toMatch(/computed from D35Cl by isotope relations/);
    const r = referenceValues('13C16O');
    expect(r.omegaE!.source).toMatch(/computed from 12C16O by isotope relations/);
    // ωₑ scales as μ^−½
    const ratio = Math.sqrt(sp('12C16O').reducedMassU / sp('13C16O').reducedMassU);
    expect(r.omegaE!.valueSI / 100 / 2169.81358).toBeCloseTo(ratio, 12);
    const derived = listKnownSpecies()
      .filter((s) => s.derived)
      .map((s) => s.formula);
    expect(derived).toEqual(expect.arrayContaining(['H37Cl', 'D37Cl', 'H81Br', '13C16O']));
  });

  it('unknown species give no values', () => {
    expect(referenceValues('Xx')).toEqual({});
    expect(Object.keys(referenceValues('23Na35Cl'))).toEqual(['reducedMass']);
  });
});
