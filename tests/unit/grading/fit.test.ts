import { describe, expect, it } from 'vitest';
import { PolynomialRegression } from 'ml-regression-polynomial';
import {
  bondLengthFromB,
  parseSpecies,
  REFERENCE_TABLE,
  fitBand,
  simulateLineList,
  linesFromConstants,
  referenceEntry,
  combinationDifferences,
  type Line,
} from '@/lib/grading';

const sp = (f: string) => {
  const p = parseSpecies(f);
  if (!p.ok) throw new Error(p.message);
  return p.species;
};

describe('reference table self-consistency (Huber & Herzberg via NIST WebBook, from memory)', () => {
  it('table rₑ agrees with √(h/(8π²cμBₑ)) within 0.05 % for every row', () => {
    for (const row of REFERENCE_TABLE) {
      const r = bondLengthFromB(row.constants.Be * 100, sp(row.formula).reducedMassKg) * 1e10;
      expect(Math.abs(r / row.constants.reAngstrom - 1), row.formula).toBeLessThan(5e-4);
    }
  });

  it('H¹²⁷I: Bₑ computed from rₑ = 1.60916 Å gives B₀ = Bₑ − αₑ/2 = 6.426365 cm⁻¹, the number the stored NIST page lists (shared reference table note)', () => {
    const row = REFERENCE_TABLE.find((r) => r.formula === 'H127I')!;
    // Bₑ here was computed from rₑ (so the check above is not independent for this row); B₀ is.
    expect(row.constants.Be - row.constants.alphaE / 2).toBeCloseTo(6.426365, 3);
  });
});

describe('band fit recovers constants from generated line lists (Huber & Herzberg via NIST WebBook, from memory)', () => {
  it.each(['H35Cl', 'D35Cl', 'H79Br', 'H19F', '12C16O', 'H127I', 'H37Cl'])(
    '%s: ν̃₀, B₀, B₁, αₑ, Bₑ, D to better than 1e-4 cm⁻¹',
    (formula) => {
      const e = referenceEntry(formula)!;
      const k = e.constants;
      const jMax = formula === '12C16O' ? 30 : 12;
      const lines = simulateLineList(formula, { jMax, withCentrifugal: true });
      const f = fitBand(lines, { centrifugal: true, species: formula });
      if (!f.ok) throw new Error(JSON.stringify(f.problems));
      const B0 = k.Be - k.alphaE / 2;
      const B1 = k.Be - (3 * k.alphaE) / 2;
      const nu0 = e.bandOrigin?.value ?? k.omegaE - 2 * k.omegaExe + 3.25 * (k.omegaEye ?? 0);
      expect(Math.abs(f.nu0.value - nu0)).toBeLessThan(1e-4);
      expect(Math.abs(f.B0.value - B0)).toBeLessThan(1e-4);
      expect(Math.abs(f.B1.value - B1)).toBeLessThan(1e-4);
      expect(Math.abs(f.alphaE.value - k.alphaE)).toBeLessThan(1e-4);
      expect(Math.abs(f.Be.value - k.Be)).toBeLessThan(1e-4);
      expect(Math.abs(f.D!.value - k.De!)).toBeLessThan(1e-8);
      // rₑ follows from the fitted Bₑ exactly (the table's own rₑ is checked separately below)
      expect(Math.abs(f.re!.value - bondLengthFromB(k.Be * 100, sp(formula).reducedMassKg) * 1e10)).toBeLessThan(1e-5);
      expect(f.rms).toBeLessThan(1e-6);
      expect(Math.abs(f.combinationDifferences.B0!.value - B0)).toBeLessThan(1e-4);
      expect(Math.abs(f.combinationDifferences.B1!.value - B1)).toBeLessThan(1e-4);
    },
  );

  it('agrees with ml-regression-polynomial on a noisy list', () => {
    let seed = 7;
    const rand = () => ((seed = (seed * 16807) % 2147483647) / 2147483647 - 0.5) * 0.1;
    const lines = simulateLineList('H35Cl', { jMax: 12 }).map((l) => ({ ...l, wavenumber: l.wavenumber + rand() }));
    const ours = fitBand(lines, { centrifugal: true });
    if (!ours.ok) throw new Error('fit failed');
    const m = lines.map((l) => (l.branch === 'R' ? l.J + 1 : -l.J));
    const theirs = new PolynomialRegression(
      m,
      lines.map((l) => l.wavenumber),
      3,
    );
    ours.coefficients.forEach((cf, i) => expect(cf).toBeCloseTo(theirs.coefficients[i], 6));
  });

  it('standard errors describe the scatter: about 68 % of repeated noisy fits fall within ±1σ of the truth', () => {
    let seed = 11;
    const gauss = () => {
      const u1 = (seed = (seed * 16807) % 2147483647) / 2147483647;
      const u2 = (seed = (seed * 16807) % 2147483647) / 2147483647;
      return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
    };
    const base = simulateLineList('H35Cl', { jMax: 10, withCentrifugal: false });
    let inside = 0;
    const trials = 400;
    for (let t = 0; t < trials; t++) {
      const f = fitBand(base.map((l) => ({ ...l, wavenumber: l.wavenumber + 0.05 * gauss() })));
      if (!f.ok) throw new Error('fit failed');
      if (Math.abs(f.B0.value - (10.59341 - 0.30718 / 2)) < f.B0.stdError) inside++;
    }
    expect(inside / trials).toBeGreaterThan(0.6);
    expect(inside / trials).toBeLessThan(0.76);
  });

  it('uses m = J + 1 for R(J) and m = −J for P(J): residuals are tagged', () => {
    const f = fitBand(simulateLineList('H35Cl', { jMax: 3, withCentrifugal: false }));
    if (!f.ok) throw new Error('fit failed');
    const r0 = f.residuals.find((r) => r.branch === 'R' && r.J === 0)!;
    const p1 = f.residuals.find((r) => r.branch === 'P' && r.J === 1)!;
    expect(r0.m).toBe(1);
    expect(p1.m).toBe(-1);
  });

  it.each([
    [
      'too few lines',
      [
        { branch: 'R', J: 0, wavenumber: 2906 },
        { branch: 'P', J: 1, wavenumber: 2865 },
      ],
      /only 2 lines/,
    ],
    [
      'duplicate',
      [
        { branch: 'R', J: 0, wavenumber: 2906 },
        { branch: 'R', J: 0, wavenumber: 2907 },
        { branch: 'P', J: 1, wavenumber: 2865 },
      ],
      /Line 2 \(R\(0\)\) repeats/,
    ],
    [
      'negative J',
      [
        { branch: 'R', J: -1, wavenumber: 2906 },
        { branch: 'R', J: 1, wavenumber: 2925 },
        { branch: 'P', J: 1, wavenumber: 2865 },
      ],
      /Line 1 \(R\(-1\)\): J cannot be negative/,
    ],
    [
      'P(0)',
      [
        { branch: 'P', J: 0, wavenumber: 2886 },
        { branch: 'R', J: 1, wavenumber: 2925 },
        { branch: 'P', J: 1, wavenumber: 2865 },
      ],
      /Line 1: P\(0\) does not exist/,
    ],
    ['bad branch', [{ branch: 'Q', J: 1, wavenumber: 2886 }], /branch must be P or R/],
    ['NaN wavenumber', [{ branch: 'R', J: 1, wavenumber: Number.NaN }], /positive number/],
  ])('rejects a list with %s, naming the line', (_n, lines, msg) => {
    const f = fitBand(lines);
    expect(f.ok).toBe(false);
    if (!f.ok) expect(f.problems.map((p) => p.message).join(' ')).toMatch(msg);
  });

  it('combination differences without D from lines without D are exact', () => {
    const k = { nu0: 2000, B0: 2, B1: 1.9, D: 0 };
    const lines: Line[] = linesFromConstants(k, { jMax: 8 });
    const cd = combinationDifferences(lines);
    expect(cd.B0!.value).toBeCloseTo(2, 10);
    expect(cd.B1!.value).toBeCloseTo(1.9, 10);
  });
});
