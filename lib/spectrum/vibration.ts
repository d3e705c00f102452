/**
 * Vibrational constants from the spectrum's own band origins.
 *
 * For each isotopologue with both bands, the two-level formulas students use (through
 * lib/grading's anharmonicFromOvertone):
 *   ν̃₁₀ = ωₑ − 2ωₑxₑ,  ν̃₂₀ = 2ωₑ − 6ωₑxₑ  ⇒  ωₑxₑ = (2ν̃₁₀ − ν̃₂₀)/2,  ωₑ = ν̃₁₀ + 2ωₑxₑ,
 * then kₑ = 4π²c²ωₑ²μ, G(0), the Morse Dₑ ≈ ωₑ²/4ωₑxₑ and D₀ = Dₑ − G(0) (a model estimate).
 * These neglect ωₑyₑ: with G(v) = ωₑ(v+½) − ωₑxₑ(v+½)² + ωₑyₑ(v+½)³ the two bands give
 * exactly ωₑxₑ − 4.5ωₑyₑ and ωₑ − 5.75ωₑyₑ (for HCl 1.9 % low in ωₑxₑ).
 *
 * When isotopologues with clearly different reduced masses (H and D) both show both bands,
 * one potential (Born–Oppenheimer) ties them together: with ρ = √(μ_ref/μ),
 *   ν̃₁₀ = ρωₑ − 2ρ²ωₑxₑ + (13/4)ρ³ωₑyₑ,   ν̃₂₀ = 2ρωₑ − 6ρ²ωₑxₑ + (31/2)ρ³ωₑyₑ,
 * a linear least-squares problem in ωₑ, ωₑxₑ, ωₑyₑ of the reference isotopologue, weighted
 * by the origins' standard errors. This separates ωₑyₑ, which two bands of one isotopologue
 * cannot.
 *
 * Band origins are used as recorded; when the analysis found a calibration error, the same
 * numbers are also given from origins corrected for it (and labelled so).
 */
import { anharmonicFromOvertone, leastSquares, type Estimate } from '@/lib/grading';
import type { BandAnalysis, CalibrationReport } from './analysis-types';
import type { Isotopologue } from './bands';

export interface AnharmonicNumbers {
  omegaE: Estimate;
  omegaExe: Estimate;
  /** kₑ = 4π²c²ωₑ²μ, N m⁻¹. */
  forceConstantE?: Estimate;
  /** G(0) = ωₑ/2 − ωₑxₑ/4, cm⁻¹. */
  zeroPointEnergy: Estimate;
  /** Morse estimate ωₑ²/4ωₑxₑ, cm⁻¹ — the model's value, well above the measured dissociation energy. */
  morseDe: Estimate;
  morseD0: Estimate;
}

export interface IsotopologueVibration {
  isotopologue: string;
  display: string;
  fundamental: Estimate;
  overtone: Estimate;
  asRecorded: AnharmonicNumbers;
  /** From origins corrected for the calibration error the analysis found. */
  calibrated?: AnharmonicNumbers;
}

export interface CombinedVibration {
  /** Isotopologue the constants belong to (the others follow by ωₑ ∝ ρ, ωₑxₑ ∝ ρ², ωₑyₑ ∝ ρ³). */
  reference: string;
  referenceDisplay: string;
  isotopologues: string[];
  asRecorded: { omegaE: Estimate; omegaExe: Estimate; omegaEye: Estimate; rms: number };
  calibrated?: { omegaE: Estimate; omegaExe: Estimate; omegaEye: Estimate; rms: number };
}

export interface VibrationalAnalysis {
  isotopologues: IsotopologueVibration[];
  combined: CombinedVibration[];
  notes: string[];
}

type Origin = { value: number; stdError: number };

/** An origin corrected for a calibration error (offset, and scale when one was found). */
function corrected(o: Origin, cal: { offset: number; scale: number; ref: number }): Origin {
  return { value: (o.value - cal.offset + cal.scale * cal.ref) / (1 + cal.scale), stdError: o.stdError };
}

/**
 * Runs `compute` on corrected origins and adds the calibration's own uncertainty to every
 * estimate it returns. The calibration error is common to all bands, so it is propagated by
 * recomputing with the offset (and scale) moved by one standard error, not added band by band.
 */
function withCalibration<T extends Record<string, unknown>>(
  cal: CalibrationReport,
  compute: (c: (o: Origin) => Origin) => T | undefined,
): T | undefined {
  const base = { offset: cal.offset.value, scale: cal.scale?.value ?? 0, ref: cal.referenceWavenumber };
  const result = compute((o) => corrected(o, base));
  if (!result) return undefined;
  const shifted = [
    compute((o) => corrected(o, { ...base, offset: base.offset + cal.offset.stdError })),
    cal.scale ? compute((o) => corrected(o, { ...base, scale: base.scale + cal.scale!.stdError })) : undefined,
  ];
  for (const key of Object.keys(result)) {
    const e = result[key] as Estimate | undefined;
    if (!e || typeof e !== 'object' || typeof e.value !== 'number') continue;
    let variance = e.stdError * e.stdError;
    for (const s of shifted) {
      const moved = s?.[key] as Estimate | undefined;
      if (moved && typeof moved.value === 'number') variance += (moved.value - e.value) ** 2;
    }
    (result as Record<string, unknown>)[key] = { value: e.value, stdError: Math.sqrt(variance) };
  }
  return result;
}

function twoTerm(fund: Origin, over: Origin, reducedMassKg: number): AnharmonicNumbers | undefined {
  const r = anharmonicFromOvertone(fund.value, over.value, {
    reducedMassKg,
    sigmaFundamental: fund.stdError,
    sigmaOvertone: over.stdError,
  });
  if (!r.ok) return undefined;
  const est = (value: number, stdError: number | undefined): Estimate => ({ value, stdError: stdError ?? 0 });
  return {
    omegaE: est(r.omegaE, r.uncertainty.omegaE),
    omegaExe: est(r.omegaExe, r.uncertainty.omegaExe),
    forceConstantE: r.forceConstantE === undefined ? undefined : est(r.forceConstantE, r.uncertainty.forceConstantE),
    zeroPointEnergy: est(r.zeroPointEnergy, r.uncertainty.zeroPointEnergy),
    morseDe: est(r.dissociationEnergyE, r.uncertainty.dissociationEnergyE),
    morseD0: est(r.dissociationEnergy0, r.uncertainty.dissociationEnergy0),
  };
}

/** Smallest standard error given to an origin in the combined fit (keeps one band from taking all the weight). */
const MIN_ORIGIN_ERROR = 1e-3;

function combinedFit(rows: { rho: number; fundamental: Origin; overtone: Origin }[]): CombinedVibration['asRecorded'] | undefined {
  const n = rows.length * 2;
  const X = new Float64Array(n * 3);
  const y = new Float64Array(n);
  let i = 0;
  for (const r of rows) {
    for (const [v, o] of [
      [1, r.fundamental],
      [2, r.overtone],
    ] as const) {
      const w = 1 / Math.max(o.stdError, MIN_ORIGIN_ERROR);
      // G(v) − G(0) for v = 1: ωₑ − 2ωₑxₑ + 13/4 ωₑyₑ; for v = 2: 2ωₑ − 6ωₑxₑ + 31/2 ωₑyₑ.
      const coeff = v === 1 ? [1, -2, 13 / 4] : [2, -6, 31 / 2];
      X[i * 3] = w * coeff[0] * r.rho;
      X[i * 3 + 1] = w * coeff[1] * r.rho ** 2;
      X[i * 3 + 2] = w * coeff[2] * r.rho ** 3;
      y[i] = w * o.value;
      i++;
    }
  }
  const sol = leastSquares(X, n, 3, y);
  if (!sol) return undefined;
  const dof = sol.degreesOfFreedom;
  const inflate = dof > 0 ? Math.max(1, sol.residualSumOfSquares / dof) : 1;
  const se = (k: number) => Math.sqrt(Math.max(0, sol.unscaledCovariance[k][k] * inflate));
  // Unweighted residual rms, cm⁻¹, for the reader.
  let ss = 0;
  for (const r of rows) {
    const [we, x, yy] = sol.beta;
    ss += (r.fundamental.value - (r.rho * we - 2 * r.rho ** 2 * x + (13 / 4) * r.rho ** 3 * yy)) ** 2;
    ss += (r.overtone.value - (2 * r.rho * we - 6 * r.rho ** 2 * x + (31 / 2) * r.rho ** 3 * yy)) ** 2;
  }
  return {
    omegaE: { value: sol.beta[0], stdError: se(0) },
    omegaExe: { value: sol.beta[1], stdError: se(1) },
    omegaEye: { value: sol.beta[2], stdError: se(2) },
    rms: Math.sqrt(ss / n),
  };
}

export function analyseVibration(
  bands: BandAnalysis[],
  isotopologues: Isotopologue[],
  calibration: CalibrationReport | null,
): VibrationalAnalysis {
  const out: VibrationalAnalysis = { isotopologues: [], combined: [], notes: [] };
  const origin = (formula: string, band: 'fundamental' | 'overtone'): Origin | undefined => {
    const b = bands.find((x) => x.isotopologue === formula && x.band === band && x.status === 'fitted' && x.fit);
    return b?.fit ? { value: b.fit.nu0.value, stdError: b.fit.nu0.stdError } : undefined;
  };
  const both: { iso: Isotopologue; fundamental: Origin; overtone: Origin }[] = [];
  for (const iso of isotopologues) {
    const f = origin(iso.formula, 'fundamental');
    const o = origin(iso.formula, 'overtone');
    if (!f || !o) continue;
    const asRecorded = twoTerm(f, o, iso.species.reducedMassKg);
    if (!asRecorded) {
      out.notes.push(
        `${iso.display}: the overtone and fundamental origins do not give an anharmonic oscillator (the overtone must lie below twice the fundamental).`,
      );
      continue;
    }
    const calibrated = calibration?.detected
      ? withCalibration(calibration, (fix) => twoTerm(fix(f), fix(o), iso.species.reducedMassKg) as unknown as Record<string, unknown>)
      : undefined;
    out.isotopologues.push({
      isotopologue: iso.formula,
      display: iso.display,
      fundamental: f,
      overtone: o,
      asRecorded,
      calibrated: calibrated as unknown as AnharmonicNumbers | undefined,
    });
    both.push({ iso, fundamental: f, overtone: o });
  }
  if (out.isotopologues.length) {
    out.notes.push(
      'The two-band formulas leave out ωₑyₑ: they give ωₑxₑ − 4.5ωₑyₑ and ωₑ − 5.75ωₑyₑ. The Morse Dₑ and D₀ are the model’s estimates and lie well above the measured dissociation energy.',
    );
  }
  // One potential per set of elements (HCl and DCl together).
  const byElements = new Map<string, typeof both>();
  for (const b of both) byElements.set(b.iso.elements, [...(byElements.get(b.iso.elements) ?? []), b]);
  for (const set of byElements.values()) {
    if (set.length < 2) continue;
    const ref = set.reduce(
      (a, b) => (b.iso.rank < a.iso.rank || (b.iso.rank === a.iso.rank && b.iso.species.reducedMassU < a.iso.species.reducedMassU) ? b : a),
      set[0],
    );
    const rhos = set.map((b) => Math.sqrt(ref.iso.species.reducedMassU / b.iso.species.reducedMassU));
    if (Math.max(...rhos) - Math.min(...rhos) < 0.05) {
      out.notes.push(
        `${set.map((b) => b.iso.display).join(', ')}: their reduced masses are too alike to separate ωₑyₑ (it takes H and D, for example).`,
      );
      continue;
    }
    const rows = set.map((b, i) => ({ rho: rhos[i], fundamental: b.fundamental, overtone: b.overtone }));
    const asRecorded = combinedFit(rows);
    if (!asRecorded) continue;
    let calibrated: CombinedVibration['calibrated'];
    if (calibration?.detected) {
      calibrated = withCalibration(calibration, (fix) =>
        combinedFit(rows.map((r) => ({ rho: r.rho, fundamental: fix(r.fundamental), overtone: fix(r.overtone) }))),
      );
    }
    out.combined.push({
      reference: ref.iso.formula,
      referenceDisplay: ref.iso.display,
      isotopologues: set.map((b) => b.iso.formula),
      asRecorded,
      calibrated,
    });
  }
  return out;
}
