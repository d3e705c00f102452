/**
 * Synthetic spectra for tests and the demo: a sum of lines with a chosen shape on an
 * evenly spaced wavenumber grid, plus seeded Gaussian noise. Fictional data, made from
 * line positions and intensities the caller supplies (e.g. from published constants).
 */
import { gaussian, mulberry32 } from './random';
import type { Spectrum, YKind } from './types';

export interface SynthesisLine {
  /** Line centre, cm⁻¹. */
  wavenumber: number;
  /** Relative intensity (any scale; the strongest line is scaled to `peakAbsorbance`). */
  intensity: number;
}

export type LineShape = 'lorentzian' | 'pseudo-voigt';

export interface SynthesizeOptions {
  lines: SynthesisLine[];
  /** Grid start and end, cm⁻¹ (from < to). */
  from: number;
  to: number;
  /** Point spacing, cm⁻¹. */
  step?: number;
  /** Full width at half maximum of every line, cm⁻¹ (instrument resolution dominates at room temperature). */
  fwhm?: number;
  shape?: LineShape;
  /** Gaussian share of a pseudo-Voigt profile, 0–1. */
  gaussianShare?: number;
  /** Absorbance at the centre of the strongest line, before overlap with neighbours. */
  peakAbsorbance?: number;
  /** Constant absorbance offset and slope (per cm⁻¹ from `from`). */
  baseline?: number;
  baselineSlope?: number;
  /** Standard deviation of the added noise, in the output's y units. */
  noise?: number;
  seed?: number;
  yKind?: YKind;
  title?: string;
}

export const SYNTH_MAX_POINTS = 200_000;

function profile(shape: LineShape, gaussianShare: number, halfWidth: number): (d: number) => number {
  const lorentz = (d: number) => 1 / (1 + (d / halfWidth) ** 2);
  if (shape === 'lorentzian') return lorentz;
  const k = Math.LN2 / (halfWidth * halfWidth);
  return (d: number) => gaussianShare * Math.exp(-k * d * d) + (1 - gaussianShare) * lorentz(d);
}

/** Evenly spaced grid from `from` to `to` inclusive, with values rounded to hide floating-point dust. */
export function wavenumberGrid(from: number, to: number, step: number): number[] {
  const n = Math.floor((to - from) / step + 1e-9) + 1;
  const out = new Array<number>(n);
  for (let i = 0; i < n; i++) out[i] = Math.round((from + i * step) * 1e6) / 1e6;
  return out;
}

export function synthesizeSpectrum(opts: SynthesizeOptions): Spectrum {
  const step = opts.step ?? 0.25;
  const fwhm = opts.fwhm ?? 0.8;
  const shape = opts.shape ?? 'lorentzian';
  const gShare = Math.min(1, Math.max(0, opts.gaussianShare ?? 0.3));
  const peakA = opts.peakAbsorbance ?? 0.8;
  const yKind = opts.yKind ?? 'absorbance';
  if (!(opts.to > opts.from)) throw new RangeError('synthesizeSpectrum: "to" must be greater than "from".');
  if (!(step > 0) || !(fwhm > 0)) throw new RangeError('synthesizeSpectrum: step and fwhm must be positive.');
  const x = wavenumberGrid(opts.from, opts.to, step);
  if (x.length > SYNTH_MAX_POINTS) throw new RangeError(`synthesizeSpectrum: ${x.length} points exceed ${SYNTH_MAX_POINTS}.`);
  const strongest = opts.lines.reduce((m, l) => Math.max(m, l.intensity), 0);
  const f = profile(shape, gShare, fwhm / 2);
  const a = new Array<number>(x.length);
  for (let i = 0; i < x.length; i++) {
    let sum = (opts.baseline ?? 0) + (opts.baselineSlope ?? 0) * (x[i] - opts.from);
    if (strongest > 0) {
      for (const l of opts.lines) sum += ((peakA * l.intensity) / strongest) * f(x[i] - l.wavenumber);
    }
    a[i] = sum;
  }
  const y = yKind === 'absorbance' ? a : a.map((v) => 10 ** -v);
  const sigma = opts.noise ?? 0;
  if (sigma > 0) {
    const normal = gaussian(mulberry32(opts.seed ?? 1));
    for (let i = 0; i < y.length; i++) y[i] += sigma * normal();
  }
  return { x, y, yKind, title: opts.title ?? 'Synthetic spectrum' };
}
