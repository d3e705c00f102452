/**
 * The harmonic oscillator: ν = (1/2π)√(k/μ), in wavenumbers ν̃ = ν/c, so k = 4π²c²ν̃²μ.
 * All SI: ν̃ in m⁻¹, μ in kg, k in N m⁻¹, c in m s⁻¹.
 */
import { c, h } from './constants';

const FOUR_PI2_C2 = 4 * Math.PI * Math.PI * c * c;

/** k = 4π²c²ν̃²μ: stiffer bond → higher wavenumber, heavier μ → lower. */
export function forceConstantFromBand(wavenumberSI: number, reducedMassKg: number): number {
  return FOUR_PI2_C2 * wavenumberSI * wavenumberSI * reducedMassKg;
}

/** ν̃ = √(k/μ)/(2πc). */
export function bandCentreFromForceConstant(forceConstantSI: number, reducedMassKg: number): number {
  return Math.sqrt(forceConstantSI / reducedMassKg) / (2 * Math.PI * c);
}

/** Same k for both isotopologues (Born–Oppenheimer): ν̃′/ν̃ = √(μ/μ′). */
export function isotopologueRatio(reducedMass: number, reducedMassOther: number): number {
  return Math.sqrt(reducedMass / reducedMassOther);
}

export function predictIsotopologueBand(wavenumber: number, reducedMass: number, reducedMassOther: number): number {
  return wavenumber * isotopologueRatio(reducedMass, reducedMassOther);
}

/** r = √(h/(8π²cμB)), B in m⁻¹, μ in kg → r in m. */
export function bondLengthFromB(BSI: number, reducedMassKg: number): number {
  return Math.sqrt(h / (8 * Math.PI * Math.PI * c * reducedMassKg * BSI));
}

/** B = h/(8π²cμr²), inverse of bondLengthFromB. */
export function rotationalConstantFromBondLength(rSI: number, reducedMassKg: number): number {
  return h / (8 * Math.PI * Math.PI * c * reducedMassKg * rSI * rSI);
}
