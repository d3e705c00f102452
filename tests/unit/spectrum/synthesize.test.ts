import { describe, expect, it } from 'vitest';
import { gaussian, mulberry32 } from '@/lib/spectrum/random';
import { synthesizeSpectrum, wavenumberGrid } from '@/lib/spectrum/synthesize';

describe('mulberry32 and gaussian', () => {
  it('repeats for one seed and differs between seeds', () => {
    const a = mulberry32(123);
    const b = mulberry32(123);
    const c = mulberry32(124);
    const sa = Array.from({ length: 5 }, a);
    expect(Array.from({ length: 5 }, b)).toEqual(sa);
    expect(Array.from({ length: 5 }, c)).not.toEqual(sa);
    expect(sa.every((v) => v >= 0 && v < 1)).toBe(true);
  });

  it('gives standard normal deviates (mean ≈ 0, σ ≈ 1 over 20 000 draws)', () => {
    const g = gaussian(mulberry32(7));
    const v = Array.from({ length: 20_000 }, g);
    const mean = v.reduce((s, x) => s + x, 0) / v.length;
    const sd = Math.sqrt(v.reduce((s, x) => s + (x - mean) ** 2, 0) / v.length);
    expect(Math.abs(mean)).toBeLessThan(0.03);
    expect(Math.abs(sd - 1)).toBeLessThan(0.03);
  });
});

describe('synthesizeSpectrum', () => {
  it('builds an inclusive, evenly spaced grid without floating-point dust', () => {
    const x = wavenumberGrid(2550, 2551, 0.2);
    expect(x).toEqual([2550, 2550.2, 2550.4, 2550.6, 2550.8, 2551]);
  });

  it('puts a Lorentzian of the given FWHM at each line, the strongest at peakAbsorbance', () => {
    const s = synthesizeSpectrum({
      lines: [
        { wavenumber: 1000, intensity: 4 },
        { wavenumber: 1100, intensity: 1 },
      ],
      from: 990,
      to: 1110,
      step: 0.1,
      fwhm: 1,
      peakAbsorbance: 0.8,
    });
    const at = (w: number) => s.y[Math.round((w - 990) / 0.1)];
    expect(at(1000)).toBeCloseTo(0.8, 3);
    expect(at(1000.5) / at(1000)).toBeCloseTo(0.5, 2); // half maximum at FWHM/2
    expect(at(1100)).toBeCloseTo(0.2, 3);
    expect(s.yKind).toBe('absorbance');
  });

  it('pseudo-Voigt keeps the FWHM and narrows the wings', () => {
    const common = { lines: [{ wavenumber: 1000, intensity: 1 }], from: 990, to: 1010, step: 0.1, fwhm: 1 };
    const l = synthesizeSpectrum(common);
    const v = synthesizeSpectrum({ ...common, shape: 'pseudo-voigt', gaussianShare: 0.5 });
    const i = (w: number) => Math.round((w - 990) / 0.1);
    expect(v.y[i(1000.5)] / v.y[i(1000)]).toBeCloseTo(0.5, 2);
    expect(v.y[i(1005)]).toBeLessThan(l.y[i(1005)]);
  });

  it('adds the same seeded noise every time, and writes transmittance as 10^−A', () => {
    const opts = { lines: [{ wavenumber: 1000, intensity: 1 }], from: 990, to: 1010, noise: 0.01, seed: 3 };
    expect(synthesizeSpectrum(opts).y).toEqual(synthesizeSpectrum(opts).y);
    expect(synthesizeSpectrum({ ...opts, seed: 4 }).y).not.toEqual(synthesizeSpectrum(opts).y);
    const t = synthesizeSpectrum({ ...opts, noise: 0, yKind: 'transmittance' });
    const a = synthesizeSpectrum({ ...opts, noise: 0 });
    t.y.forEach((v, k) => expect(v).toBeCloseTo(10 ** -a.y[k], 12));
  });

  it('refuses an empty or oversized grid', () => {
    expect(() => synthesizeSpectrum({ lines: [], from: 10, to: 5 })).toThrow(RangeError);
    expect(() => synthesizeSpectrum({ lines: [], from: 0, to: 1e6, step: 0.1 })).toThrow(/exceed/);
  });
});
