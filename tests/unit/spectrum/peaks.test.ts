import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { simulateLineList } from '@/lib/grading';
import { parseSpectrumFile } from '@/lib/spectrum/parse';
import { compareLinesToPeaks, noiseSigma, pickPeaks, toAbsorbance } from '@/lib/spectrum/peaks';
import { synthesizeSpectrum } from '@/lib/spectrum/synthesize';
import type { Spectrum } from '@/lib/spectrum/types';

const FIXTURES = path.resolve(__dirname, '../../fixtures/spectra');

function fixture(name: string): Spectrum {
  const r = parseSpectrumFile(readFileSync(path.join(FIXTURES, name), 'utf8'), 'jcamp');
  if (!r.ok) throw new Error(r.message);
  return r.spectrum;
}

// Source of the expected positions: lib/grading simulateLineList, i.e. the textbook line
// formulas with constants from Huber & Herzberg via the NIST WebBook (from memory, as
// recorded in lib/grading/reference.ts); H³⁷Cl by isotope relations.
const HCL_MIX = simulateLineList('H35Cl', { jMax: 12, isotopeChlorine: true });

describe('toAbsorbance', () => {
  it('takes A = −log₁₀ T, reading values above 1.5 as percent', () => {
    const frac: Spectrum = { x: [1, 2, 3], y: [1, 0.1, 0.01], yKind: 'transmittance', title: '' };
    expect(toAbsorbance(frac).map((v) => Number(v.toFixed(12)))).toEqual([0, 1, 2]);
    const pct: Spectrum = { ...frac, y: [100, 10, 1] };
    expect(toAbsorbance(pct).map((v) => Number(v.toFixed(12)))).toEqual([0, 1, 2]);
    const a: Spectrum = { ...frac, yKind: 'absorbance', y: [0.1, 0.2, 0.3] };
    expect(toAbsorbance(a)).toEqual([0.1, 0.2, 0.3]);
  });
});

describe('pickPeaks', () => {
  it('interpolates maxima off the grid and measures prominence above the saddle', () => {
    // Big line at 1000.13, small line 3 cm⁻¹ away on its wing.
    const s = synthesizeSpectrum({
      lines: [
        { wavenumber: 1000.13, intensity: 1 },
        { wavenumber: 1003.07, intensity: 0.2 },
      ],
      from: 990,
      to: 1010,
      step: 0.25,
      fwhm: 1,
      peakAbsorbance: 1,
    });
    const peaks = pickPeaks(s);
    expect(peaks).toHaveLength(2);
    expect(Math.abs(peaks[0].wavenumber - 1000.13)).toBeLessThan(0.02);
    expect(Math.abs(peaks[1].wavenumber - 1003.07)).toBeLessThan(0.05);
    expect(Math.abs(peaks[0].height - 1)).toBeLessThan(0.03); // parabola on a Lorentzian top, plus the wing of the other
    // The small line sits on the big one's wing: its prominence is less than its height.
    expect(peaks[1].prominence).toBeLessThan(peaks[1].height - 0.02);
    expect(peaks[0].prominence).toBeGreaterThan(peaks[1].prominence);
    expect(peaks[0].spacing).toBeCloseTo(0.25, 12);
  });

  it('finds transmittance dips as absorbance peaks', () => {
    const s = synthesizeSpectrum({
      lines: [{ wavenumber: 2000.4, intensity: 1 }],
      from: 1990,
      to: 2010,
      step: 0.2,
      fwhm: 0.8,
      yKind: 'transmittance',
    });
    const [p] = pickPeaks(s);
    expect(Math.abs(p.wavenumber - 2000.4)).toBeLessThan(0.02);
    expect(p.height).toBeCloseTo(0.8, 2);
  });

  it('estimates white noise σ from point-to-point differences', () => {
    const s = synthesizeSpectrum({ lines: [], from: 0, to: 2000, step: 0.1, noise: 0.01, seed: 5 });
    expect(noiseSigma(s.y)).toBeGreaterThan(0.009);
    expect(noiseSigma(s.y)).toBeLessThan(0.011);
  });

  it('keeps only the most prominent when maxPeaks is set', () => {
    const s = synthesizeSpectrum({ lines: HCL_MIX, from: 2550, to: 3150, step: 0.25, fwhm: 0.8 });
    const top = pickPeaks(s, { maxPeaks: 5 });
    expect(top).toHaveLength(5);
    const all = pickPeaks(s);
    const fifth = all.map((p) => p.prominence).sort((a, b) => b - a)[4];
    expect(top.every((p) => p.prominence >= fifth)).toBe(true);
    expect(top.map((p) => p.wavenumber)).toEqual([...top.map((p) => p.wavenumber)].sort((a, b) => a - b));
  });

  it('recovers HCl line positions (simulateLineList, published constants) within 0.05 cm⁻¹ at 0.25 cm⁻¹ spacing', () => {
    const s = synthesizeSpectrum({ lines: HCL_MIX, from: 2550, to: 3150, step: 0.25, fwhm: 0.8 });
    const visible = HCL_MIX.filter((l) => l.intensity >= 0.05);
    expect(visible.length).toBeGreaterThan(25);
    const cmp = compareLinesToPeaks(visible, pickPeaks(s));
    for (const c of cmp.lines) expect(Math.abs(c.distance!), `${c.line.species} ${c.line.branch}(${c.line.J})`).toBeLessThan(0.05);
  });

  it('recovers them within 0.05 cm⁻¹ from the noisy fixture hcl-298k.jdx', () => {
    const strong = HCL_MIX.filter((l) => l.intensity >= 0.1);
    expect(strong.some((l) => l.species === 'H37Cl')).toBe(true);
    const cmp = compareLinesToPeaks(strong, pickPeaks(fixture('hcl-298k.jdx')));
    for (const c of cmp.lines) expect(Math.abs(c.distance!), `${c.line.species} ${c.line.branch}(${c.line.J})`).toBeLessThan(0.05);
  });

  it('recovers the CO lines within 0.05 cm⁻¹ from co-298k.jdx', () => {
    const co = simulateLineList('12C16O', { jMax: 32 }).filter((l) => l.intensity >= 0.1);
    const cmp = compareLinesToPeaks(co, pickPeaks(fixture('co-298k.jdx')));
    expect(cmp.lines.length).toBeGreaterThan(35);
    for (const c of cmp.lines) expect(Math.abs(c.distance!)).toBeLessThan(0.05);
  });
});

describe('compareLinesToPeaks', () => {
  const spectrum = fixture('hcl-298k.jdx');
  const peaks = pickPeaks(spectrum);
  // What a careful student reports: every line of both isotopologues that stands out.
  const reported = HCL_MIX.filter((l) => l.intensity >= 0.05).map((l) => ({
    branch: l.branch,
    J: l.J,
    wavenumber: Math.round(l.wavenumber * 100) / 100,
  }));

  it('matches every honestly reported line and misses no strong peak', () => {
    const cmp = compareLinesToPeaks(reported, peaks);
    expect(cmp.summary.unmatched).toBe(0);
    expect(cmp.summary.missing).toBe(0);
    expect(cmp.summary.tolerance).toBe(0.5); // max(0.5, 1.5 × 0.2)
  });

  it('flags a fake line in the band gap and a strong peak left out of the list', () => {
    const r3 = HCL_MIX.find((l) => l.species === 'H35Cl' && l.branch === 'R' && l.J === 3)!;
    const edited = reported.filter((l) => Math.abs(l.wavenumber - r3.wavenumber) > 0.1);
    const fake = { branch: 'R' as const, J: 0, wavenumber: 2886.0 }; // the band centre, where no line is
    const cmp = compareLinesToPeaks([...edited, fake], peaks);
    const fakeCheck = cmp.lines.find((c) => c.line === fake)!;
    expect(fakeCheck.matched).toBe(false);
    expect(Math.abs(fakeCheck.distance!)).toBeGreaterThan(10);
    expect(cmp.summary.unmatched).toBe(1);
    expect(cmp.summary.matched).toBe(edited.length);
    expect(cmp.missing).toHaveLength(1);
    expect(Math.abs(cmp.missing[0].wavenumber - r3.wavenumber)).toBeLessThan(0.05);
    expect(cmp.summary.missing).toBe(1);
  });

  it('does not flag a weak peak left out, and notes two lines claiming one peak', () => {
    const weakest = HCL_MIX.filter((l) => l.intensity >= 0.05).sort((a, b) => a.intensity - b.intensity)[0];
    const withoutWeak = reported.filter((l) => Math.abs(l.wavenumber - weakest.wavenumber) > 0.1);
    expect(compareLinesToPeaks(withoutWeak, peaks).summary.missing).toBe(0);
    const dup = [...reported, { branch: 'R' as const, J: 9, wavenumber: reported[5].wavenumber + 0.1 }];
    const cmp = compareLinesToPeaks(dup, peaks);
    expect(cmp.lines[5].sharesPeakWith).toEqual([dup.length - 1]);
  });

  it('widens the default tolerance to 1.5 × the point spacing on coarse spectra', () => {
    const coarse = synthesizeSpectrum({ lines: HCL_MIX, from: 2550, to: 3150, step: 1, fwhm: 2 });
    expect(compareLinesToPeaks(reported, pickPeaks(coarse)).summary.tolerance).toBe(1.5);
    expect(compareLinesToPeaks(reported, [], {}).lines[0]).toMatchObject({ nearest: null, matched: false });
  });
});
