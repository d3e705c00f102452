/**
 * The quantities a student reports, with how they are shown and stored.
 */
import type { Dimension } from './units';
import { SI_UNIT } from './units';

export const QUANTITY_KEYS = [
  'bandCentre',
  'reducedMass',
  'forceConstant',
  'forceConstantE',
  'B0',
  'B1',
  'Be',
  'alphaE',
  'D',
  're',
  'r0',
  'omegaE',
  'omegaExe',
  'zeroPointEnergy',
  'dissociationEnergy',
  'dissociationEnergy0',
  'isotopeShift',
  'isotopeRatio',
] as const;

export type QuantityKey = (typeof QUANTITY_KEYS)[number];

export interface QuantityInfo {
  key: QuantityKey;
  /** Plain text with Unicode, for tables and PDFs. */
  label: string;
  /** KaTeX source for the symbol. */
  symbolTex: string;
  dimension: Dimension;
  siUnit: string;
  /** The unit students normally use; expected and reported values are shown in it. */
  displayUnit: string;
  description: string;
}

function q(
  key: QuantityKey,
  label: string,
  symbolTex: string,
  dimension: Dimension,
  displayUnit: string,
  description: string,
): QuantityInfo {
  return { key, label, symbolTex, dimension, siUnit: SI_UNIT[dimension], displayUnit, description };
}

export const QUANTITIES: Record<QuantityKey, QuantityInfo> = {
  bandCentre: q(
    'bandCentre',
    'Band centre ν̃₀',
    '\\tilde{\\nu}_0',
    'wavenumber',
    'cm⁻¹',
    'Wavenumber of the pure vibrational transition v = 1 ← 0 (the band origin), from the gap between the P and R branches or, better, from the fit.',
  ),
  reducedMass: q('reducedMass', 'Reduced mass μ', '\\mu', 'mass', 'u', 'μ = m₁m₂/(m₁+m₂) from the isotopic masses of the two atoms.'),
  forceConstant: q(
    'forceConstant',
    'Force constant k',
    'k',
    'forceConstant',
    'N m⁻¹',
    'Harmonic force constant from the band centre: k = 4π²c²ν̃₀²μ.',
  ),
  forceConstantE: q(
    'forceConstantE',
    'Equilibrium force constant kₑ',
    'k_\\mathrm{e}',
    'forceConstant',
    'N m⁻¹',
    'Harmonic force constant from the harmonic wavenumber: kₑ = 4π²c²ωₑ²μ.',
  ),
  B0: q(
    'B0',
    'Rotational constant B₀',
    'B_0',
    'wavenumber',
    'cm⁻¹',
    'Rotational constant of the v = 0 level, from the fit or the ground-state combination differences.',
  ),
  B1: q('B1', 'Rotational constant B₁', 'B_1', 'wavenumber', 'cm⁻¹', 'Rotational constant of the v = 1 level.'),
  Be: q('Be', 'Equilibrium rotational constant Bₑ', 'B_\\mathrm{e}', 'wavenumber', 'cm⁻¹', 'Bₑ = B₀ + αₑ/2 = (3B₀ − B₁)/2.'),
  alphaE: q(
    'alphaE',
    'Vibration–rotation constant αₑ',
    '\\alpha_\\mathrm{e}',
    'wavenumber',
    'cm⁻¹',
    'αₑ = B₀ − B₁: how much the bond lengthens on vibrational excitation.',
  ),
  D: q(
    'D',
    'Centrifugal distortion constant D',
    'D',
    'wavenumber',
    'cm⁻¹',
    'Centrifugal distortion constant, the −4Dm³ term of the line positions (taken equal in v = 0 and 1).',
  ),
  re: q('re', 'Equilibrium bond length rₑ', 'r_\\mathrm{e}', 'length', 'Å', 'rₑ = √(h/(8π²cμBₑ)).'),
  r0: q('r0', 'Ground-state bond length r₀', 'r_0', 'length', 'Å', 'r₀ = √(h/(8π²cμB₀)): an average over the zero-point motion, not rₑ.'),
  omegaE: q(
    'omegaE',
    'Harmonic wavenumber ωₑ',
    '\\omega_\\mathrm{e}',
    'wavenumber',
    'cm⁻¹',
    'ωₑ = ν̃₀ + 2ωₑxₑ, from the fundamental and the first overtone.',
  ),
  omegaExe: q(
    'omegaExe',
    'Anharmonicity constant ωₑxₑ',
    '\\omega_\\mathrm{e}x_\\mathrm{e}',
    'wavenumber',
    'cm⁻¹',
    'ωₑxₑ = (2ν̃₁←₀ − ν̃₂←₀)/2.',
  ),
  zeroPointEnergy: q('zeroPointEnergy', 'Zero-point energy G(0)', 'G(0)', 'energy', 'cm⁻¹', 'G(0) = ωₑ/2 − ωₑxₑ/4.'),
  dissociationEnergy: q(
    'dissociationEnergy',
    'Dissociation energy Dₑ',
    'D_\\mathrm{e}',
    'energy',
    'cm⁻¹',
    'Depth of the potential well. From ωₑ and ωₑxₑ the Morse model estimates Dₑ ≈ ωₑ²/(4ωₑxₑ); the accepted value is the measured D₀ + G(0), which the Morse estimate overshoots.',
  ),
  dissociationEnergy0: q(
    'dissociationEnergy0',
    'Dissociation energy D₀',
    'D_0',
    'energy',
    'cm⁻¹',
    'Dissociation energy from the lowest level, D₀ = Dₑ − G(0). The Morse estimate from ωₑ and ωₑxₑ overshoots; the accepted value is the measured (spectroscopic) D₀.',
  ),
  isotopeShift: q(
    'isotopeShift',
    'Isotope shift Δν̃₀',
    '\\Delta\\tilde{\\nu}_0',
    'wavenumber',
    'cm⁻¹',
    'ν̃₀(partner isotopologue) − ν̃₀(this isotopologue); in the harmonic limit ν̃₀ scales as √(μ/μ′).',
  ),
  isotopeRatio: q(
    'isotopeRatio',
    'Isotope ratio ν̃₀′/ν̃₀',
    '\\tilde{\\nu}_0^{\\prime}/\\tilde{\\nu}_0',
    'ratio',
    '',
    'ν̃₀(partner)/ν̃₀(this isotopologue), compared with √(μ/μ′).',
  ),
};

/**
 * How the consistency check recomputes a quantity from the student's own data, by default:
 * 'fitted' from the least-squares fit of their line list (judged with its standard error),
 * 'arithmetic' from numbers they typed or were given (judged to the digits they typed).
 * rₑ and r₀ are arithmetic on the student's own B when they report it, else from the fit.
 */
export const CONSISTENCY_KIND: Record<QuantityKey, 'arithmetic' | 'fitted'> = {
  bandCentre: 'fitted',
  reducedMass: 'arithmetic',
  forceConstant: 'arithmetic',
  forceConstantE: 'arithmetic',
  B0: 'fitted',
  B1: 'fitted',
  Be: 'fitted',
  alphaE: 'fitted',
  D: 'fitted',
  re: 'arithmetic',
  r0: 'arithmetic',
  omegaE: 'arithmetic',
  omegaExe: 'arithmetic',
  zeroPointEnergy: 'arithmetic',
  dissociationEnergy: 'arithmetic',
  dissociationEnergy0: 'arithmetic',
  isotopeShift: 'arithmetic',
  isotopeRatio: 'arithmetic',
};

/**
 * What the accuracy comparison tests, for advice that fits the quantity: a measurement (or a
 * number worked out from one), the masses, or a model's prediction.
 */
export const ACCURACY_KIND: Record<QuantityKey, 'measured' | 'masses' | 'model'> = {
  bandCentre: 'measured',
  reducedMass: 'masses',
  forceConstant: 'measured',
  forceConstantE: 'measured',
  B0: 'measured',
  B1: 'measured',
  Be: 'measured',
  alphaE: 'measured',
  D: 'measured',
  re: 'measured',
  r0: 'measured',
  omegaE: 'measured',
  omegaExe: 'measured',
  zeroPointEnergy: 'measured',
  dissociationEnergy: 'model',
  dissociationEnergy0: 'model',
  isotopeShift: 'measured',
  isotopeRatio: 'measured',
};

export function isQuantityKey(key: unknown): key is QuantityKey {
  return typeof key === 'string' && (QUANTITY_KEYS as readonly string[]).includes(key);
}
