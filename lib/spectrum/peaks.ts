/**
 * Peak picking on an absorption spectrum, and the check of a student's reported line
 * positions against the peaks of their own spectrum.
 */
import type { Spectrum } from './types';

export interface Peak {
  /** Interpolated position of the maximum, cm⁻¹. */
  wavenumber: number;
  /** Interpolated absorbance at the maximum. */
  height: number;
  /** Height above the higher of the two lowest points separating it from higher ground. */
  prominence: number;
  /** Index of the sampled maximum in the spectrum. */
  index: number;
  /** Local point spacing, cm⁻¹. */
  spacing: number;
}

export interface PickPeaksOptions {
  /** Smallest prominence kept, in absorbance; by default 5 noise σ or 1 % of the range, whichever is larger. */
  minProminence?: number;
  /** Keep at most this many, the most prominent. */
  maxPeaks?: number;
}

/**
 * Decadic absorbance from the spectrum: A = −log₁₀ T for transmittance (as a fraction;
 * values above 1.5 are taken as percent). Non-positive T is clipped to 10⁻⁶ (A = 6).
 */
export function toAbsorbance(spectrum: Spectrum): number[] {
  if (spectrum.yKind === 'absorbance') return spectrum.y.slice();
  let max = -Infinity;
  for (const v of spectrum.y) if (v > max) max = v;
  const scale = max > 1.5 ? 0.01 : 1;
  return spectrum.y.map((t) => -Math.log10(Math.max(t * scale, 1e-6)));
}

/** Robust noise σ from point-to-point differences (median absolute deviation). */
export function noiseSigma(a: ArrayLike<number>): number {
  const n = a.length;
  if (n < 3) return 0;
  const d = new Float64Array(n - 1);
  for (let i = 1; i < n; i++) d[i - 1] = Math.abs(a[i] - a[i - 1]);
  d.sort();
  // For white noise the difference has σ√2; MAD/0.6745 estimates σ of a normal deviate.
  return d[Math.floor(d.length / 2)] / 0.6745 / Math.SQRT2;
}

/** Vertex of the parabola through three points (x may be unevenly spaced). */
function parabolicVertex(x0: number, y0: number, x1: number, y1: number, x2: number, y2: number): [number, number] {
  const d1 = (y1 - y0) / (x1 - x0);
  const d2 = (y2 - y1) / (x2 - x1);
  const c = (d2 - d1) / (x2 - x0);
  if (!(c < 0)) return [x1, y1];
  const b = d1 - c * (x0 + x1);
  let xv = -b / (2 * c);
  // Stay between the neighbours; a vertex outside means the top is not a peak shape.
  xv = Math.min(Math.max(xv, Math.min(x0, x2)), Math.max(x0, x2));
  const yv = y1 + (xv - x1) * (d1 + c * (xv - x0));
  return [xv, yv];
}

/**
 * For each index, the lowest value between it and the nearest strictly higher point on
 * one side (or the end of the data), in one pass with a stack.
 */
function baseMinima(a: ArrayLike<number>, order: number[]): Float64Array {
  const n = order.length;
  const out = new Float64Array(n);
  const stack: number[] = [];
  const stackMin: number[] = [];
  for (let k = 0; k < n; k++) {
    const i = order[k];
    let m = a[i];
    while (stack.length > 0 && a[stack[stack.length - 1]] <= a[i]) {
      m = Math.min(m, stackMin[stackMin.length - 1]);
      stack.pop();
      stackMin.pop();
    }
    out[k] = m;
    stack.push(i);
    stackMin.push(m);
  }
  return out;
}

/** Peaks (maxima of absorbance), sorted by wavenumber. */
export function pickPeaks(spectrum: Spectrum, options: PickPeaksOptions = {}): Peak[] {
  const { x } = spectrum;
  const a = toAbsorbance(spectrum);
  const n = a.length;
  if (n < 3) return [];
  const forward = Array.from({ length: n }, (_, i) => i);
  const left = baseMinima(a, forward);
  const right = baseMinima(a, forward.slice().reverse()).reverse();
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of a) {
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  const minProminence = options.minProminence ?? Math.max(5 * noiseSigma(a), 0.01 * (hi - lo));
  const peaks: Peak[] = [];
  let i = 1;
  while (i < n - 1) {
    if (a[i] > a[i - 1]) {
      // Walk across a flat top and take its middle.
      let j = i;
      while (j + 1 < n && a[j + 1] === a[i]) j++;
      if (j + 1 < n && a[j + 1] < a[i]) {
        const top = Math.floor((i + j) / 2);
        const prominence = a[top] - Math.max(left[i], right[j]);
        if (prominence >= minProminence && prominence > 0) {
          let wavenumber = x[top];
          let height = a[top];
          if (i === j) [wavenumber, height] = parabolicVertex(x[i - 1], a[i - 1], x[i], a[i], x[i + 1], a[i + 1]);
          else wavenumber = (x[i] + x[j]) / 2;
          peaks.push({ wavenumber, height, prominence, index: top, spacing: Math.abs(x[top + 1] - x[top - 1]) / 2 });
        }
      }
      i = j + 1;
    } else i++;
  }
  const maxPeaks = options.maxPeaks ?? 500;
  if (peaks.length > maxPeaks) {
    peaks.sort((p, q) => q.prominence - p.prominence);
    peaks.length = maxPeaks;
  }
  return peaks.sort((p, q) => p.wavenumber - q.wavenumber);
}

export interface ReportedLine {
  wavenumber: number;
  branch?: 'P' | 'R';
  J?: number;
}

export interface LineCheck<L extends ReportedLine = ReportedLine> {
  line: L;
  /** Nearest picked peak, or null when there are none. */
  nearest: Peak | null;
  /** Reported minus peak position, cm⁻¹. */
  distance: number | null;
  matched: boolean;
  /** Indexes of other reported lines matched to the same peak. */
  sharesPeakWith: number[];
}

export interface CompareOptions {
  /** Largest |reported − peak| that counts as a match, cm⁻¹; default max(0.5, 1.5 × point spacing). */
  tolerance?: number;
  /** A peak with at least this share of the strongest prominence must appear in the list. */
  strongShare?: number;
}

export interface LinePeakComparison<L extends ReportedLine = ReportedLine> {
  lines: LineCheck<L>[];
  /** Strong peaks of the spectrum that no reported line matches. */
  missing: Peak[];
  summary: {
    reported: number;
    matched: number;
    unmatched: number;
    strongPeaks: number;
    missing: number;
    /** The tolerance used, cm⁻¹. */
    tolerance: number;
  };
}

function median(v: number[]): number {
  if (v.length === 0) return 0;
  const s = v.slice().sort((p, q) => p - q);
  return s[Math.floor(s.length / 2)];
}

function nearestIndex(sorted: Peak[], w: number): number {
  let lo = 0;
  let hi = sorted.length - 1;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (sorted[mid].wavenumber < w) lo = mid + 1;
    else hi = mid;
  }
  if (lo > 0 && Math.abs(sorted[lo - 1].wavenumber - w) <= Math.abs(sorted[lo].wavenumber - w)) return lo - 1;
  return lo;
}

/**
 * Compares reported positions with the peaks picked from the same spectrum. Pass the
 * lines of every isotopologue recorded in that spectrum together (H³⁵Cl and H³⁷Cl share
 * one cell), otherwise the other isotopologue's lines come back as missing.
 */
export function compareLinesToPeaks<L extends ReportedLine>(
  lines: L[],
  peaks: Peak[],
  options: CompareOptions = {},
): LinePeakComparison<L> {
  const sorted = peaks.slice().sort((p, q) => p.wavenumber - q.wavenumber);
  const tolerance = options.tolerance ?? Math.max(0.5, 1.5 * median(sorted.map((p) => p.spacing)));
  const strongShare = options.strongShare ?? 0.25;
  const byPeak = new Map<Peak, number[]>();
  const checks: LineCheck<L>[] = lines.map((line, k) => {
    if (sorted.length === 0) return { line, nearest: null, distance: null, matched: false, sharesPeakWith: [] };
    const nearest = sorted[nearestIndex(sorted, line.wavenumber)];
    const distance = line.wavenumber - nearest.wavenumber;
    const matched = Math.abs(distance) <= tolerance;
    if (matched) byPeak.set(nearest, [...(byPeak.get(nearest) ?? []), k]);
    return { line, nearest, distance, matched, sharesPeakWith: [] };
  });
  for (const group of byPeak.values()) {
    if (group.length < 2) continue;
    for (const k of group) checks[k].sharesPeakWith = group.filter((g) => g !== k);
  }
  const strongest = sorted.reduce((m, p) => Math.max(m, p.prominence), 0);
  const strong = sorted.filter((p) => p.prominence >= strongShare * strongest);
  const missing = strong.filter((p) => !byPeak.has(p));
  const matchedCount = checks.filter((c) => c.matched).length;
  return {
    lines: checks,
    missing,
    summary: {
      reported: lines.length,
      matched: matchedCount,
      unmatched: lines.length - matchedCount,
      strongPeaks: strong.length,
      missing: missing.length,
      tolerance,
    },
  };
}
