/**
 * Tolerance bands and verdicts.
 *
 * A band is given as an absolute half-width (in `unit`, converted to the quantity's SI unit),
 * a relative half-width (fraction of the expected value), or a number of combined standard
 * uncertainties. When several are given the widest applies (each describes an acceptable
 * deviation; a number that satisfies any of them is acceptable). The inner band earns full
 * marks; the optional outer `partial` band earns partial credit.
 */
import { lookupUnit, toSI, type Dimension } from './units';

export interface ToleranceBand {
  absolute?: number;
  relative?: number;
  sigma?: number;
}

export interface Tolerance extends ToleranceBand {
  /** Unit of `absolute` (and of partial.absolute); SI of the quantity when omitted. */
  unit?: string;
  partial?: ToleranceBand;
}

export type Verdict = 'within' | 'partial' | 'outside' | 'not-checked';

export interface Judgement {
  verdict: Verdict;
  /** reported − expected, SI. */
  deviation: number;
  /** deviation / |expected|. */
  relativeDeviation: number;
  /** Half-widths actually applied, SI (0 when the band was not set). */
  halfWidth: number;
  partialHalfWidth: number;
  /** Why a verdict could not be given, for 'not-checked'. */
  reason?: string;
}

export interface JudgeOptions {
  /** Combined standard uncertainty of (reported − expected), SI; needed for sigma bands. */
  uncertaintySI?: number;
  /** Dimension of the quantity, to convert `tolerance.unit` (guessed from the unit when omitted). */
  dimension?: Dimension;
  /** Extra absolute allowance, SI (the rounding of the typed number). */
  roundingSI?: number;
}

function halfWidthOf(
  band: ToleranceBand | undefined,
  expectedSI: number,
  absFactor: number,
  sigmaSI: number | undefined,
): { width: number; set: boolean; needsSigma: boolean } {
  if (!band) return { width: 0, set: false, needsSigma: false };
  let width = 0;
  let set = false;
  let needsSigma = false;
  if (typeof band.absolute === 'number' && Number.isFinite(band.absolute) && band.absolute >= 0) {
    width = Math.max(width, band.absolute * absFactor);
    set = true;
  }
  if (typeof band.relative === 'number' && Number.isFinite(band.relative) && band.relative >= 0) {
    width = Math.max(width, band.relative * Math.abs(expectedSI));
    set = true;
  }
  if (typeof band.sigma === 'number' && Number.isFinite(band.sigma) && band.sigma >= 0) {
    if (sigmaSI !== undefined && Number.isFinite(sigmaSI) && sigmaSI > 0) {
      width = Math.max(width, band.sigma * sigmaSI);
      set = true;
    } else needsSigma = true;
  }
  return { width, set, needsSigma };
}

export function relativeDeviationOf(deviation: number, expected: number): number {
  if (expected !== 0) return deviation / Math.abs(expected);
  return deviation === 0 ? 0 : Math.sign(deviation) * Number.MAX_VALUE;
}

/** The judgement when no band applies: the deviation is still reported, the verdict is left to a marker. */
function notChecked(reportedSI: number, expectedSI: number, reason: string): Judgement {
  return {
    verdict: 'not-checked',
    deviation: Number.isFinite(reportedSI - expectedSI) ? reportedSI - expectedSI : 0,
    relativeDeviation: Number.isFinite(reportedSI - expectedSI) ? relativeDeviationOf(reportedSI - expectedSI, expectedSI) : 0,
    halfWidth: 0,
    partialHalfWidth: 0,
    reason,
  };
}

export function judge(reportedSI: number, expectedSI: number, tolerance: Tolerance | undefined, opts: JudgeOptions = {}): Judgement {
  if (typeof reportedSI !== 'number' || typeof expectedSI !== 'number' || !Number.isFinite(reportedSI) || !Number.isFinite(expectedSI)) {
    return {
      verdict: 'not-checked',
      deviation: 0,
      relativeDeviation: 0,
      halfWidth: 0,
      partialHalfWidth: 0,
      reason: 'No finite value to compare.',
    };
  }
  if (!tolerance || typeof tolerance !== 'object') return notChecked(reportedSI, expectedSI, 'No tolerance band is set for this quantity.');
  let absFactor = 1;
  if (tolerance.unit !== undefined && tolerance.unit !== '') {
    const dim = opts.dimension ?? lookupUnit(tolerance.unit)?.dimension;
    const conv = dim ? toSI(1, tolerance.unit, dim) : undefined;
    if (!conv || !conv.ok || conv.unit.kind !== 'linear')
      return notChecked(reportedSI, expectedSI, `The tolerance unit "${tolerance.unit}" cannot be used for this quantity.`);
    absFactor = conv.valueSI;
  }
  const inner = halfWidthOf(tolerance, expectedSI, absFactor, opts.uncertaintySI);
  const outer = halfWidthOf(tolerance.partial, expectedSI, absFactor, opts.uncertaintySI);
  if (!inner.set && !outer.set) {
    return notChecked(
      reportedSI,
      expectedSI,
      inner.needsSigma || outer.needsSigma
        ? 'The band is set in standard uncertainties, but no uncertainty is known.'
        : 'No tolerance band is set for this quantity.',
    );
  }
  const rounding = opts.roundingSI !== undefined && Number.isFinite(opts.roundingSI) ? Math.abs(opts.roundingSI) : 0;
  const deviation = reportedSI - expectedSI;
  const relativeDeviation = relativeDeviationOf(deviation, expectedSI);
  const innerWidth = inner.set ? inner.width + rounding : 0;
  const outerWidth = outer.set ? Math.max(outer.width + rounding, innerWidth) : 0;
  // A tiny allowance for binary floating point, so that a band edge typed exactly is inside.
  const eps = 1e-12 * Math.max(Math.abs(expectedSI), Math.abs(reportedSI));
  const ad = Math.abs(deviation);
  let verdict: Verdict;
  if (inner.set && ad <= innerWidth + eps) verdict = 'within';
  else if (outer.set && ad <= outerWidth + eps) verdict = 'partial';
  else verdict = 'outside';
  return { verdict, deviation, relativeDeviation, halfWidth: innerWidth, partialHalfWidth: outerWidth };
}

/** Marks for a verdict: full, a fraction for partial credit, none otherwise ('not-checked' → 0, for a marker to decide). */
export function marksFor(verdict: Verdict, maxMarks: number, partialFraction = 0.5): number {
  if (!Number.isFinite(maxMarks) || maxMarks <= 0) return 0;
  const f = Number.isFinite(partialFraction) ? Math.min(1, Math.max(0, partialFraction)) : 0.5;
  if (verdict === 'within') return maxMarks;
  if (verdict === 'partial') return maxMarks * f;
  return 0;
}

/**
 * Default consistency bands, by how the value is recomputed (see CONSISTENCY_KIND):
 * - arithmetic on typed or given numbers: to the precision the student typed, half a unit in the
 *   last digit of the number and of the inputs they worked from, never wider than an uncertainty
 *   they stated; no percentage floor (the slips worth naming are as small as 0.055 %);
 * - fitted from their line list: within FITTED_CONSISTENCY_SIGMA standard errors of the fit,
 *   plus the digits typed.
 * An instructor's consistency band for a quantity replaces these.
 */
export const FITTED_CONSISTENCY_SIGMA = 3;

/** Relative allowance for binary floating point and the last digits of constants (not a tolerance). */
export const FLOATING_POINT_ALLOWANCE = 1e-9;

export const DEFAULT_CONSISTENCY_WORDS = {
  arithmetic: 'arithmetic: to the digits the student typed (half a unit in the last digit, never wider than a stated uncertainty)',
  fitted: `fitted: within ${FITTED_CONSISTENCY_SIGMA} standard errors of the fit of the student's own lines, plus the digits typed`,
} as const;
