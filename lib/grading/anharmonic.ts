/**
 * The anharmonic oscillator from the fundamental and the first overtone.
 *   G(v) = ωₑ(v+½) − ωₑxₑ(v+½)²
 *   ν̃(1←0) = ωₑ − 2ωₑxₑ,  ν̃(2←0) = 2ωₑ − 6ωₑxₑ
 *   ⇒ ωₑxₑ = (2ν̃₁₀ − ν̃₂₀)/2,  ωₑ = ν̃₁₀ + 2ωₑxₑ
 *   G(0) = ωₑ/2 − ωₑxₑ/4,  Morse Dₑ ≈ ωₑ²/(4ωₑxₑ),  D₀ = Dₑ − G(0)
 * Wavenumbers and energies here in cm⁻¹ (as students work); kₑ in N m⁻¹.
 */
import { forceConstantFromBand } from './harmonic';

export interface AnharmonicAnalysis {
  omegaE: number;
  omegaExe: number;
  /** kₑ = 4π²c²ωₑ²μ, N m⁻¹ (when μ is given). */
  forceConstantE?: number;
  zeroPointEnergy: number;
  dissociationEnergyE: number;
  dissociationEnergy0: number;
  /** Standard uncertainties, same units, when the inputs carry them. */
  uncertainty: {
    omegaE: number;
    omegaExe: number;
    forceConstantE?: number;
    zeroPointEnergy: number;
    dissociationEnergyE: number;
    dissociationEnergy0: number;
  };
}

export type AnharmonicResult = ({ ok: true } & AnharmonicAnalysis) | { ok: false; message: string };

export function anharmonicFromOvertone(
  fundamental: number,
  overtone: number,
  opts: { reducedMassKg?: number; sigmaFundamental?: number; sigmaOvertone?: number } = {},
): AnharmonicResult {
  if (!Number.isFinite(fundamental) || !Number.isFinite(overtone) || fundamental <= 0 || overtone <= 0) {
    return { ok: false, message: 'The fundamental and the overtone must be positive wavenumbers.' };
  }
  const omegaExe = (2 * fundamental - overtone) / 2;
  if (!(omegaExe > 0)) {
    return {
      ok: false,
      message:
        'The overtone must lie below twice the fundamental (anharmonicity makes the levels converge); check that the right bands were used.',
    };
  }
  if (overtone < fundamental * 1.5) {
    return { ok: false, message: 'The overtone (v = 2 ← 0) should lie near twice the fundamental; this one is too low.' };
  }
  const omegaE = fundamental + 2 * omegaExe; // = 3ν̃₁₀ − ν̃₂₀
  const zpe = omegaE / 2 - omegaExe / 4;
  const De = (omegaE * omegaE) / (4 * omegaExe);
  const s1 = opts.sigmaFundamental ?? 0;
  const s2 = opts.sigmaOvertone ?? 0;
  // Linear in (ν̃₁₀, ν̃₂₀): ωₑ = 3ν̃₁₀ − ν̃₂₀, ωₑxₑ = ν̃₁₀ − ν̃₂₀/2
  const sOmega = Math.hypot(3 * s1, s2);
  const sX = Math.hypot(s1, s2 / 2);
  // G(0) = (3ν̃₁₀ − ν̃₂₀)/2 − (ν̃₁₀ − ν̃₂₀/2)/4 = 1.25ν̃₁₀ − 0.375ν̃₂₀
  const sZpe = Math.hypot(1.25 * s1, 0.375 * s2);
  // Dₑ: partial derivatives through ωₑ and ωₑxₑ, which share inputs
  const dDe_dw = omegaE / (2 * omegaExe);
  const dDe_dx = -(omegaE * omegaE) / (4 * omegaExe * omegaExe);
  const dDe_d1 = dDe_dw * 3 + dDe_dx * 1;
  const dDe_d2 = dDe_dw * -1 + dDe_dx * -0.5;
  const sDe = Math.hypot(dDe_d1 * s1, dDe_d2 * s2);
  const sD0 = Math.hypot((dDe_d1 - 1.25) * s1, (dDe_d2 + 0.375) * s2);
  const mu = opts.reducedMassKg;
  const kE = mu !== undefined && mu > 0 ? forceConstantFromBand(omegaE * 100, mu) : undefined;
  return {
    ok: true,
    omegaE,
    omegaExe,
    forceConstantE: kE,
    zeroPointEnergy: zpe,
    dissociationEnergyE: De,
    dissociationEnergy0: De - zpe,
    uncertainty: {
      omegaE: sOmega,
      omegaExe: sX,
      forceConstantE: kE === undefined ? undefined : (kE * 2 * sOmega) / omegaE,
      zeroPointEnergy: sZpe,
      dissociationEnergyE: sDe,
      dissociationEnergy0: sD0,
    },
  };
}

/** Morse Dₑ and D₀ from ωₑ and ωₑxₑ directly (cm⁻¹). */
export function morseDissociation(omegaE: number, omegaExe: number): { De: number; D0: number; zeroPointEnergy: number } {
  const zpe = omegaE / 2 - omegaExe / 4;
  const De = (omegaE * omegaE) / (4 * omegaExe);
  return { De, D0: De - zpe, zeroPointEnergy: zpe };
}
