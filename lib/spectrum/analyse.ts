/**
 * Whole-spectrum analysis: from an instrument's file and the names of the molecules in the
 * cell to every band's assigned lines and fitted constants, with no windows given by hand.
 *
 *  1. Lines are found and measured on the spectrum itself (detect.ts): absorbance, local
 *     baseline and noise, the instrument's line width, positions from line-shape fits.
 *  2. Every fundamental and first overtone of every isotopologue is predicted from the
 *     published constants (bands.ts).
 *  3. The calibration offset (and scale) is found first, for all bands at once: the predicted
 *     line patterns are slid over the found lines (±25 cm⁻¹) and the shift that matches
 *     all bands best is kept. The quadratic term of each branch and the band gap make one
 *     shift fit far better than a shift by one line spacing.
 *  4. Each molecule's band is then assigned from its strong central lines outwards: the most
 *     abundant isotopologue first (each line to the nearest found line within a window that
 *     shrinks as the fit improves), then the less abundant ones, whose lines are looked for
 *     only beside an assigned partner of the main isotopologue, at the predicted isotope
 *     shift and with a height near the abundance ratio — so a lone line is never given to
 *     the minor isotopologue when the major one explains it. Lines the band predicts but the
 *     first search missed (weak band edges, shoulders) are looked for where predicted.
 *  5. Each band is fitted through band-fit.ts (which chooses the model); lines that sit more
 *     than four standard deviations off the fit are left out one at a time and named; a line
 *     claimed by two bands is left out of both.
 *  6. The fitted band origins are compared with the published ones to report a wavenumber
 *     offset or scale error — reported, never applied to the fits.
 *  7. Fundamental and overtone origins give ωₑ, ωₑxₑ (vibration.ts).
 *
 * Pure: a Spectrum and options in, plain data out.
 */
import type { Estimate, Species } from '@/lib/grading';
import { fitAssignedLines, type ChosenBandFit } from './band-fit';
import {
  BAND_LABEL,
  isotopologuesOfAll,
  linePosition,
  predictBand,
  type BandConstantsGuess,
  type BandKind,
  type BandPrediction,
  type Isotopologue,
  type PredictedLine,
} from './bands';
import {
  detectLines,
  fitGroup,
  prepareSpectrum,
  refineLines,
  remeasureShape,
  type DetectedLine,
  type LineShapeReport,
  type PreparedSpectrum,
} from './detect';
import type { LineProfile } from './lineshape';
import type { Spectrum } from './types';
import type {
  AnalyseOptions,
  AssignedLine,
  BandAnalysis,
  BandFitReport,
  BandStatus,
  CalibrationReport,
  ExcludedLine,
  UnassignedLine,
} from './analysis-types';
import { analyseVibration, type VibrationalAnalysis } from './vibration';

export type {
  AnalyseOptions,
  AssignedLine,
  BandAnalysis,
  BandFitReport,
  BandStatus,
  CalibrationReport,
  ExcludedLine,
  UnassignedLine,
} from './analysis-types';

export interface SpectrumAnalysis {
  ok: boolean;
  species: string[];
  isotopologues: { formula: string; display: string; molecule: string; abundance: number }[];
  range: { from: number; to: number; points: number; step: number };
  lineShape: LineShapeReport;
  /** Median noise σ, absorbance. */
  noise: number;
  bands: BandAnalysis[];
  unassigned: UnassignedLine[];
  calibration: CalibrationReport | null;
  vibration: VibrationalAnalysis;
  problems: string[];
}

// ------------------------------------------------------------------------------------------
// Tuning, each with its reason

/** Lines found at less than this many noise σ are not listed as unassigned (noise makes such bumps). */
const UNASSIGNED_MIN_SNR = 6;
/** A line predicted where nothing was found is looked for when its expected height is this many σ. */
const PROBE_MIN_SNR = 2.5;
/** … and kept when its fitted height is this many σ above the noise and its own standard error. */
const PROBE_ACCEPT_SNR = 3;
/** Lines further than this many standard deviations from the fit are left out (one at a time). */
const OUTLIER_SIGMA = 4;
/** A band needs this many lines to be fitted (three parameters and one degree of freedom). */
const MIN_FIT_LINES = 4;

// ------------------------------------------------------------------------------------------

function median(values: number[]): number {
  if (values.length === 0) return NaN;
  const s = values.slice().sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/** Index of the first element ≥ w in a sorted array. */
function lowerBound(sorted: ArrayLike<number>, w: number): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (sorted[mid] < w) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

function nearestDistance(sorted: Float64Array, w: number): number {
  const i = lowerBound(sorted, w);
  let d = Infinity;
  if (i < sorted.length) d = sorted[i] - w;
  if (i > 0) d = Math.min(d, w - sorted[i - 1]);
  return d;
}

const fmt = (v: number, digits = 2) => v.toFixed(digits);
const label = (l: { branch: string; J: number }) => `${l.branch}(${l.J})`;

/** One molecule's band: the predictions of its isotopologues, most abundant first. */
interface Group {
  molecule: string;
  band: BandKind;
  members: BandPrediction[];
  /** Lines of the main isotopologue at least 1 % of its strongest. */
  extent: [number, number];
}

/** Working state of one isotopologue's band during assignment. */
interface Work {
  prediction: BandPrediction;
  constants: BandConstantsGuess;
  /** Covariance of [ν̃₀, B′+B″, B′−B″, −4D] from the last fit, for prediction errors. */
  covariance: number[][] | null;
  /** Assigned peaks by running index m. */
  assigned: Map<number, DetectedLine>;
  excluded: ExcludedLine[];
  /** The found lines behind `excluded` (they are explained, so not listed as unassigned). */
  excludedLines: Set<DetectedLine>;
  warnings: string[];
  status: BandStatus;
  fit: ChosenBandFit | null;
  /** Height per unit of predicted intensity (for the height a missing line should have). */
  heightScale: number;
}

function bandExtent(p: BandPrediction): [number, number] {
  const strongest = p.lines.reduce((m, l) => Math.max(m, l.intensity), 0);
  const seen = p.lines.filter((l) => l.intensity >= 0.01 * strongest);
  return [seen[0]?.wavenumber ?? p.constants.origin, seen[seen.length - 1]?.wavenumber ?? p.constants.origin];
}

/** Standard deviation of a prediction at running index m from the fit covariance. */
function predictionError(w: Work, m: number): number {
  const V = w.covariance;
  if (!V) return Infinity;
  const g = [1, m, m * m, m * m * m].slice(0, V.length);
  let s = 0;
  for (let i = 0; i < g.length; i++) for (let j = 0; j < g.length; j++) s += g[i] * V[i][j] * g[j];
  return Math.sqrt(Math.max(0, s));
}

/** Distance to the neighbouring line of the same branch. */
function lineSpacing(k: BandConstantsGuess, m: number): number {
  return Math.abs(linePosition(k, m + Math.sign(m || 1)) - linePosition(k, m));
}

// ------------------------------------------------------------------------------------------
// Calibration search

interface ShiftSearch {
  /** Best shift of each group, cm⁻¹. */
  shifts: number[];
  offset: number;
  scale: number;
}

function searchShift(groups: Group[], found: DetectedLine[], fwhm: number, maxOffset: number): ShiftSearch {
  const sorted = Float64Array.from(found.filter((l) => l.snr >= 4).map((l) => l.wavenumber)).sort();
  const tau = Math.max(0.2, 0.4 * fwhm);
  const h = tau / 4;
  const nGrid = Math.ceil((2 * (maxOffset + 2)) / h) + 1;
  const gridStart = -(maxOffset + 2);
  const curves = groups.map((g) => {
    const lines: PredictedLine[] = [];
    for (const member of g.members) {
      const strongest = member.lines.reduce((m, l) => Math.max(m, l.intensity), 0);
      for (const l of member.lines) if (l.intensity >= 0.05 * strongest && member.isotopologue.abundance >= 0.1) lines.push(l);
    }
    const total = lines.reduce((s, l) => s + l.intensity, 0) || 1;
    const curve = new Float64Array(nGrid);
    for (let k = 0; k < nGrid; k++) {
      const shift = gridStart + k * h;
      let s = 0;
      for (const l of lines) {
        const d = nearestDistance(sorted, l.wavenumber + shift);
        if (d < 3 * tau) s += l.intensity * Math.exp(-(d * d) / (2 * tau * tau));
      }
      curve[k] = s / total;
    }
    return curve;
  });
  const at = (curve: Float64Array, shift: number) => {
    const t = (shift - gridStart) / h;
    const k = Math.floor(t);
    if (k < 0 || k >= nGrid - 1) return 0;
    return curve[k] + (t - k) * (curve[k + 1] - curve[k]);
  };
  const centre = groups.length ? groups.reduce((s, g) => s + g.members[0].constants.origin, 0) / groups.length : 0;
  let best = { score: -1, offset: 0, scale: 0 };
  for (let e = -6; e <= 6; e++) {
    const scale = e * 5e-5;
    for (let k = 0; k < nGrid; k++) {
      const offset = gridStart + k * h;
      if (Math.abs(offset) > maxOffset) continue;
      let s = 0;
      for (let g = 0; g < groups.length; g++) s += at(curves[g], offset + scale * (groups[g].members[0].constants.origin - centre));
      // On a tie, the smaller correction.
      if (
        s > best.score + 1e-9 ||
        (Math.abs(s - best.score) <= 1e-9 && Math.abs(offset) + Math.abs(scale) * 1e4 < Math.abs(best.offset) + Math.abs(best.scale) * 1e4)
      ) {
        best = { score: s, offset, scale };
      }
    }
  }
  const shifts = groups.map((g, i) => {
    const guess = best.offset + best.scale * (g.members[0].constants.origin - centre);
    let bestShift = guess;
    let bestScore = at(curves[i], guess);
    for (let d = -tau; d <= tau; d += h / 2) {
      const s = at(curves[i], guess + d);
      if (s > bestScore) {
        bestScore = s;
        bestShift = guess + d;
      }
    }
    return bestShift;
  });
  return { shifts, offset: best.offset, scale: best.scale };
}

// ------------------------------------------------------------------------------------------
// Assignment

interface Context {
  prep: PreparedSpectrum;
  shape: LineShapeReport;
  profile: LineProfile;
  /** All lines found so far (probing adds to it), sorted by wavenumber. */
  found: DetectedLine[];
  x0: number;
  x1: number;
}

function inRange(ctx: Context, w: number): boolean {
  return w > ctx.x0 + ctx.shape.fwhm && w < ctx.x1 - ctx.shape.fwhm;
}

function insertFound(ctx: Context, line: DetectedLine): void {
  const i = lowerBound(
    ctx.found.map((l) => l.wavenumber),
    line.wavenumber,
  );
  ctx.found.splice(i, 0, line);
}

/** Found lines within ±tol of w, nearest first. */
function near(ctx: Context, w: number, tol: number): DetectedLine[] {
  const out: DetectedLine[] = [];
  for (const l of ctx.found) {
    if (l.wavenumber < w - tol) continue;
    if (l.wavenumber > w + tol) break;
    out.push(l);
  }
  return out.sort((a, b) => Math.abs(a.wavenumber - w) - Math.abs(b.wavenumber - w));
}

/**
 * Looks for a line at a predicted position by fitting it together with the found lines around
 * it. Returns the new line (already in ctx.found) or undefined.
 */
function probe(ctx: Context, centre: number, tolerance: number): DetectedLine | undefined {
  const { prep, shape } = ctx;
  const neighbours = ctx.found.filter((l) => Math.abs(l.wavenumber - centre) < 2.5 * shape.fwhm);
  if (neighbours.some((l) => Math.abs(l.wavenumber - centre) < 0.35 * shape.fwhm)) return undefined;
  const idx = (w: number) => Math.min(prep.x.length - 1, Math.max(0, Math.round((w - prep.x[0]) / prep.step)));
  const centres = [centre, ...neighbours.map((l) => l.wavenumber)];
  const tops = centres.map((c) => prep.a[idx(c)]);
  const fitted = fitGroup(prep, ctx.profile, centres, tops, { fixed: [0], probed: centres.map((_, k) => k === 0) });
  const line = fitted.find((l) => l.probed);
  if (!line) return undefined;
  const noiseHere = prep.noise[idx(centre)];
  if (!(line.height > PROBE_ACCEPT_SNR * noiseHere) || !(line.height > PROBE_ACCEPT_SNR * line.heightError)) return undefined;
  if (Math.abs(line.wavenumber - centre) > tolerance) return undefined;
  // The neighbours were measured without this line; take their positions from the joint fit.
  for (const l of fitted) {
    if (l.probed) continue;
    const old = neighbours.reduce(
      (b, n) => (Math.abs(n.wavenumber - l.wavenumber) < Math.abs(b.wavenumber - l.wavenumber) ? n : b),
      neighbours[0],
    );
    if (old && Math.abs(old.wavenumber - l.wavenumber) < 0.3 * shape.fwhm) {
      old.wavenumber = l.wavenumber;
      old.sigma = l.sigma;
      old.height = l.height;
      old.heightError = l.heightError;
    }
  }
  insertFound(ctx, line);
  return line;
}

/** Isotope partners this many line widths apart or more are fitted as lines of their own. */
const RESOLVABLE_WIDTHS = 0.7;
/** Isotope partners closer than this many line widths blur into their main line. */
const BLENDED_DOUBLET_WIDTHS = 2.5;
/** A floor under every line's standard error in the band fit: positions are not better than this share of the line width. */
const POSITION_FLOOR_SHARE = 5e-5;

function fitWork(w: Work, species: Species, fwhm: number): void {
  const lines = [...w.assigned].map(([m, l]) => ({
    branch: (m > 0 ? 'R' : 'P') as 'P' | 'R',
    J: m > 0 ? m - 1 : -m,
    wavenumber: l.wavenumber,
    stdError: l.sigma,
  }));
  if (lines.length < MIN_FIT_LINES) {
    w.fit = null;
    w.covariance = null;
    return;
  }
  const r = fitAssignedLines(lines, species, { floor: POSITION_FLOOR_SHARE * fwhm });
  if (!('model' in r)) {
    w.fit = null;
    w.covariance = null;
    return;
  }
  w.fit = r;
  const c = r.coefficients;
  const sum = c[1];
  const diff = c[2];
  w.constants = { origin: c[0], B0: (sum - diff) / 2, Bupper: (sum + diff) / 2, D: c.length > 3 ? -c[3] / 4 : w.prediction.constants.D };
  // (A quadratic fit leaves D out; the published D stays in the predictions so high-J lines land right.)
  w.covariance = r.covariance;
}

/** Tolerance for assigning line m of this band. */
function tolerance(w: Work, m: number, ctx: Context, isotopeShift: number): number {
  const sigma = predictionError(w, m);
  const floor = Math.max(0.15, 0.35 * ctx.shape.fwhm);
  const first = Math.max(0.3, 0.6 * ctx.shape.fwhm);
  let tol = Number.isFinite(sigma) ? Math.max(floor, 4 * sigma) : first;
  tol = Math.min(tol, 0.3 * lineSpacing(w.constants, m));
  if (isotopeShift > 0) tol = Math.min(tol, 0.45 * isotopeShift);
  return tol;
}

/** Heights of assigned lines per unit predicted intensity (median), for expected heights of the rest. */
function updateHeightScale(w: Work): void {
  const ratios: number[] = [];
  for (const [m, l] of w.assigned) {
    const p = w.prediction.lines.find((x) => x.m === m);
    if (p && p.intensity > 0) ratios.push(l.height / p.intensity);
  }
  w.heightScale = ratios.length ? median(ratios) : 0;
}

/** Absorbance of a line above the local baseline, from its fitted depth. */
function peakAbsorbance(ctx: Context, l: DetectedLine): number {
  const i = Math.min(ctx.prep.x.length - 1, Math.max(0, Math.round((l.wavenumber - ctx.prep.x[0]) / ctx.prep.step)));
  const transmitted = 1 - ctx.prep.baseline[i];
  const ratio = 1 - l.height / Math.max(transmitted, 1e-6);
  return -Math.log10(Math.max(ratio, 1e-6));
}

function noiseAt(ctx: Context, wn: number): number {
  const i = Math.min(ctx.prep.x.length - 1, Math.max(0, Math.round((wn - ctx.prep.x[0]) / ctx.prep.step)));
  return ctx.prep.noise[i];
}

/** Isotope shift at running index m between the main isotopologue and a minor one (cm⁻¹). */
function shiftBetween(a: BandConstantsGuess, b: BandConstantsGuess, m: number): number {
  return Math.abs(linePosition(a, m) - linePosition(b, m));
}

function assignMain(w: Work, ctx: Context, minorShift: (m: number) => number, claimed: Set<DetectedLine>): void {
  const species = w.prediction.isotopologue.species;
  const lines = w.prediction.lines.filter((l) => inRange(ctx, l.wavenumber));
  const strongest = lines.reduce((m, l) => Math.max(m, l.intensity), 0);
  const stages = [0.3, 0.1, 0.03, 0.01, 0.003, 0];
  let stage = 0;
  for (let iter = 0; iter < 12; iter++) {
    const active = w.prediction.lines.filter((l) => l.intensity >= stages[stage] * strongest);
    const before = new Map(w.assigned);
    const proposals: { m: number; line: DetectedLine; distance: number }[] = [];
    for (const l of active) {
      const c = linePosition(w.constants, l.m);
      if (!inRange(ctx, c)) continue;
      const tol = tolerance(w, l.m, ctx, minorShift(l.m));
      const cands = near(ctx, c, tol).filter((x) => !claimed.has(x));
      if (cands.length) proposals.push({ m: l.m, line: cands[0], distance: Math.abs(cands[0].wavenumber - c) });
    }
    // One found line, one assignment: the nearest prediction keeps it.
    proposals.sort((a, b) => a.distance - b.distance);
    const taken = new Set<DetectedLine>();
    w.assigned = new Map();
    for (const p of proposals) {
      if (taken.has(p.line) || w.assigned.has(p.m)) continue;
      taken.add(p.line);
      w.assigned.set(p.m, p.line);
    }
    if (w.assigned.size >= MIN_FIT_LINES) fitWork(w, species, ctx.shape.fwhm);
    else if (w.assigned.size > 0) {
      // Too few to fit: move the origin by the median miss, so the next pass looks in the right place.
      const miss = median([...w.assigned].map(([m, l]) => l.wavenumber - linePosition(w.constants, m)));
      w.constants = { ...w.constants, origin: w.constants.origin + miss };
    }
    const same = before.size === w.assigned.size && [...w.assigned].every(([m, l]) => before.get(m) === l);
    if (same) {
      if (stage === stages.length - 1) break;
      stage++;
    }
  }
}

/** Probes every predicted line of the band not yet assigned whose expected height stands out of the noise. */
function probeMissing(w: Work, ctx: Context, minorShift: (m: number) => number, claimed: Set<DetectedLine>, partner?: Work): boolean {
  updateHeightScale(w);
  if (!(w.heightScale > 0) || !w.covariance) return false;
  let added = false;
  for (const l of w.prediction.lines) {
    if (w.assigned.has(l.m)) continue;
    if (partner && !partner.assigned.has(l.m)) continue;
    const c = linePosition(w.constants, l.m);
    if (!inRange(ctx, c)) continue;
    const expected = w.heightScale * l.intensity;
    if (expected < PROBE_MIN_SNR * noiseAt(ctx, c)) continue;
    const tol = tolerance(w, l.m, ctx, minorShift(l.m));
    const existing = near(ctx, c, tol).filter((x) => !claimed.has(x));
    if (existing.length) continue;
    const line = probe(ctx, c, tol);
    if (line) added = true;
  }
  return added;
}

function assignMinor(w: Work, main: Work, ctx: Context, claimed: Set<DetectedLine>): void {
  const species = w.prediction.isotopologue.species;
  const ratio = w.prediction.isotopologue.abundance / main.prediction.isotopologue.abundance;
  for (let iter = 0; iter < 4; iter++) {
    const before = new Map(w.assigned);
    w.assigned = new Map();
    const proposals: { m: number; line: DetectedLine; distance: number }[] = [];
    for (const l of w.prediction.lines) {
      const partner = main.assigned.get(l.m);
      if (!partner) continue; // never a lone line: the main isotopologue's line must be there too
      const c = linePosition(w.constants, l.m);
      if (!inRange(ctx, c)) continue;
      const shift = shiftBetween(w.constants, main.constants, l.m);
      const tol = tolerance(w, l.m, ctx, shift);
      for (const cand of near(ctx, c, tol)) {
        if (cand === partner || claimed.has(cand)) continue;
        // The height must be near the abundance ratio of the partner's (a factor of 4 either way).
        const r = cand.height / partner.height;
        if (r > 4 * ratio || r < ratio / 4) continue;
        // And it must be nearer to the predicted minor position than the partner is.
        proposals.push({ m: l.m, line: cand, distance: Math.abs(cand.wavenumber - c) });
        break;
      }
    }
    proposals.sort((a, b) => a.distance - b.distance);
    const taken = new Set<DetectedLine>();
    for (const p of proposals) {
      if (taken.has(p.line) || w.assigned.has(p.m)) continue;
      taken.add(p.line);
      w.assigned.set(p.m, p.line);
    }
    if (w.assigned.size >= MIN_FIT_LINES) fitWork(w, species, ctx.shape.fwhm);
    const same = before.size === w.assigned.size && [...w.assigned].every(([m, l]) => before.get(m) === l);
    if (same) break;
  }
}

/** Final fit with outliers left out one at a time; fills residuals and the report. */
function finalFit(w: Work, fwhm: number): void {
  const species = w.prediction.isotopologue.species;
  const floor = POSITION_FLOOR_SHARE * fwhm;
  for (let round = 0; round < 12; round++) {
    fitWork(w, species, fwhm);
    const f = w.fit;
    if (!f) return;
    const res = f.residuals;
    // Residuals in units of each line's own standard error, on the scale the fit itself shows.
    const scores = res.map((x) => Math.abs(x.residual) / Math.hypot(w.assigned.get(x.m)?.sigma ?? 0, floor));
    const spread = Math.max(1, 1.4826 * median(scores));
    let worst = -1;
    let worstScore = OUTLIER_SIGMA * spread;
    for (let i = 0; i < res.length; i++) {
      if (scores[i] > worstScore) {
        worstScore = scores[i];
        worst = i;
      }
    }
    if (worst < 0 || w.assigned.size - 1 < Math.max(MIN_FIT_LINES, Math.ceil(0.7 * res.length))) return;
    const bad = res[worst];
    const line = w.assigned.get(bad.m)!;
    w.assigned.delete(bad.m);
    w.excluded.push({
      branch: bad.branch,
      J: bad.J,
      wavenumber: line.wavenumber,
      reason: `${fmt(bad.residual, 3)} cm⁻¹ off the fit, ${(worstScore / spread).toFixed(0)} times its uncertainty`,
    });
    w.excludedLines.add(line);
  }
}

// ------------------------------------------------------------------------------------------

function estimate(value: number, variance: number): Estimate {
  return { value, stdError: Math.sqrt(Math.max(0, variance)) };
}

/**
 * Constants of the band from the chosen fit. With b = B′ + B₀ and c = B′ − B₀:
 * fundamental (B′ = B₁ = Bₑ − 3αₑ/2): αₑ = −c, Bₑ = b/2 − c;
 * overtone (B′ = B₂ = Bₑ − 5αₑ/2): αₑ = −c/2, Bₑ = b/2 − 3c/4.
 */
/** ν̃₀, B₀, B′, Bₑ, αₑ (and D) from the polynomial coefficients [ν̃₀, b = B′+B₀, c = B′−B₀, −4D] and their covariance. */
function constantsOf(coefficients: number[], V: number[][], overtone: boolean) {
  const [a, b, c] = coefficients;
  const ka = overtone ? 0.5 : 1;
  const kc = overtone ? 0.75 : 1;
  return {
    nu0: estimate(a, V[0][0]),
    B0: estimate((b - c) / 2, (V[1][1] + V[2][2] - 2 * V[1][2]) / 4),
    Bupper: estimate((b + c) / 2, (V[1][1] + V[2][2] + 2 * V[1][2]) / 4),
    alphaE: estimate(-ka * c, ka * ka * V[2][2]),
    Be: estimate(b / 2 - kc * c, V[1][1] / 4 + kc * kc * V[2][2] - kc * V[1][2]),
    D: coefficients.length > 3 ? estimate(-coefficients[3] / 4, V[3][3] / 16) : undefined,
  };
}

function fitReport(w: Work): BandFitReport | null {
  const f = w.fit;
  if (!f) return null;
  const overtone = w.prediction.vUpper === 2;
  const { alphaE, Be } = constantsOf(f.coefficients, f.covariance, overtone);
  let re: Estimate | undefined;
  if (f.r0 && Be.value > 0 && f.B0.value > 0) {
    const value = f.r0.value * Math.sqrt(f.B0.value / Be.value);
    re = { value, stdError: (value * Be.stdError) / (2 * Be.value) };
  }
  return {
    model: f.model,
    modelNote: f.modelNote,
    nu0: f.nu0,
    B0: f.B0,
    Bupper: f.Bupper,
    Be,
    alphaE,
    D: f.D,
    re,
    r0: f.r0,
    rms: f.rms,
    otherModelRms: f.otherModelRms,
    alternative: f.otherModel
      ? { model: f.otherModel.model, ...constantsOf(f.otherModel.coefficients, f.otherModel.covariance, overtone) }
      : undefined,
    lineCount: f.lineCount,
    degreesOfFreedom: f.degreesOfFreedom,
  };
}

/**
 * A line left out of a fit as an outlier is often two lines in one: another band or
 * isotopologue predicts a line within a fraction of the line width. Say which.
 */
function nameBlends(all: Work[], ctx: Context): void {
  for (const w of all) {
    for (const e of w.excluded) {
      if (/blended with|also a line of/.test(e.reason)) continue;
      let best: { w: Work; m: number; d: number } | undefined;
      for (const o of all) {
        if (o === w || o.status === 'unresolved') continue;
        for (const p of o.prediction.lines) {
          const d = Math.abs(linePosition(o.constants, p.m) - e.wavenumber);
          if (d < 0.5 * ctx.shape.fwhm && (!best || d < best.d)) best = { w: o, m: p.m, d };
        }
      }
      if (best) {
        const lab = label({ branch: best.m > 0 ? 'R' : 'P', J: best.m > 0 ? best.m - 1 : -best.m });
        e.reason += `; probably blended with ${best.w.prediction.isotopologue.display} ${BAND_LABEL[best.w.prediction.band]} ${lab}, predicted ${fmt(best.d, 3)} cm⁻¹ away`;
      }
    }
  }
}

/** The calibration search, then every group's assignment (main isotopologue, then the others). */
function assignGroups(ctx: Context, active: Group[], maxOffset: number): { group: Group; works: Work[] }[] {
  const out: { group: Group; works: Work[] }[] = [];
  const shift = searchShift(active, ctx.found, ctx.shape.fwhm, maxOffset);
  active.forEach((g, gi) => {
    const groupShift = shift.shifts[gi];
    const ws: Work[] = g.members.map((p) => ({
      prediction: p,
      constants: { ...p.constants, origin: p.constants.origin + groupShift },
      covariance: null,
      assigned: new Map(),
      excluded: [],
      excludedLines: new Set(),
      warnings: [],
      status: 'not-found',
      fit: null,
      heightScale: 0,
    }));
    const main = ws[0];
    const minors = ws.slice(1);
    const resolvable = (m: Work) => shiftBetween(m.constants, main.constants, 1) > RESOLVABLE_WIDTHS * ctx.shape.fwhm;
    const nearestMinorShift = (mIndex: number) => {
      let s = Infinity;
      for (const mw of minors) if (resolvable(mw)) s = Math.min(s, shiftBetween(mw.constants, main.constants, mIndex));
      return Number.isFinite(s) ? s : 0;
    };
    const none = new Set<DetectedLine>();
    assignMain(main, ctx, nearestMinorShift, none);
    if (probeMissing(main, ctx, nearestMinorShift, none)) assignMain(main, ctx, nearestMinorShift, none);
    for (const mw of minors) {
      if (!resolvable(mw)) {
        mw.status = 'unresolved';
        const s = shiftBetween(mw.constants, main.constants, 1);
        mw.warnings.push(
          `Its lines lie only about ${fmt(s, 2)} cm⁻¹ from those of ${main.prediction.isotopologue.display}, less than the line width (${fmt(ctx.shape.fwhm, 2)} cm⁻¹): the two are recorded as one line, so the ${main.prediction.isotopologue.display} fit describes the blend.`,
        );
        main.warnings.push(
          `The ${mw.prediction.isotopologue.display} lines are not resolved from these (about ${fmt(s, 2)} cm⁻¹ apart): the fitted constants are those of the blend.`,
        );
        continue;
      }
      // Start from the main isotopologue's fit, moved by the published isotope relation.
      const ref = mw.prediction.constants;
      const refMain = main.prediction.constants;
      mw.constants = {
        origin: main.constants.origin * (ref.origin / refMain.origin),
        B0: main.constants.B0 * (ref.B0 / refMain.B0),
        Bupper: main.constants.Bupper * (ref.Bupper / refMain.Bupper),
        D: main.constants.D * (refMain.D > 0 ? ref.D / refMain.D : 1),
      };
      const own = (m: number) => shiftBetween(mw.constants, main.constants, m);
      const taken = new Set<DetectedLine>(main.assigned.values());
      assignMinor(mw, main, ctx, taken);
      if (probeMissing(mw, ctx, own, taken, main)) assignMinor(mw, main, ctx, taken);
    }
    out.push({ group: g, works: ws });
  });

  return out;
}

/** One group per named molecule and band, its isotopologues most abundant first. */
function bandGroups(isotopologues: Isotopologue[], bandKinds: BandKind[]): Group[] {
  const groups: Group[] = [];
  const byMolecule = new Map<string, Isotopologue[]>();
  for (const iso of isotopologues) byMolecule.set(iso.molecule, [...(byMolecule.get(iso.molecule) ?? []), iso]);
  for (const [molecule, isos] of byMolecule) {
    for (const band of bandKinds) {
      const members = isos.map((i) => predictBand(i, band)).filter((p): p is BandPrediction => p !== undefined);
      if (members.length === 0) continue;
      groups.push({ molecule, band, members, extent: bandExtent(members[0]) });
    }
  }
  return groups;
}

type GroupWorks = { group: Group; works: Work[] }[];

/**
 * Where the first assignment puts the partners of blended isotope doublets: every partner's
 * place, and the strong main lines whose partner is not assigned yet (main line, partner).
 */
function blendedPartners(works: GroupWorks, ctx: Context): { pairs: { main: number; partner: number }[]; partnerPlaces: number[] } {
  const pairs: { main: number; partner: number }[] = [];
  const partnerPlaces: number[] = [];
  for (const { works: ws } of works) {
    const main = ws[0];
    for (const mw of ws.slice(1)) {
      if (mw.prediction.isotopologue.abundance < 0.1 * main.prediction.isotopologue.abundance) continue;
      const sep = shiftBetween(mw.constants, main.constants, 1);
      if (!(sep < BLENDED_DOUBLET_WIDTHS * ctx.shape.fwhm) || !(sep > 0.3 * ctx.shape.fwhm)) continue;
      for (const [m, l] of main.assigned) {
        const partner = l.wavenumber - (linePosition(main.constants, m) - linePosition(mw.constants, m));
        partnerPlaces.push(partner);
        if (l.snr > 50 && !mw.assigned.has(m)) pairs.push({ main: l.wavenumber, partner });
      }
    }
  }
  return { pairs, partnerPlaces };
}

/**
 * Every active group assigned. A blended isotope doublet (a resolution of 1–2 cm⁻¹ puts H³⁷Cl on
 * the flank of H³⁵Cl) makes the instrument's shape look broader than it is and hides the weaker
 * line. With the first assignment the partners' places are known: measure the shape again with
 * them, look for them there, assign again (ctx then holds the new shape and lines).
 */
function assignAll(ctx: Context, active: Group[], maxOffset: number): GroupWorks {
  const first = assignGroups(ctx, active, maxOffset);
  const { pairs, partnerPlaces } = blendedPartners(first, ctx);
  if (pairs.length < 3) return first;
  pairs.sort((u, v) => Math.abs(u.main - u.partner) - Math.abs(v.main - v.partner));
  const again = remeasureShape(ctx.prep, pairs.slice(0, 12), ctx.shape.fwhm);
  if (!again) return first;
  const at = ctx.found.filter((l) => !l.probed).map((l) => ({ wavenumber: l.wavenumber, probed: false }));
  for (const w of partnerPlaces)
    if (!at.some((x) => Math.abs(x.wavenumber - w) < 0.35 * again.shape.fwhm)) at.push({ wavenumber: w, probed: true });
  ctx.found = refineLines(ctx.prep, again.profile, at);
  ctx.shape = again.shape;
  ctx.profile = again.profile;
  return assignGroups(ctx, active, maxOffset);
}

/** A line claimed by two bands belongs to neither: it is left out of both, with the reason. */
function leaveOutSharedLines(works: GroupWorks): void {
  const claimedBy = new Map<DetectedLine, Work[]>();
  for (const { works: ws } of works)
    for (const w of ws) for (const l of w.assigned.values()) claimedBy.set(l, [...(claimedBy.get(l) ?? []), w]);
  for (const [line, owners] of claimedBy) {
    if (owners.length < 2) continue;
    for (const w of owners) {
      for (const [m, l] of w.assigned) {
        if (l !== line) continue;
        w.assigned.delete(m);
        const others = owners.filter((o) => o !== w).map((o) => `${o.prediction.isotopologue.display} ${o.prediction.band}`);
        const lab = { branch: m > 0 ? 'R' : 'P', J: m > 0 ? m - 1 : -m } as const;
        w.excluded.push({
          ...lab,
          wavenumber: line.wavenumber,
          reason: `also a line of the ${others.join(', ')}; a shared line is left out of both fits`,
        });
        w.excludedLines.add(line);
      }
    }
  }
}

/** Final fits of every band (all of them first, so every band's predictions are its best), and each band's status. */
function fitAll(works: GroupWorks, ctx: Context): void {
  for (const { works: ws } of works) {
    for (const w of ws) {
      if (w.status === 'unresolved') continue;
      finalFit(w, ctx.shape.fwhm);
      w.status = w.fit ? 'fitted' : w.assigned.size > 0 ? 'too-few-lines' : 'not-found';
    }
  }
}

/** The band's assigned lines in wavenumber order, with their residuals from the final fit. */
function assignedLinesOf(w: Work, ctx: Context): AssignedLine[] {
  const residualOf = new Map<number, number>();
  if (w.fit) for (const r of w.fit.residuals) residualOf.set(r.m, r.residual);
  return [...w.assigned]
    .sort((a, b) => a[1].wavenumber - b[1].wavenumber)
    .map(([m, l]) => ({
      branch: m > 0 ? 'R' : 'P',
      J: m > 0 ? m - 1 : -m,
      wavenumber: l.wavenumber,
      intensity: peakAbsorbance(ctx, l),
      stdError: l.sigma,
      residual: residualOf.get(m) ?? 0,
      probed: l.probed,
    }));
}

/** Lines the band should show within the recorded range, as strong as lines that were found, but not found. */
function missingLines(w: Work, ctx: Context): string[] {
  const missing: string[] = [];
  if (w.status !== 'fitted' && w.status !== 'too-few-lines') return missing;
  const weakestFound = Math.min(...[...w.assigned].map(([m]) => w.prediction.lines.find((p) => p.m === m)?.intensity ?? Infinity));
  for (const p of w.prediction.lines) {
    if (w.assigned.has(p.m) || w.excluded.some((e) => (e.branch === 'R' ? e.J + 1 : -e.J) === p.m)) continue;
    const c = linePosition(w.constants, p.m);
    if (!inRange(ctx, c) || p.intensity < weakestFound) continue;
    missing.push(label({ branch: p.m > 0 ? 'R' : 'P', J: p.m > 0 ? p.m - 1 : -p.m }));
  }
  return missing;
}

/** What a fitted band's report adds to its warnings: few lines, lines found by probing, lines left out. */
function fitWarnings(w: Work, report: BandFitReport, lines: AssignedLine[]): string[] {
  const warnings: string[] = [];
  if (report.lineCount < 8) warnings.push(`Only ${report.lineCount} lines were fitted: the standard errors are rough.`);
  const probedCount = lines.filter((l) => l.probed).length;
  if (probedCount)
    warnings.push(
      `${probedCount} weak line${probedCount === 1 ? ' was' : 's were'} found by looking where the band predicts ${probedCount === 1 ? 'it' : 'them'}.`,
    );
  if (w.excluded.length)
    warnings.push(`Left out of the fit: ${w.excluded.map((e) => `${label(e)} at ${fmt(e.wavenumber, 3)} cm⁻¹ (${e.reason})`).join('; ')}.`);
  return warnings;
}

/** For a minor isotopologue not found: whether its lines would have been too weak to find, beside the main one's. */
function tooWeakWarning(w: Work, main: Work, ctx: Context): string | null {
  updateHeightScale(main);
  const strongestMinor = Math.max(...w.prediction.lines.map((l) => l.intensity));
  const expected = main.heightScale * strongestMinor;
  const noise = noiseAt(ctx, w.prediction.constants.origin);
  if (main.assigned.size > 0 && expected < 3 * noise)
    return `Its strongest lines would be about ${fmt(expected / noise, 1)} times the noise, too weak to be found.`;
  return null;
}

type FittedOrigin = { label: string; fitted: Estimate; reference: number; referenceUncertainty: number };

/**
 * One band's analysis from its work, after the final fits. Adds the lines it used or left out to
 * `claimed`, and its fitted origin (when fitted) to `fittedOrigins` for the calibration report.
 */
function bandAnalysisOf(w: Work, main: Work, ctx: Context, claimed: Set<DetectedLine>, fittedOrigins: FittedOrigin[]): BandAnalysis {
  const iso = w.prediction.isotopologue;
  for (const l of w.assigned.values()) claimed.add(l);
  for (const l of w.excludedLines) claimed.add(l);
  const report = w.status === 'fitted' ? fitReport(w) : null;
  const lines = assignedLinesOf(w, ctx);
  const bandLabel = `${iso.display} ${BAND_LABEL[w.prediction.band]}`;
  const extent = bandExtent(w.prediction);
  const warnings = [...w.warnings];
  updateHeightScale(w);
  const missing = missingLines(w, ctx);
  if (missing.length) warnings.push(`Not found although as strong as lines that were: ${missing.join(', ')}.`);
  let status: BandStatus = w.status;
  if (extent[1] < ctx.x0 || extent[0] > ctx.x1) {
    status = 'outside-range';
    warnings.length = 0;
  } else if (extent[0] < ctx.x0 || extent[1] > ctx.x1) {
    warnings.push(
      `Part of the band (${fmt(extent[0], 0)}–${fmt(extent[1], 0)} cm⁻¹) lies outside the recorded range (${fmt(ctx.x0, 0)}–${fmt(ctx.x1, 0)} cm⁻¹).`,
    );
  }
  if (status === 'fitted' && report) {
    warnings.push(...fitWarnings(w, report, lines));
    fittedOrigins.push({
      label: bandLabel,
      fitted: report.nu0,
      reference: w.prediction.termOrigin.value,
      referenceUncertainty: w.prediction.termOrigin.uncertainty,
    });
  }
  if (status === 'not-found' && iso.rank > 0) {
    const weak = tooWeakWarning(w, main, ctx);
    if (weak) warnings.push(weak);
  }
  const outside = status === 'outside-range';
  return {
    isotopologue: iso.formula,
    display: iso.display,
    molecule: iso.molecule,
    band: w.prediction.band,
    label: bandLabel,
    status,
    predictedOrigin: w.prediction.constants.origin,
    predictedRange: extent,
    lines: outside ? [] : lines,
    missing: outside ? [] : missing,
    excluded: w.excluded,
    fit: status === 'fitted' ? report : null,
    warnings,
  };
}

/** The bands of groups left out of the search because they lie far outside the range. */
function outsideRangeAnalyses(groups: Group[]): BandAnalysis[] {
  return groups.flatMap((g) =>
    g.members.map((p): BandAnalysis => ({
      isotopologue: p.isotopologue.formula,
      display: p.isotopologue.display,
      molecule: p.isotopologue.molecule,
      band: p.band,
      label: `${p.isotopologue.display} ${BAND_LABEL[p.band]}`,
      status: 'outside-range',
      predictedOrigin: p.constants.origin,
      predictedRange: bandExtent(p),
      lines: [],
      missing: [],
      excluded: [],
      fit: null,
      warnings: [],
    })),
  );
}

/** Plain words for bands the spectrum does not show. */
function bandProblems(analyses: BandAnalysis[], x0: number, x1: number): string[] {
  const problems: string[] = [];
  for (const b of analyses) {
    if (b.status === 'outside-range') {
      problems.push(
        `The ${b.label} lies near ${fmt(b.predictedOrigin, 0)} cm⁻¹, outside the recorded range (${fmt(x0, 0)}–${fmt(x1, 0)} cm⁻¹).`,
      );
    } else if (b.status === 'not-found' && !b.warnings.some((w) => /too weak/.test(w))) {
      problems.push(
        `No lines of the ${b.label} (near ${fmt(b.predictedOrigin, 0)} cm⁻¹) were found, although the recorded range covers it.`,
      );
    } else if (b.status === 'too-few-lines') {
      problems.push(
        `Only ${b.lines.length} line${b.lines.length === 1 ? '' : 's'} of the ${b.label} ${b.lines.length === 1 ? 'was' : 'were'} found; at least ${MIN_FIT_LINES} are needed for a fit.`,
      );
    }
  }
  return problems;
}

export function analyseSpectrum(spectrum: Spectrum, options: AnalyseOptions): SpectrumAnalysis {
  const problems: string[] = [];
  const names = [...new Set((options.species ?? []).map((s) => String(s).trim()).filter(Boolean))];
  const { isotopologues, problems: nameProblems } = isotopologuesOfAll(names);
  problems.push(...nameProblems);
  const bandKinds = options.bands?.length ? [...new Set(options.bands)] : (['fundamental', 'overtone'] as BandKind[]);
  const maxOffset = Math.min(100, Math.max(0, options.maxOffset ?? 25));

  // 1. Lines found and measured on the spectrum.
  const prep = prepareSpectrum(spectrum);
  const search = detectLines(prep);
  const x0 = prep.x[0];
  const x1 = prep.x[prep.x.length - 1];
  const ctx: Context = { prep, shape: search.shape, profile: search.profile, found: search.lines.slice(), x0, x1 };
  if (prep.resampled) problems.push('The spectrum’s points are not evenly spaced; they were put on an even grid before the analysis.');

  // 2–5. Bands predicted, assigned near the recorded range, fitted.
  const groups = bandGroups(isotopologues, bandKinds);
  const active = groups.filter((g) => g.extent[1] + maxOffset > x0 && g.extent[0] - maxOffset < x1);
  const works = assignAll(ctx, active, maxOffset);
  leaveOutSharedLines(works);
  fitAll(works, ctx);
  nameBlends(
    works.flatMap((g) => g.works),
    ctx,
  );

  // Reports, band by band.
  const fittedOrigins: FittedOrigin[] = [];
  const claimed = new Set<DetectedLine>();
  const analyses: BandAnalysis[] = [];
  for (const { works: ws } of works) for (const w of ws) analyses.push(bandAnalysisOf(w, ws[0], ctx, claimed, fittedOrigins));
  analyses.push(...outsideRangeAnalyses(groups.filter((g) => !active.includes(g))));
  problems.push(...bandProblems(analyses, x0, x1));

  // 6. Calibration; 7. vibrational constants.
  const calibration = calibrationReport(fittedOrigins);
  if (calibration?.detected) problems.push(calibration.message);

  const unassigned: UnassignedLine[] = ctx.found
    .filter((l) => !claimed.has(l) && l.snr >= UNASSIGNED_MIN_SNR && !l.probed)
    .map((l) => ({ wavenumber: l.wavenumber, intensity: peakAbsorbance(ctx, l), snr: l.snr }));

  const vibration = analyseVibration(analyses, isotopologues, calibration);
  const fitted = analyses.filter((b) => b.status === 'fitted').length;
  if (names.length === 0) problems.push('No molecule was named; say which molecules are in the cell (for example HCl and DCl).');
  else if (fitted === 0 && isotopologues.length > 0) problems.push('No band of the named molecules could be fitted in this spectrum.');

  const noiseMedian = median(Array.from(prep.noise.filter((_, i) => i % 16 === 0)));
  return {
    ok: fitted > 0,
    species: names,
    isotopologues: isotopologues.map((i) => ({ formula: i.formula, display: i.display, molecule: i.molecule, abundance: i.abundance })),
    range: { from: x0, to: x1, points: prep.x.length, step: prep.step },
    lineShape: ctx.shape,
    noise: noiseMedian,
    bands: analyses,
    unassigned,
    calibration,
    vibration,
    problems,
  };
}

/**
 * ν̃(recorded) − ν̃(published) for each fitted band, fitted as offset + ε·(ν̃ − ν̃ref): with
 * bands spread over ≥ 1000 cm⁻¹ both parts, otherwise the offset alone (weighted mean).
 */
function calibrationReport(
  bands: { label: string; fitted: Estimate; reference: number; referenceUncertainty: number }[],
): CalibrationReport | null {
  if (bands.length === 0) return null;
  const y = bands.map((b) => b.fitted.value - b.reference);
  const s = bands.map((b) => Math.hypot(b.fitted.stdError, b.referenceUncertainty));
  const w = s.map((v) => 1 / (v * v));
  const sw = w.reduce((a, b) => a + b, 0);
  const ref = bands.reduce((acc, b, i) => acc + w[i] * b.reference, 0) / sw;
  const spread = Math.max(...bands.map((b) => b.reference)) - Math.min(...bands.map((b) => b.reference));
  // The offset alone: the weighted mean difference.
  let chi2 = 0;
  const mean = y.reduce((acc, v, i) => acc + w[i] * v, 0) / sw;
  for (let i = 0; i < bands.length; i++) chi2 += w[i] * (y[i] - mean) ** 2;
  const meanOffset: Estimate = { value: mean, stdError: Math.sqrt(Math.max(1, chi2 / Math.max(1, bands.length - 1)) / sw) };
  // Offset and scale together, when the bands span enough of the spectrum to tell them apart.
  let fitted: { offset: Estimate; scale: Estimate } | undefined;
  if (bands.length >= 3 && spread >= 1000) {
    let sxx = 0;
    let sxy = 0;
    let sy = 0;
    for (let i = 0; i < bands.length; i++) {
      const dx = bands[i].reference - ref;
      sxx += w[i] * dx * dx;
      sxy += w[i] * dx * y[i];
      sy += w[i] * y[i];
    }
    const a = sy / sw;
    const eps = sxy / sxx;
    let c2 = 0;
    for (let i = 0; i < bands.length; i++) c2 += w[i] * (y[i] - a - eps * (bands[i].reference - ref)) ** 2;
    const inflate = Math.max(1, c2 / Math.max(1, bands.length - 2));
    fitted = { offset: { value: a, stdError: Math.sqrt(inflate / sw) }, scale: { value: eps, stdError: Math.sqrt(inflate / sxx) } };
  }
  const scaleEffect = fitted ? Math.abs(fitted.scale.value) * Math.max(...bands.map((b) => Math.abs(b.reference - ref))) : 0;
  const scaleClear = fitted !== undefined && Math.abs(fitted.scale.value) > 3 * fitted.scale.stdError && scaleEffect > 0.2;
  const offset = scaleClear && fitted ? fitted.offset : meanOffset;
  const scale = scaleClear && fitted ? fitted.scale : null;
  const offsetClear = Math.abs(offset.value) > Math.max(3 * offset.stdError, 0.2);
  const detected = offsetClear || scaleClear;
  const parts: string[] = [];
  if (offsetClear)
    parts.push(
      `shifted by ${offset.value > 0 ? '+' : '−'}${fmt(Math.abs(offset.value), 2)} ± ${fmt(offset.stdError, 2)} cm⁻¹${scale ? ` at ${fmt(ref, 0)} cm⁻¹` : ''}`,
    );
  if (scale)
    parts.push(
      `stretched by ${(scale.value * 1e6).toFixed(0)} ± ${(scale.stdError * 1e6).toFixed(0)} parts per million (${fmt(scaleEffect, 2)} cm⁻¹ at the ends of the bands)`,
    );
  const message = detected
    ? `The wavenumber scale of this spectrum appears ${parts.join(' and ')} against the published band origins (${bands.length} band${bands.length === 1 ? '' : 's'} compared). The fitted band origins are given as recorded, not corrected; check the instrument's calibration.`
    : `The band origins agree with the published ones (${bands.length} band${bands.length === 1 ? '' : 's'} compared): no calibration error is seen.`;
  return {
    offset,
    scale,
    fittedScale: fitted?.scale,
    referenceWavenumber: ref,
    bandsCompared: bands.length,
    detected,
    message,
    perBand: bands.map((b, i) => ({ label: b.label, difference: y[i], stdError: b.fitted.stdError })),
  };
}
