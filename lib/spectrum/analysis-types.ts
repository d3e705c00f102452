/**
 * What the whole-spectrum analysis (analyse.ts) reports for each band, its options and its
 * calibration finding: types only, in their own module so vibration.ts can use them without
 * importing analyse.ts, which imports it.
 */
import type { Estimate } from '@/lib/grading';
import type { BandKind } from './bands';

export interface AnalyseOptions {
  /** Molecules in the cell: "HCl", "DCl", "HBr", "CO", or single isotopologues such as "H35Cl". */
  species: readonly string[];
  /** Largest calibration offset looked for, cm⁻¹ (default 25). */
  maxOffset?: number;
  /** Bands looked for (default both). */
  bands?: readonly BandKind[];
}

export interface AssignedLine {
  branch: 'P' | 'R';
  J: number;
  /** Position from the line-shape fit, cm⁻¹. */
  wavenumber: number;
  /** Height above the local baseline, absorbance. */
  intensity: number;
  /** Standard error of the position from the line-shape fit, cm⁻¹. */
  stdError: number;
  /** Observed − fitted, cm⁻¹ (0 until fitted). */
  residual: number;
  /** Found by looking where the band predicts a line (a weak line or a shoulder). */
  probed: boolean;
}

export interface ExcludedLine {
  branch: 'P' | 'R';
  J: number;
  wavenumber: number;
  reason: string;
}

export interface BandFitReport {
  model: 'quadratic' | 'cubic';
  modelNote: string;
  /** Band origin ν̃₀ as recorded (no calibration correction), cm⁻¹. */
  nu0: Estimate;
  B0: Estimate;
  /** B of the upper level: B₁ for the fundamental, B₂ for the overtone. */
  Bupper: Estimate;
  Be: Estimate;
  alphaE: Estimate;
  D?: Estimate;
  /** Bond lengths, Å. */
  re?: Estimate;
  r0?: Estimate;
  /** Root-mean-square residual, cm⁻¹. */
  rms: number;
  otherModelRms?: number;
  /** The same constants from the model not chosen (with or without D), for comparison with a student who used it. */
  alternative?: {
    model: 'quadratic' | 'cubic';
    nu0: Estimate;
    B0: Estimate;
    Bupper: Estimate;
    Be: Estimate;
    alphaE: Estimate;
    D?: Estimate;
  };
  lineCount: number;
  degreesOfFreedom: number;
}

export type BandStatus = 'fitted' | 'too-few-lines' | 'not-found' | 'outside-range' | 'unresolved';

export interface BandAnalysis {
  isotopologue: string;
  display: string;
  molecule: string;
  band: BandKind;
  /** "H³⁵Cl fundamental (1←0)". */
  label: string;
  status: BandStatus;
  predictedOrigin: number;
  /** Where the band's lines lie (lines at least 1 % of its strongest), cm⁻¹. */
  predictedRange: [number, number];
  lines: AssignedLine[];
  /** Predicted lines within the recorded range, as strong as lines that were found, not seen. */
  missing: string[];
  excluded: ExcludedLine[];
  fit: BandFitReport | null;
  warnings: string[];
}

export interface UnassignedLine {
  wavenumber: number;
  intensity: number;
  snr: number;
}

export interface CalibrationReport {
  /**
   * The calibration error found: ν̃(recorded) = ν̃(published) + offset + scale·(ν̃(published) − referenceWavenumber).
   * The scale is part of it only when it is clearly there (else null, and the offset is the weighted mean difference).
   */
  offset: Estimate;
  scale: Estimate | null;
  referenceWavenumber: number;
  /** The scale as fitted even when it is not clear (bands spread over ≥ 1000 cm⁻¹ only). */
  fittedScale?: Estimate;
  bandsCompared: number;
  /** True when the offset or the scale is clearly more than the published origins' own uncertainty. */
  detected: boolean;
  message: string;
  /** Each band's fitted origin minus the published one, cm⁻¹. */
  perBand: { label: string; difference: number; stdError: number }[];
}
