/**
 * Synthetic spectra for tests and the demo: a sum of lines with a chosen shape on an
 * evenly spaced wavenumber grid, plus seeded Gaussian noise. Fictional data, made from
 * line positions and intensities the caller supplies (e.g. from published constants).
 *
 * With `instrument`, the spectrum is made the way a Fourier-transform spectrometer records
 * it: each line is a pressure-broadened Lorentzian, the transmittance 10^−A of the whole
 * spectrum is computed on a fine grid, and the interferometer's apodized optical-path
 * window (largest path difference L = 1/resolution) is applied to it by Fourier transform —
 * that is, the transmittance is convolved with the instrument line shape. Strong lines then
 * saturate as they do in a real cell (their recorded absorbance is less than the sum of
 * their parts), and unapodized (boxcar) spectra ring with sinc side lobes.
 */
import { fft, nextPowerOfTwo } from './fft';
import { gaussian, mulberry32 } from './random';
import type { Spectrum, YKind } from './types';

export interface SynthesisLine {
  /** Line centre, cm⁻¹. */
  wavenumber: number;
  /** Relative intensity (any scale; the strongest line is scaled to `peakAbsorbance`). */
  intensity: number;
}

export type LineShape = 'lorentzian' | 'pseudo-voigt';

/** Weighting of the interferogram by optical path difference δ (0 ≤ δ ≤ L). */
export type Apodization = 'boxcar' | 'triangular' | 'happ-genzel' | 'blackman-harris';

export interface InstrumentOptions {
  /** Nominal resolution 1/L, cm⁻¹, with L the largest optical path difference in cm. */
  resolution: number;
  /** Default 'happ-genzel' (0.54 + 0.46 cos πδ/L), a common default of FTIR software; 'blackman-harris' is the three-term window. */
  apodization?: Apodization;
  /** FWHM of each line before the instrument (pressure broadening, Lorentzian), cm⁻¹; default 0.15. */
  lineWidth?: number;
}

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
  /**
   * Record through an interferometer (see the top of the file). `fwhm` and `shape` are then
   * not used; `peakAbsorbance` is what the strongest line would reach if it did not saturate.
   */
  instrument?: InstrumentOptions;
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
  if (opts.instrument) return synthesizeThroughInstrument(opts, opts.instrument);
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

/** Largest fine grid the instrument simulation will build (points). */
const FINE_MAX_POINTS = 1 << 21;

function apodizationAt(kind: Apodization, delta: number, L: number): number {
  if (delta > L) return 0;
  if (kind === 'boxcar') return 1;
  if (kind === 'triangular') return 1 - delta / L;
  // Three-term Blackman–Harris (F. J. Harris, Proc. IEEE 66, 51 (1978)), weighting from δ = 0 to L.
  if (kind === 'blackman-harris')
    return 0.42323 + 0.49755 * Math.cos((Math.PI * delta) / L) + 0.07922 * Math.cos((2 * Math.PI * delta) / L);
  return 0.54 + 0.46 * Math.cos((Math.PI * delta) / L);
}

/**
 * Peak of (instrument line shape ⊗ Lorentzian of unit area): the integral over δ of the
 * apodization times the Lorentzian's transform exp(−πΓ|δ|), by Simpson's rule.
 */
function recordedPeakPerUnitArea(kind: Apodization, L: number, lineWidth: number): number {
  const n = 2000;
  const h = L / n;
  let sum = 0;
  for (let i = 0; i <= n; i++) {
    const d = i * h;
    const f = apodizationAt(kind, d, L) * Math.exp(-Math.PI * lineWidth * d);
    sum += (i === 0 || i === n ? 1 : i % 2 ? 4 : 2) * f;
  }
  return (2 * sum * h) / 3;
}

function synthesizeThroughInstrument(opts: SynthesizeOptions, inst: InstrumentOptions): Spectrum {
  const step = opts.step ?? 0.25;
  const peakA = opts.peakAbsorbance ?? 0.8;
  const yKind = opts.yKind ?? 'absorbance';
  const kind = inst.apodization ?? 'happ-genzel';
  const lineWidth = inst.lineWidth ?? 0.15;
  if (!(opts.to > opts.from)) throw new RangeError('synthesizeSpectrum: "to" must be greater than "from".');
  if (!(step > 0) || !(inst.resolution > 0) || !(lineWidth > 0))
    throw new RangeError('synthesizeSpectrum: step, resolution and line width must be positive.');
  const x = wavenumberGrid(opts.from, opts.to, step);
  if (x.length > SYNTH_MAX_POINTS) throw new RangeError(`synthesizeSpectrum: ${x.length} points exceed ${SYNTH_MAX_POINTS}.`);
  const L = 1 / inst.resolution;
  // Fine grid: output points fall on it, and it samples both the narrow lines and the window.
  const oversample = Math.max(1, Math.ceil(step / Math.min(lineWidth / 4, inst.resolution / 8)));
  const fine = step / oversample;
  // Room on both sides for the line shape's wings, so the circular transform does not wrap.
  const padPoints = Math.ceil(Math.max(20, 40 * inst.resolution) / fine);
  const start = opts.from - padPoints * fine;
  const needed = (x.length - 1) * oversample + 2 * padPoints + 1;
  const n = nextPowerOfTwo(needed);
  if (n > FINE_MAX_POINTS)
    throw new RangeError(
      `synthesizeSpectrum: the fine grid would need ${n} points (limit ${FINE_MAX_POINTS}); use a coarser step or a shorter range.`,
    );
  const strongest = opts.lines.reduce((m, l) => Math.max(m, l.intensity), 0);
  // Area of each line such that, were nothing saturated, the strongest would be recorded at peakA.
  const areaScale = strongest > 0 ? peakA / recordedPeakPerUnitArea(kind, L, lineWidth) / strongest : 0;
  const gamma = lineWidth / 2;
  const wing = Math.max(50, 300 * lineWidth);
  const absorbance = new Float64Array(n);
  for (const l of opts.lines) {
    const area = areaScale * l.intensity;
    if (!(area > 0)) continue;
    const height = area / (Math.PI * gamma);
    const lo = Math.max(0, Math.ceil((l.wavenumber - wing - start) / fine));
    const hi = Math.min(n - 1, Math.floor((l.wavenumber + wing - start) / fine));
    for (let i = lo; i <= hi; i++) {
      const d = (start + i * fine - l.wavenumber) / gamma;
      absorbance[i] += height / (1 + d * d);
    }
  }
  // Transmittance − 1 (zero far from the lines, so the padding is neutral), then the window.
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  for (let i = 0; i < n; i++) re[i] = 10 ** -absorbance[i] - 1;
  fft(re, im);
  const span = n * fine;
  for (let j = 0; j < n; j++) {
    const delta = (j <= n / 2 ? j : n - j) / span;
    const w = apodizationAt(kind, delta, L);
    re[j] *= w;
    im[j] *= w;
  }
  fft(re, im, true);
  const a = new Array<number>(x.length);
  for (let i = 0; i < x.length; i++) {
    const k = padPoints + i * oversample;
    const t = 1 + re[k] / n;
    a[i] = -Math.log10(Math.max(t, 1e-6)) + (opts.baseline ?? 0) + (opts.baselineSlope ?? 0) * (x[i] - opts.from);
  }
  const y = yKind === 'absorbance' ? a : a.map((v) => 10 ** -v);
  const sigma = opts.noise ?? 0;
  if (sigma > 0) {
    const normal = gaussian(mulberry32(opts.seed ?? 1));
    for (let i = 0; i < y.length; i++) y[i] += sigma * normal();
  }
  return { x, y, yKind, title: opts.title ?? 'Synthetic spectrum' };
}
