/**
 * What a fictional demo student hands in for one species: a line list simulated from published
 * constants (simulateLineList) with seeded noise, and the values derived from it with the
 * engine's own formulas (fitBandModels, forceConstantFromBand, bondLengthFromB), at most one of
 * them with a named slip. Shared by the demo's submissions (submissions.ts) and last year's
 * cohort (last-year.ts). Masses use the engine's atomic mass constant (CODATA 2018).
 */
import { bondLengthFromB, fitBandModels, forceConstantFromBand, parseSpecies, simulateLineList, u as ATOMIC_MASS_KG } from '@/lib/grading';

/** The slip a demo student makes (in H³⁵Cl's values), or none. */
export type DemoSlip =
  'correct' | 'missing-2pi' | 'mass-numbers-used' | 'grams-not-kilograms' | 'r0-reported-as-re' | 'b0-b1-swapped' | 'unit-mismatch';

export interface DemoLine {
  species: string;
  branch: 'P' | 'R';
  J: number;
  wavenumber: number;
  intensity: number;
}

export interface DemoValue {
  key: string;
  species: string;
  valueText: string;
  unit: string;
  uncertaintyText: string | null;
}

/** The species' P and R lines to J = 9, each moved by `sigma` × noise() cm⁻¹ and rounded to 0.01 cm⁻¹ as read off a spectrum. */
export function noisyLineList(species: string, sigma: number, noise: () => number): DemoLine[] {
  if (!parseSpecies(species).ok) return [];
  return simulateLineList(species, { jMax: 9 }).map((l) => ({
    species,
    branch: l.branch,
    J: l.J,
    wavenumber: Math.round((l.wavenumber + sigma * noise()) * 100) / 100,
    intensity: l.intensity,
  }));
}

/**
 * The values a student reports from `lines`: the band model the lines support (with −4Dm³ where
 * they need it, as a careful student fits), then ν̃₀, μ, k, B₀, B₁, Bₑ, αₑ and rₑ. The slip of
 * `plan` goes into H³⁵Cl's values, except that r₀ is reported as rₑ for every species unless
 * `r0OnlyInH35Cl`. Null when the species or the fit fails.
 */
export function reportedValues(
  sp: string,
  lines: DemoLine[],
  plan: DemoSlip,
  options: { r0OnlyInH35Cl?: boolean } = {},
): DemoValue[] | null {
  const parsed = parseSpecies(sp);
  if (!parsed.ok) return null;
  const models = fitBandModels(lines);
  if (!models.ok) return null;
  const fit = models.fit;
  const slipHere = sp === 'H35Cl';
  const nu0 = Math.round(fit.nu0.value * 10) / 10;
  const { reducedMassKg: muKg, reducedMassU: muU } = parsed.species;
  let kMu = muU;
  let k = forceConstantFromBand(nu0 * 100, muKg);
  let kUnit = 'N m-1';
  if (slipHere) {
    if (plan === 'mass-numbers-used') {
      kMu = 35 / 36;
      k = forceConstantFromBand(nu0 * 100, kMu * ATOMIC_MASS_KG);
    }
    if (plan === 'missing-2pi') k /= 4 * Math.PI ** 2;
    if (plan === 'grams-not-kilograms') k *= 1000;
    if (plan === 'unit-mismatch') kUnit = 'mdyn/Å';
  }
  let B0 = fit.B0.value;
  let B1 = fit.B1.value;
  if (slipHere && plan === 'b0-b1-swapped') [B0, B1] = [B1, B0];
  const r0Slip = plan === 'r0-reported-as-re' && (slipHere || !options.r0OnlyInH35Cl);
  const re = r0Slip ? bondLengthFromB(fit.B0.value * 100, muKg) : bondLengthFromB(fit.Be.value * 100, muKg);
  const values: DemoValue[] = [];
  const put = (key: string, valueText: string, unit: string, unc: string | null) =>
    values.push({ key, species: sp, valueText, unit, uncertaintyText: unc });
  put('bandCentre', nu0.toFixed(1), 'cm-1', '0.3');
  put('reducedMass', kMu.toFixed(5), 'u', null);
  put('forceConstant', k.toPrecision(4), kUnit, (k * 0.002).toPrecision(1));
  put('B0', B0.toFixed(3), 'cm-1', '0.005');
  put('B1', B1.toFixed(3), 'cm-1', '0.005');
  put('Be', ((3 * B0 - B1) / 2).toFixed(3), 'cm-1', null);
  put('alphaE', (B0 - B1).toFixed(3), 'cm-1', null);
  put('re', (re * 1e10).toFixed(4), 'Å', '0.0005');
  return values;
}
