import { describe, expect, it } from 'vitest';
import * as math from 'mathjs';
import { elementsAndIsotopesObject } from 'chemical-elements';
import {
  PHYSICAL_CONSTANTS,
  SPEED_OF_LIGHT,
  PLANCK_CONSTANT,
  BOLTZMANN_CONSTANT,
  AVOGADRO_CONSTANT,
  ATOMIC_MASS_CONSTANT,
  ELEMENTARY_CHARGE,
  isotope,
  parseSpecies,
  listKnownSpecies,
} from '@/lib/grading';

describe('physical constants (CODATA 2018, cross-checked against mathjs)', () => {
  it.each([
    ['speed of light', SPEED_OF_LIGHT.value, math.speedOfLight.toNumber('m/s')],
    ['Planck constant', PLANCK_CONSTANT.value, math.planckConstant.toNumber('J s')],
    ['Boltzmann constant', BOLTZMANN_CONSTANT.value, math.boltzmann.toNumber('J/K')],
    ['Avogadro constant', AVOGADRO_CONSTANT.value, math.avogadro.toNumber('mol^-1')],
    ['atomic mass constant', ATOMIC_MASS_CONSTANT.value, math.atomicMass.toNumber('kg')],
    ['elementary charge', ELEMENTARY_CHARGE.value, math.elementaryCharge.toNumber('C')],
  ])('%s matches mathjs (CODATA 2018)', (_name, ours, theirs) => {
    expect(ours / theirs - 1).toBeCloseTo(0, 12);
  });

  it('every constant names its source, unit and uncertainty; SI-defining constants are exact', () => {
    for (const k of PHYSICAL_CONSTANTS) {
      expect(k.source).toMatch(/CODATA 2018/);
      expect(k.unit.length).toBeGreaterThan(0);
      expect(k.uncertainty).toBeGreaterThanOrEqual(0);
    }
    expect(SPEED_OF_LIGHT.uncertainty).toBe(0);
    expect(ATOMIC_MASS_CONSTANT.uncertainty).toBeGreaterThan(0);
    // CODATA 2018: m_u = 1.66053906660(50) × 10⁻²⁷ kg (value as quoted in domain.md)
    expect(ATOMIC_MASS_CONSTANT.value).toBe(1.6605390666e-27);
  });
});

describe('isotopic masses (AME2020 / NIST, via chemical-elements)', () => {
  it.each([
    // literal values quoted in domain.md from AME2020 / NIST
    ['H', 1, 1.00782503223],
    ['H', 2, 2.01410177812],
    ['Cl', 35, 34.968852682],
    ['Cl', 37, 36.965902602],
  ])('%s-%i = %f u (domain.md literal, AME2020/NIST)', (sym, a, mass) => {
    expect(isotope(sym as string, a as number)!.massU).toBe(mass);
  });

  it('agree with the chemical-elements table for every isotope used by the reference species', () => {
    for (const s of listKnownSpecies()) {
      const p = parseSpecies(s.formula);
      expect(p.ok).toBe(true);
      if (!p.ok) continue;
      for (const a of p.species.atoms) {
        const raw = elementsAndIsotopesObject[a.symbol]!.isotopes.find((i) => i.nominal === a.massNumber)!;
        expect(a.massU).toBe(raw.mass);
        expect(a.source).toMatch(/AME2020/);
      }
    }
  });
});

describe('species and reduced mass', () => {
  it('worked check from domain.md: H³⁵Cl μ = 0.979593 u = 1.626652 × 10⁻²⁷ kg', () => {
    const p = parseSpecies('H35Cl');
    if (!p.ok) throw new Error(p.message);
    expect(p.species.reducedMassU).toBeCloseTo(0.979593, 6);
    expect(p.species.reducedMassKg / 1.626652e-27).toBeCloseTo(1, 6);
    expect(p.species.display).toBe('H³⁵Cl');
  });

  it.each([
    ['H35Cl', 'H35Cl', 'H³⁵Cl'],
    ['D35Cl', 'D35Cl', 'D³⁵Cl'],
    ['1H79Br', 'H79Br', 'H⁷⁹Br'],
    ['12C16O', '12C16O', '¹²C¹⁶O'],
    ['14N2', '14N2', '¹⁴N₂'],
    ['HF', 'H19F', 'H¹⁹F'],
    ['CO', '12C16O', '¹²C¹⁶O'],
    ['H³⁷Cl', 'H37Cl', 'H³⁷Cl'],
    ['¹⁴N₂', '14N2', '¹⁴N₂'],
    ['1H-35Cl', 'H35Cl', 'H³⁵Cl'],
  ])('%s → %s (%s)', (text, formula, display) => {
    const p = parseSpecies(text);
    expect(p.ok && p.species.formula).toBe(formula);
    expect(p.ok && p.species.display).toBe(display);
  });

  it('accepts two isotope labels and D as ²H', () => {
    const a = parseSpecies(['1H', '35Cl']);
    const b = parseSpecies('H35Cl');
    expect(a.ok && b.ok && a.species.reducedMassU).toBe(b.ok && b.species.reducedMassU);
    const d = parseSpecies('D35Cl');
    expect(d.ok && d.species.atoms[0].massU).toBe(2.01410177812);
  });

  it.each(['', 'H2O', 'Xx', '99Cl', 'HClO', '3', 'h35cl!', 'C'])('rejects %j with a message', (text) => {
    const p = parseSpecies(text);
    expect(p.ok).toBe(false);
    if (!p.ok) expect(p.message.length).toBeGreaterThan(5);
  });

  it('rejects negative or non-finite custom masses', () => {
    for (const massU of [-1, 0, Number.NaN, Number.POSITIVE_INFINITY]) {
      expect(
        parseSpecies({
          atoms: [
            { symbol: 'H', massU },
            { symbol: 'Cl', massNumber: 35 },
          ],
        }).ok,
      ).toBe(false);
    }
  });
});
