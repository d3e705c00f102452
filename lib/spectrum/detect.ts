/**
 * From an instrument's spectrum to a list of lines with positions and standard errors:
 * absorption depth, a local baseline and local noise level, the instrument's line width and
 * shape measured on its own clean lines, candidate maxima, and positions refined by
 * fitting the line shape (lineshape.ts).
 *
 * The lines are measured in absorption depth 1 − T (T = 10^−A), not in absorbance: a
 * spectrometer records transmittance convolved with its instrument line shape, so in 1 − T
 * every line — weak or saturated — has nearly the instrument's shape and neighbours add,
 * whereas in absorbance a strong line is flattened and its neighbours' shapes are not.
 *
 * Everything here is measured on the spectrum itself; nothing about molecules is assumed.
 */
import {
  fitCluster,
  instrumentProfile,
  measureShape,
  ProfileTable,
  pseudoVoigtTable,
  SaturationProfiles,
  ScaledProfile,
  type InstrumentShape,
  type LineProfile,
} from './lineshape';
import { toAbsorbance } from './peaks';
import type { Spectrum } from './types';

export interface PreparedSpectrum {
  x: Float64Array;
  /** Absorption depth 1 − 10^−A (the share of light absorbed). */
  a: Float64Array;
  /** Point spacing, cm⁻¹. */
  step: number;
  /** Slowly varying background depth under the lines. */
  baseline: Float64Array;
  /** Local standard deviation of the noise, depth units. */
  noise: Float64Array;
  /** True when the points were not evenly spaced and were put on an even grid. */
  resampled: boolean;
  yKind: Spectrum['yKind'];
}

export interface DetectedLine {
  /** Fitted centre, cm⁻¹. */
  wavenumber: number;
  /** Standard error of the centre from the line-shape fit, cm⁻¹. */
  sigma: number;
  /** Height above the local baseline, depth units. */
  height: number;
  heightError: number;
  /** Height over the local noise. */
  snr: number;
  /** Found by looking where a band predicts a line, rather than as a maximum of the spectrum. */
  probed: boolean;
}

function quantile(values: Float64Array | number[], q: number): number {
  const s = Float64Array.from(values).sort();
  if (s.length === 0) return NaN;
  return s[Math.min(s.length - 1, Math.max(0, Math.floor(q * (s.length - 1))))];
}

/** Evenly spaced copy of the spectrum (linear interpolation) when the grid is uneven. */
function evenGrid(x: number[], y: number[]): { x: Float64Array; y: Float64Array; resampled: boolean } {
  const n = x.length;
  const step = (x[n - 1] - x[0]) / (n - 1);
  let even = true;
  for (let i = 1; i < n && even; i++) if (Math.abs(x[i] - x[i - 1] - step) > 0.02 * step) even = false;
  if (even) return { x: Float64Array.from(x), y: Float64Array.from(y), resampled: false };
  const diffs = new Float64Array(n - 1);
  for (let i = 1; i < n; i++) diffs[i - 1] = x[i] - x[i - 1];
  const h = Math.max(quantile(diffs, 0.5), (x[n - 1] - x[0]) / 400_000);
  const m = Math.floor((x[n - 1] - x[0]) / h) + 1;
  const xs = new Float64Array(m);
  const ys = new Float64Array(m);
  let j = 0;
  for (let i = 0; i < m; i++) {
    const xi = x[0] + i * h;
    while (j < n - 2 && x[j + 1] < xi) j++;
    const t = (xi - x[j]) / (x[j + 1] - x[j]);
    xs[i] = xi;
    ys[i] = y[j] + Math.min(1, Math.max(0, t)) * (y[j + 1] - y[j]);
  }
  return { x: xs, y: ys, resampled: true };
}

/** Robust σ of white noise from point-to-point differences in a block. */
function blockNoise(a: Float64Array, from: number, to: number): number {
  const d = new Float64Array(Math.max(0, to - from - 1));
  for (let i = from + 1; i < to; i++) d[i - from - 1] = Math.abs(a[i] - a[i - 1]);
  if (d.length < 4) return NaN;
  return quantile(d, 0.5) / 0.6745 / Math.SQRT2;
}

/** Piecewise-linear curve through (centre, value) of consecutive blocks, evaluated at every point. */
function interpolateBlocks(n: number, centres: number[], values: number[]): Float64Array {
  const out = new Float64Array(n);
  let b = 0;
  for (let i = 0; i < n; i++) {
    while (b < centres.length - 2 && i > centres[b + 1]) b++;
    if (centres.length === 1 || i <= centres[0]) out[i] = values[0];
    else if (i >= centres[centres.length - 1]) out[i] = values[values.length - 1];
    else {
      const t = (i - centres[b]) / (centres[b + 1] - centres[b]);
      out[i] = values[b] + t * (values[b + 1] - values[b]);
    }
  }
  return out;
}

export function prepareSpectrum(spectrum: Spectrum): PreparedSpectrum {
  const even = evenGrid(spectrum.x, toAbsorbance(spectrum));
  const { x } = even;
  const a = even.y.map((A) => 1 - 10 ** -A);
  const n = x.length;
  const step = (x[n - 1] - x[0]) / (n - 1);
  // Baseline: a low quantile in blocks of about 20 cm⁻¹ (lines take a small share of any block).
  const bw = Math.max(64, Math.round(20 / step));
  const bc: number[] = [];
  const bv: number[] = [];
  const nc: number[] = [];
  const nv: number[] = [];
  for (let from = 0; from < n; from += bw) {
    const to = Math.min(n, from + bw);
    if (to - from < bw / 2 && bc.length > 0) break;
    bc.push((from + to - 1) / 2);
    bv.push(quantile(a.subarray(from, to), 0.2));
  }
  // Noise: blocks of 256 points, then the median of each block and its neighbours, so one
  // block crowded with steep line flanks does not stand out.
  const nw = Math.min(256, Math.max(32, Math.floor(n / 4)));
  const raw: number[] = [];
  for (let from = 0; from < n; from += nw) {
    const to = Math.min(n, from + nw);
    if (to - from < 16 && raw.length > 0) break;
    nc.push((from + to - 1) / 2);
    raw.push(blockNoise(a, from, to));
  }
  const finite = raw.filter(Number.isFinite);
  const fallback = finite.length ? quantile(finite, 0.5) : 0;
  for (let i = 0; i < raw.length; i++) {
    const near = [raw[i - 1], raw[i], raw[i + 1]].filter((v): v is number => v !== undefined && Number.isFinite(v));
    nv.push(near.length ? quantile(near, 0.5) : fallback);
  }
  const noise = interpolateBlocks(n, nc, nv);
  // A floor: a noiseless synthetic spectrum would otherwise make every wiggle significant.
  let amax = 0;
  for (let i = 0; i < n; i++) amax = Math.max(amax, a[i]);
  const floor = Math.max(1e-7, 1e-6 * amax);
  for (let i = 0; i < n; i++) if (!(noise[i] > floor)) noise[i] = floor;
  return { x, a, step, baseline: interpolateBlocks(n, bc, bv), noise, resampled: even.resampled, yKind: spectrum.yKind };
}

/**
 * Local maxima of y above `threshold[i]` over the baseline, higher than everything within
 * ±halfWindow points and, when `reach` is given, standing `threshold[i]` above the lowest point
 * on each side within ±reach points (a wiggle of noise on the wing of a strong line is not a line).
 */
function localMaxima(y: Float64Array, base: Float64Array, threshold: Float64Array, halfWindow: number, reach = 0): number[] {
  const out: number[] = [];
  const n = y.length;
  for (let i = 1; i < n - 1; i++) {
    const v = y[i];
    if (!(v - base[i] > threshold[i]) || v < y[i - 1] || v < y[i + 1]) continue;
    let top = true;
    for (let j = Math.max(0, i - halfWindow); j <= Math.min(n - 1, i + halfWindow) && top; j++) {
      if (y[j] > v || (y[j] === v && j < i)) top = false;
    }
    if (!top) continue;
    if (reach > 0) {
      let left = v;
      let right = v;
      for (let j = i - 1; j >= Math.max(0, i - reach); j--) if (y[j] < left) left = y[j];
      for (let j = i + 1; j <= Math.min(n - 1, i + reach); j++) if (y[j] < right) right = y[j];
      if (!(v - Math.max(left, right) > threshold[i])) continue;
    }
    out.push(i);
  }
  return out;
}

/** Width at half height of the maximum at index i, or NaN when a neighbour interferes. */
function halfHeightWidth(p: PreparedSpectrum, i: number): number {
  const { x, a, baseline } = p;
  const half = baseline[i] + (a[i] - baseline[i]) / 2;
  let l = i;
  while (l > 0 && a[l] > half) {
    if (a[l - 1] > a[l] + 3 * p.noise[l]) return NaN;
    l--;
  }
  let r = i;
  while (r < a.length - 1 && a[r] > half) {
    if (a[r + 1] > a[r] + 3 * p.noise[r]) return NaN;
    r++;
  }
  if (l === 0 || r === a.length - 1) return NaN;
  const xl = x[l] + ((half - a[l]) / (a[l + 1] - a[l])) * (x[l + 1] - x[l]);
  const xr = x[r - 1] + ((a[r - 1] - half) / (a[r - 1] - a[r])) * (x[r] - x[r - 1]);
  return xr - xl;
}

/** The line shape used for every line of the spectrum. */
export interface LineShapeReport {
  /** Full width at half maximum, cm⁻¹. */
  fwhm: number;
  /** 'instrument': measured on the spectrum's clean lines; 'bell': too few clean lines to measure it, a pseudo-Voigt used instead. */
  model: 'instrument' | 'bell';
  instrument?: InstrumentShape;
  /** Resolution 1/L, cm⁻¹, when measured. */
  resolution?: number;
}

export interface LineSearch {
  prepared: PreparedSpectrum;
  shape: LineShapeReport;
  profile: LineProfile;
  lines: DetectedLine[];
}

/** Side lobes are looked for this far (in line widths) from a stronger line. */
const SIDE_LOBE_REACH = 6;
const SIDE_LOBE_SHARE = 1 / 30;

/** Candidates at least this many local noise σ above the baseline are fitted. */
export const DETECTION_SIGMA = 5;

/** Finds and measures every line the spectrum shows. */
export function detectLines(prepared: PreparedSpectrum): LineSearch {
  const p = prepared;
  const { a, baseline, noise, step } = p;
  const n = a.length;
  // 1. Width: half-height widths of the strongest clean maxima of the raw spectrum.
  const strongThreshold = new Float64Array(n);
  for (let i = 0; i < n; i++) strongThreshold[i] = 10 * noise[i];
  const strong = localMaxima(a, baseline, strongThreshold, 2).sort((i, j) => a[j] - baseline[j] - (a[i] - baseline[i]));
  const widths: number[] = [];
  for (const i of strong.slice(0, 60)) {
    const w = halfHeightWidth(p, i);
    if (Number.isFinite(w) && w > step) widths.push(w);
  }
  let fwhm = widths.length ? quantile(widths, 0.5) : 4 * step;
  fwhm = Math.max(fwhm, 2 * step);

  // 2. Candidates on a lightly smoothed copy (a Gaussian of about a fifth of the width).
  const sigmaPts = fwhm / step / 5;
  let smooth = a;
  let noiseFactor = 1;
  if (sigmaPts >= 1) {
    const half = Math.ceil(3 * sigmaPts);
    const kernel = new Float64Array(2 * half + 1);
    let sum = 0;
    for (let j = -half; j <= half; j++) sum += kernel[j + half] = Math.exp(-(j * j) / (2 * sigmaPts * sigmaPts));
    let sq = 0;
    for (let j = 0; j < kernel.length; j++) {
      kernel[j] /= sum;
      sq += kernel[j] * kernel[j];
    }
    noiseFactor = Math.sqrt(sq);
    smooth = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      let s = 0;
      let w = 0;
      for (let j = -half; j <= half; j++) {
        const k = i + j;
        if (k < 0 || k >= n) continue;
        s += kernel[j + half] * a[k];
        w += kernel[j + half];
      }
      smooth[i] = s / w;
    }
  }
  const threshold = new Float64Array(n);
  for (let i = 0; i < n; i++) threshold[i] = DETECTION_SIGMA * noise[i] * noiseFactor;
  const halfWindow = Math.max(1, Math.round(fwhm / step / 4));
  const candidates = localMaxima(smooth, baseline, threshold, halfWindow, Math.max(2, Math.round((1.5 * fwhm) / step)));

  const height = (i: number) => a[i] - baseline[i];
  // 3. The instrument's shape, measured on clean lines of good signal (not the very strongest:
  //    a saturated line is broadened beyond the instrument's own shape). Clean: within 5 widths
  //    nothing but bumps under a quarter of its height (its own side lobes, noise) and at most
  //    one weaker partner 2 widths or more away (an isotope partner).
  const clean: { i: number; partner?: number }[] = [];
  for (let k = 0; k < candidates.length; k++) {
    const i = candidates[k];
    if (!(height(i) > 50 * noise[i])) continue;
    const close = candidates.filter((j) => j !== i && Math.abs(p.x[j] - p.x[i]) < 5 * fwhm && height(j) >= 0.25 * height(i));
    if (close.length > 1) continue;
    if (close.length === 1 && (Math.abs(p.x[close[0]] - p.x[i]) < 2 * fwhm || height(close[0]) > height(i))) continue;
    clean.push({ i, partner: close[0] });
  }
  // Lines absorbing under a quarter of the light hardly saturate: take them first, strongest first.
  const unsaturated = clean.filter((c) => height(c.i) < 0.25).sort((u, v) => height(v.i) - height(u.i));
  const saturated = clean.filter((c) => height(c.i) >= 0.25).sort((u, v) => height(u.i) - height(v.i));
  const measured: InstrumentShape[] = [];
  for (const c of [...unsaturated, ...saturated].slice(0, 25)) {
    const centres = c.partner === undefined ? [p.x[c.i]] : [p.x[c.i], p.x[c.partner]];
    const win = windowAround(p, Math.min(...centres), Math.max(...centres), 4 * fwhm);
    if (!win) continue;
    const m = measureShape(p.x, a, win[0], win[1], { centres, fwhm }, shapeFreedom(fwhm, p.step));
    if (m && m.shape.L > 0.2 / fwhm && m.shape.L < 5 / fwhm && m.shape.gamma < 2 * fwhm) measured.push(m.shape);
    if (measured.length >= 6) break;
  }
  const { shape, profile, lobeShape } = profileFrom(measured, fwhm);

  // 4. A bump beside a stronger line that the stronger line's side lobe explains is not a line of
  //    its own (apodized instrument line shapes ring). With the shape measured, the lobe at that
  //    distance is known; without it, anything under 1/30 of a line within 4 widths is taken for one.
  const kept = candidates.filter((i, k) => {
    for (let o = -4; o <= 4; o++) {
      const j = candidates[k + o];
      if (o === 0 || j === undefined) continue;
      const d = Math.abs(p.x[j] - p.x[i]);
      if (d > SIDE_LOBE_REACH * fwhm || height(j) <= height(i)) continue;
      if (lobeShape) {
        const lobe = lobeShape.value(d) * height(j);
        if (lobe > 0 && height(i) < 1.5 * lobe + 2 * noise[i]) return false;
      } else if (height(i) < SIDE_LOBE_SHARE * height(j)) return false;
    }
    return true;
  });

  // 5. Every candidate refined.
  // Start each line at the vertex of the parabola through its top three samples.
  const vertex = (i: number) => {
    if (i <= 0 || i >= n - 1) return p.x[i];
    const den = a[i - 1] - 2 * a[i] + a[i + 1];
    const d = den < 0 ? (0.5 * (a[i - 1] - a[i + 1])) / den : 0;
    return p.x[i] + Math.max(-0.5, Math.min(0.5, d)) * step;
  };
  const lines = refineLines(
    p,
    profile,
    kept.map((i) => ({ wavenumber: vertex(i), probed: false })),
  );
  return { prepared: p, shape, profile, lines };
}

/**
 * How much of the window the samples can tell: three cosine terms (enough for the common
 * apodizations) with 8 or more points per line width, two with fewer. More terms than the data
 * determine trade off against L and leave the width right but the resolution wrong.
 */
function shapeFreedom(fwhm: number, step: number): { terms: number; fitGamma: boolean } {
  return { terms: fwhm / step >= 4 ? 3 : 2, fitGamma: true };
}

/** The line model from the shapes measured on clean lines (their median), or a bell shape when too few were measured. */
function profileFrom(
  measured: InstrumentShape[],
  fwhm: number,
): { shape: LineShapeReport; profile: LineProfile; lobeShape?: ProfileTable } {
  if (measured.length >= 3) {
    const L = quantile(
      measured.map((m) => m.L),
      0.5,
    );
    const gamma = quantile(
      measured.map((m) => m.gamma),
      0.5,
    );
    const coeffs = measured[0].a.map((_, k) =>
      quantile(
        measured.map((m) => m.a[k]),
        0.5,
      ),
    );
    const instrument: InstrumentShape = { L, gamma, a: coeffs };
    const table = new ProfileTable((d) => instrumentProfile(d, instrument), fwhm);
    if (table.fwhm > 0.3 * fwhm && table.fwhm < 3 * fwhm) {
      // A line much narrower than the instrument's shape cannot be resolved on an affordable grid;
      // it then saturates little enough that the weak-line shape, broadened, does.
      const profile = gamma > table.fwhm / 20 ? new SaturationProfiles(instrument, table.fwhm) : new ScaledProfile(table);
      return { shape: { fwhm: table.fwhm, model: 'instrument', instrument, resolution: 1 / L }, profile, lobeShape: table };
    }
  }
  return { shape: { fwhm, model: 'bell' }, profile: new ScaledProfile(pseudoVoigtTable(fwhm)) };
}

/**
 * Fits every given position (found maxima, and predicted positions marked `probed`) with the
 * line model; lines close enough to reach into each other's window are fitted together.
 */
export function refineLines(p: PreparedSpectrum, profile: LineProfile, at: { wavenumber: number; probed: boolean }[]): DetectedLine[] {
  const sorted = at.slice().sort((u, v) => u.wavenumber - v.wavenumber);
  const fwhm = profile.fwhm;
  const lines: DetectedLine[] = [];
  let start = 0;
  while (start < sorted.length) {
    let end = start;
    while (end + 1 < sorted.length && sorted[end + 1].wavenumber - sorted[end].wavenumber < 2 * MARGIN * fwhm && end - start < 7) end++;
    const group = sorted.slice(start, end + 1);
    lines.push(
      ...fitGroup(
        p,
        profile,
        group.map((g) => g.wavenumber),
        group.map((g) => p.a[indexOf(p, g.wavenumber)]),
        { probed: group.map((g) => g.probed) },
      ),
    );
    start = end + 1;
  }
  return lines.sort((l, m) => l.wavenumber - m.wavenumber);
}

/**
 * Measures the instrument's shape again on lines whose unresolved partners are known (a blended
 * isotope doublet at low resolution looks like one broad line), each fitted with its partner at
 * the given position, and returns the new model, or undefined when too few pairs could be measured.
 */
export function remeasureShape(
  p: PreparedSpectrum,
  pairs: { main: number; partner: number }[],
  fwhm: number,
): { shape: LineShapeReport; profile: LineProfile } | undefined {
  const measured: InstrumentShape[] = [];
  // The width measured on the blends overstates the instrument's; start from less, and keep the
  // window short of the next lines.
  const start = 0.7 * fwhm;
  for (const pair of pairs) {
    const centres = [pair.main, pair.partner];
    const win = windowAround(p, Math.min(...centres), Math.max(...centres), 2.5 * fwhm);
    if (!win) continue;
    const m = measureShape(p.x, p.a, win[0], win[1], { centres, fwhm: start }, shapeFreedom(start, p.step));
    if (m && m.shape.L > 0.2 / fwhm && m.shape.L < 5 / fwhm && m.shape.gamma < 2 * fwhm) measured.push(m.shape);
    if (measured.length >= 6) break;
  }
  if (measured.length < 3) return undefined;
  const r = profileFrom(measured, fwhm);
  return r.shape.model === 'instrument' ? r : undefined;
}

/** Index range covering [from − margin, to + margin], or undefined when too short to fit. */
export function windowAround(p: PreparedSpectrum, from: number, to: number, margin: number): [number, number] | undefined {
  const n = p.x.length;
  const lo = Math.max(0, Math.floor((from - margin - p.x[0]) / p.step));
  const hi = Math.min(n - 1, Math.ceil((to + margin - p.x[0]) / p.step));
  return hi - lo >= 6 ? [lo, hi] : undefined;
}

function indexOf(p: PreparedSpectrum, w: number): number {
  return Math.min(p.x.length - 1, Math.max(0, Math.round((w - p.x[0]) / p.step)));
}

/** Lines this many noise σ high get their own width in a cluster fit. */
const WIDTH_FIT_SNR = 50;

/** A fit is repeated in a window centred on its result when a centre moved more than this share of the point spacing. */
const RECENTRE_SHARE = 0.15;

/** The fit window reaches this many FWHM beyond the outer lines; samples fade out beyond TAPER_INNER FWHM. */
const MARGIN = 2.5;
const TAPER_INNER = 1.5;

/**
 * Fits a group of neighbouring lines and returns those that stand out: a candidate whose
 * fitted height is not clearly positive (a noise bump, or a side lobe of the instrument's
 * line shape beside a strong line) is dropped and the rest refitted without it.
 * With `fixed`, the listed centres are first held where predicted, then let go.
 */
export function fitGroup(
  p: PreparedSpectrum,
  profile: LineProfile,
  centresIn: number[],
  topsIn: number[],
  options: { fixed?: number[]; probed?: boolean[] } = {},
): DetectedLine[] {
  let centres = centresIn.slice();
  let tops = topsIn.slice();
  let probed = centresIn.map((_, k) => options.probed?.[k] ?? false);
  let fixed = new Set(options.fixed ?? []);
  for (let round = 0; round <= centresIn.length; round++) {
    if (centres.length === 0) return [];
    const fwhm = profile.fwhm;
    const win = windowAround(p, Math.min(...centres), Math.max(...centres), MARGIN * fwhm);
    if (!win) return [];
    const taper: [number, number] = [TAPER_INNER * fwhm, MARGIN * fwhm];
    const localNoise = p.noise[indexOf(p, centres[0])];
    // Strong lines get their own width (saturation broadens them); weak ones keep the instrument's.
    const fitShapes = tops.map((t, k) => t - p.baseline[indexOf(p, centres[k])] > WIDTH_FIT_SNR * localNoise);
    let fit = fitCluster({
      x: p.x,
      y: p.a,
      lo: win[0],
      hi: win[1],
      centres,
      heights: tops,
      profile,
      fitShapes,
      fixedCentres: [...fixed],
      taper,
    });
    // Fit again in a window centred on the fitted lines (and with held lines let go): a window
    // placed by the highest samples is lopsided by up to a point, and any difference between
    // the true line shape and the model then pulls the centre.
    const lo = Math.min(...fit.centres.filter(Number.isFinite));
    const hi = Math.max(...fit.centres.filter(Number.isFinite));
    const win2 = Number.isFinite(lo) && Number.isFinite(hi) ? windowAround(p, lo, hi, MARGIN * fwhm) : undefined;
    const moved = Math.max(...fit.centres.map((c, k) => Math.abs(c - centres[k])));
    if (
      win2 &&
      (moved > RECENTRE_SHARE * p.step || fixed.size) &&
      Math.abs(lo - Math.min(...centres)) < fwhm &&
      Math.abs(hi - Math.max(...centres)) < fwhm
    ) {
      const refit = fitCluster({
        x: p.x,
        y: p.a,
        lo: win2[0],
        hi: win2[1],
        centres: fit.centres,
        heights: fit.heights.map((h) => h + fit.baseline[0]),
        profile,
        shapes: fit.shapes,
        fitShapes,
        taper,
      });
      if (refit.ok || !fit.ok) fit = refit;
    } else if (fixed.size) {
      fit = fitCluster({
        x: p.x,
        y: p.a,
        lo: win[0],
        hi: win[1],
        centres: fit.centres,
        heights: fit.heights.map((h) => h + fit.baseline[0]),
        profile,
        shapes: fit.shapes,
        taper,
      });
    }
    // The least convincing line, if any is not convincing.
    let worst = -1;
    let worstScore = Infinity;
    for (let k = 0; k < centres.length; k++) {
      const c = fit.centres[k];
      const h = fit.heights[k];
      const bad =
        !Number.isFinite(c) ||
        c < p.x[win[0]] ||
        c > p.x[win[1]] ||
        Math.abs(c - centres[k]) > fwhm ||
        !(h > 0) ||
        !Number.isFinite(fit.centreErrors[k]) ||
        !(h > 2 * fit.heightErrors[k]);
      const score = bad ? (Number.isFinite(h / fit.heightErrors[k]) ? h / fit.heightErrors[k] : -Infinity) : Infinity;
      if (bad && score < worstScore) {
        worstScore = score;
        worst = k;
      }
    }
    if (worst < 0) {
      return centres.map((_, k) => {
        const c = fit.centres[k];
        const h = fit.heights[k];
        return {
          wavenumber: c,
          sigma: fit.centreErrors[k],
          height: h,
          heightError: fit.heightErrors[k],
          snr: h / p.noise[indexOf(p, c)],
          probed: probed[k],
        };
      });
    }
    centres = centres.filter((_, k) => k !== worst);
    tops = tops.filter((_, k) => k !== worst);
    probed = probed.filter((_, k) => k !== worst);
    fixed = new Set([...fixed].filter((k) => k !== worst).map((k) => (k > worst ? k - 1 : k)));
  }
  return [];
}
