/**
 * The band-fit door of the spectrum analysis: the weighted fit against the textbook normal
 * equations computed independently with mathjs, the model choice by the t-value of D, and the
 * unweighted path, which must be lib/grading's own fitBand.
 */
import { describe, expect, it } from 'vitest';
import { inv, multiply, transpose } from 'mathjs';
import { fitBand } from '@/lib/grading';
import { fitAssignedLines, type FitLine } from '@/lib/spectrum/band-fit';
import { isotopologuesOf, predictBand } from '@/lib/spectrum/bands';
import { bandLines, expectedBand } from '../../helpers/diatomic-lines';

const m = (l: FitLine) => (l.branch === 'R' ? l.J + 1 : -l.J);

/** H³⁵Cl 1←0 positions from Huber & Herzberg constants (test helper formulas), J ≤ 11, with seeded scatter. */
function noisyLines(sigmaOf: (l: FitLine) => number, seed = 3): FitLine[] {
  let s = seed;
  const gauss = () => {
    s = (s * 16807) % 2147483647;
    const u = s / 2147483647;
    s = (s * 16807) % 2147483647;
    const v = s / 2147483647;
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
  };
  return bandLines('H35Cl', 1, { jMax: 11 }).map((l) => {
    const line: FitLine = { branch: l.branch, J: l.J, wavenumber: l.wavenumber };
    const sigma = sigmaOf(line);
    return { ...line, wavenumber: l.wavenumber + sigma * gauss(), stdError: sigma };
  });
}

describe('fitAssignedLines', () => {
  it('weighted by 1/σ²: the same constants and covariance as (XᵀWX)⁻¹XᵀWy computed with mathjs', () => {
    // Edge lines ten times less precise than central ones, as on a real spectrum.
    const lines = noisyLines((l) => 2e-4 * (1 + Math.abs(m(l)) ** 2 / 12));
    const r = fitAssignedLines(lines, 'H35Cl');
    if (!('model' in r)) throw new Error(r.message);
    expect(r.weighted).toBe(true);
    expect(r.model).toBe('cubic');
    const X = lines.map((l) => [1, m(l), m(l) ** 2, m(l) ** 3]);
    const W = lines.map((l, i) => lines.map((_, k) => (i === k ? 1 / l.stdError! ** 2 : 0)));
    const y = lines.map((l) => [l.wavenumber]);
    const XtW = multiply(transpose(X), W) as number[][];
    const unscaled = inv(multiply(XtW, X) as number[][]) as number[][];
    const beta = (multiply(unscaled, multiply(XtW, y)) as number[][]).map((row) => row[0]);
    beta.forEach((b, k) => expect(r.coefficients[k]).toBeCloseTo(b, 8));
    const res = lines.map((l, i) => l.wavenumber - X[i].reduce((acc, x, k) => acc + x * beta[k], 0));
    const chi2 = res.reduce((acc, v, i) => acc + (v / lines[i].stdError!) ** 2, 0) / (lines.length - 4);
    const scale = Math.max(1, chi2);
    for (let i = 0; i < 4; i++) expect(r.covariance[i][i] / (unscaled[i][i] * scale)).toBeCloseTo(1, 6);
    expect(r.reducedChiSquare).toBeCloseTo(chi2, 8);
    // And the constants follow: B₀ = (b − c)/2, B₁ = (b + c)/2, D = −d/4 (the textbook relations).
    expect(r.B0.value).toBeCloseTo((beta[1] - beta[2]) / 2, 10);
    expect(r.Bupper.value).toBeCloseTo((beta[1] + beta[2]) / 2, 10);
    expect(r.D!.value).toBeCloseTo(-beta[3] / 4, 12);
  });

  it('standard errors that describe the scatter: about 95 % of repeated weighted fits of D within 2σ of the published value', () => {
    // Huber & Herzberg via NIST WebBook (test helper), heteroscedastic positions.
    const D = expectedBand('H35Cl', 1).D;
    let inside = 0;
    const runs = 200;
    for (let seed = 1; seed <= runs; seed++) {
      const r = fitAssignedLines(
        noisyLines((l) => 1e-3 * (1 + Math.abs(m(l)) ** 2 / 10), seed * 7919),
        'H35Cl',
      );
      if (!('model' in r) || !r.D) continue;
      if (Math.abs(r.D.value - D) <= 2 * r.D.stdError) inside++;
    }
    expect(inside / runs).toBeGreaterThan(0.9);
  });

  it('keeps the −4Dm³ term when D is clearly determined, and leaves it out (saying why) when it is not', () => {
    const precise = fitAssignedLines(
      noisyLines(() => 1e-4),
      'H35Cl',
    );
    const rough = fitAssignedLines(
      noisyLines(() => 0.5).filter((l) => l.J <= 7),
      'H35Cl',
    );
    // Four lines leave no degree of freedom to test a fourth parameter (as in the grading engine).
    const few = fitAssignedLines(
      noisyLines(() => 1e-4).filter((l) => l.J <= 2 && l.J >= 1),
      'H35Cl',
    );
    if (!('model' in precise) || !('model' in rough) || !('model' in few)) throw new Error('fit failed');
    expect(precise.model).toBe('cubic');
    expect(precise.modelNote).toMatch(/the lines need it \(F-test p/);
    expect(rough.model).toBe('quadratic');
    expect(rough.modelNote).toMatch(/the lines do not need it \(F-test p/);
    expect(few.model).toBe('quadratic');
    expect(few.modelNote).toMatch(/too few to test it/);
  });

  it('without standard errors it is lib/grading’s fitBand, unweighted', () => {
    const lines = noisyLines(() => 1e-3).map(({ stdError: _s, ...l }) => l);
    const r = fitAssignedLines(lines, 'H35Cl');
    const g = fitBand(lines, { centrifugal: true, species: 'H35Cl' });
    if (!('model' in r) || !g.ok) throw new Error('fit failed');
    expect(r.weighted).toBe(false);
    expect(r.coefficients).toEqual(g.coefficients);
    expect(r.rms).toBe(g.rms);
  });

  it('refuses too few lines in words', () => {
    const r = fitAssignedLines(noisyLines(() => 1e-3).slice(0, 2), 'H35Cl');
    expect('model' in r).toBe(false);
    if (!('model' in r)) expect(r.message).toMatch(/at least 3/);
  });
});

describe('isotopologues in natural abundance and their predicted bands', () => {
  // IUPAC representative isotopic compositions (NIST Atomic Weights and Isotopic Compositions), via chemical-elements.
  it('HCl stands for H³⁵Cl and H³⁷Cl at 75.76 : 24.24; DCl for D³⁵Cl and D³⁷Cl; H³⁵Cl for itself', () => {
    const hcl = isotopologuesOf('HCl');
    if (!hcl.ok) throw new Error(hcl.message);
    expect(hcl.isotopologues.map((i) => [i.formula, i.abundance])).toEqual([
      ['H35Cl', 0.7576 * 0.999885],
      ['H37Cl', 0.2424 * 0.999885],
    ]);
    const dcl = isotopologuesOf('DCl');
    if (!dcl.ok) throw new Error(dcl.message);
    expect(dcl.isotopologues.map((i) => [i.formula, i.abundance])).toEqual([
      ['D35Cl', 0.7576],
      ['D37Cl', 0.2424],
    ]);
    const one = isotopologuesOf('H35Cl');
    if (!one.ok) throw new Error(one.message);
    expect(one.isotopologues.map((i) => i.formula)).toEqual(['H35Cl']);
  });

  it('HBr gives ⁷⁹Br and ⁸¹Br (50.69 : 49.31), CO gives ¹²C¹⁶O and ¹³C¹⁶O (¹⁷O, ¹⁸O under 0.5 % are not looked for)', () => {
    const hbr = isotopologuesOf('HBr');
    const co = isotopologuesOf('CO');
    if (!hbr.ok || !co.ok) throw new Error('refused');
    expect(hbr.isotopologues.map((i) => i.formula)).toEqual(['H79Br', 'H81Br']);
    expect(co.isotopologues.map((i) => i.formula)).toEqual(['12C16O', '13C16O']);
    expect(co.isotopologues[1].abundance).toBeCloseTo(0.0107 * 0.99757, 8);
  });

  it('refuses a homonuclear molecule and an unknown one in words', () => {
    const n2 = isotopologuesOf('N2');
    expect(n2.ok).toBe(false);
    if (!n2.ok) expect(n2.message).toMatch(/no dipole moment/);
    expect(isotopologuesOf('XyZ').ok).toBe(false);
  });

  it('predicted fundamental and overtone lines follow the published term formulas (spacing from the origin)', () => {
    const hcl = isotopologuesOf('HCl');
    if (!hcl.ok) throw new Error(hcl.message);
    for (const [band, v] of [
      ['fundamental', 1],
      ['overtone', 2],
    ] as const) {
      const p = predictBand(hcl.isotopologues[0], band)!;
      const truth = bandLines('H35Cl', v, { jMax: 12 }); // Huber & Herzberg via NIST WebBook, test helper formulas
      const e = expectedBand('H35Cl', v);
      for (const t of truth) {
        const q = p.lines.find((l) => l.branch === t.branch && l.J === t.J);
        if (!q) continue;
        // The origin may be the measured one; the rotational structure must be the formula's.
        expect(q.wavenumber - p.constants.origin).toBeCloseTo(t.wavenumber - e.origin, 6);
      }
      // The strongest line is near J = 3 at 298 K (Boltzmann times Hönl–London), and weak lines are left out.
      const strongest = p.lines.reduce((a, b) => (b.intensity > a.intensity ? b : a));
      expect(strongest.J).toBeGreaterThanOrEqual(2);
      expect(strongest.J).toBeLessThanOrEqual(4);
    }
  });
});
