/**
 * What the student's own data give: for each reported quantity, the value (or values) that
 * follow from the student's measurements by a defensible method, each labelled with its kind.
 *
 * - arithmetic: pure arithmetic on numbers the student typed or was given (μ from isotopic
 *   masses, k from their band centre, r from their B, energies from their ωₑ and ωₑxₑ,
 *   predictions from their band centre). It is judged at the precision the student typed, so
 *   each value carries how far the rounding of the typed inputs can move it.
 * - fitted: a least-squares result from their line list, judged with its standard error.
 *
 * When more than one method is defensible (the band fitted with or without the centrifugal term,
 * B from combination differences, ν̃₀ read from the band gap, r from the student's own Bₑ or from
 * the fit), every one is returned, the preferred first: a number that follows from any of them
 * follows from the student's data. Where a slip in an earlier step carries into a later one the
 * later step is still judged on what the student had (error carried forward, common practice),
 * except for the reduced mass, which is always the isotopic one: a wrong μ is the slip to name in
 * every quantity that uses it.
 *
 * All values SI: wavenumbers in m⁻¹ (the fit works in cm⁻¹, hence the factors of 100).
 */
import { c, h } from './constants';
import type { AnharmonicAnalysis } from './anharmonic';
import type { BandFit, Estimate } from './fit';
import { bondLengthFromB, forceConstantFromBand } from './harmonic';
import type { QuantityKey } from './quantities';
import type { Species } from './species';

export type ConsistencyKind = 'arithmetic' | 'fitted';

export interface Recomputed {
  valueSI: number;
  /** Standard error of a fitted value, SI (0 for arithmetic). */
  sigmaSI: number;
  /** How far the rounding of the student's own typed inputs can move the value, SI. */
  inputRoundingSI: number;
  kind: ConsistencyKind;
  /** Where the value comes from, in words for the student. */
  source: string;
  /** The method, when several are defensible (shown to staff, used for the model notes). */
  method?: RecomputeMethod;
}

export type RecomputeMethod =
  | 'fit-with-centrifugal'
  | 'fit-without-centrifugal'
  | 'combination-differences'
  | 'band-gap'
  | 'your-rotational-constants'
  | 'your-band-positions'
  | 'your-reported-values'
  | 'harmonic-prediction';

/** A number the student typed, read in SI, with half a unit of its last typed digit (SI). */
export interface TypedInput {
  valueSI: number;
  roundingSI: number;
  /** Stated standard uncertainty, SI. */
  sigmaSI?: number;
}

export interface OwnData {
  species: Species;
  /** The isotopologue compared with (for isotope shifts and ratios). */
  partner?: Species;
  /** The measured band centre as typed, else the reported one. */
  bandCentre?: TypedInput;
  /** The reported band centre, when it differs from the measured one. */
  reportedBandCentre?: TypedInput;
  overtone?: TypedInput;
  partnerBandCentre?: TypedInput;
  /** Reported values whose unit was understood. */
  reported: Partial<Record<QuantityKey, TypedInput>>;
  /** The band fit of the model the data support, and the other model. */
  fit?: BandFit;
  alternativeFit?: BandFit;
  /** ωₑ, ωₑxₑ, … from the measured fundamental and overtone. */
  anharmonic?: AnharmonicAnalysis;
}

const CM = 100; // m⁻¹ per cm⁻¹
const ENERGY_PER_WAVENUMBER = h * c; // J per m⁻¹

/**
 * f at the inputs, and how far rounding each input by up to its half-width can move f
 * (first order, worst case: the sum of |f(x + δᵢeᵢ) − f(x)|).
 */
export function withInputRounding(f: (...x: number[]) => number, inputs: TypedInput[]): { valueSI: number; inputRoundingSI: number } {
  // Written out for one to three inputs: this runs for every reported quantity of every submission.
  const a = inputs[0]?.valueSI ?? 0;
  const b = inputs[1]?.valueSI ?? 0;
  const c3 = inputs[2]?.valueSI ?? 0;
  const value = f(a, b, c3);
  let spread = 0;
  const add = (moved: number) => {
    if (Number.isFinite(moved)) spread += Math.abs(moved - value);
  };
  const da = inputs[0]?.roundingSI ?? 0;
  const db = inputs[1]?.roundingSI ?? 0;
  const dc = inputs[2]?.roundingSI ?? 0;
  if (da > 0) add(f(a + da, b, c3));
  if (db > 0) add(f(a, b + db, c3));
  if (dc > 0) add(f(a, b, c3 + dc));
  return { valueSI: value, inputRoundingSI: spread };
}

function arithmetic(f: (...x: number[]) => number, inputs: TypedInput[], source: string, method?: RecomputeMethod): Recomputed | undefined {
  const r = withInputRounding(f, inputs);
  return Number.isFinite(r.valueSI) ? { ...r, sigmaSI: 0, kind: 'arithmetic', source, method } : undefined;
}

function fitted(e: Estimate | undefined, source: string, method: RecomputeMethod, scale = CM): Recomputed | undefined {
  if (!e || !Number.isFinite(e.value)) return undefined;
  return { valueSI: e.value * scale, sigmaSI: e.stdError * scale, inputRoundingSI: 0, kind: 'fitted', source, method };
}

const exactly = (valueSI: number): TypedInput => ({ valueSI, roundingSI: 0 });

function fitMethod(f: BandFit): RecomputeMethod {
  return f.model === 'cubic' ? 'fit-with-centrifugal' : 'fit-without-centrifugal';
}

function fitSource(f: BandFit): string {
  return `recomputed from your line list (least-squares fit ${f.model === 'cubic' ? 'with' : 'without'} the centrifugal term −4Dm³)`;
}

/** The fits to try, the preferred first. */
function fits(own: OwnData): BandFit[] {
  const out: BandFit[] = [];
  if (own.fit) out.push(own.fit);
  if (own.alternativeFit) out.push(own.alternativeFit);
  return out;
}

/** B₀ and B₁ from combination differences of the lines, with D and without (as each fit has it). */
function combinationDifferenceBs(own: OwnData): { B0: Estimate; B1: Estimate }[] {
  const out: { B0: Estimate; B1: Estimate }[] = [];
  for (const f of fits(own)) {
    const cd = f.combinationDifferences;
    if (cd.B0 && cd.B1) out.push({ B0: cd.B0, B1: cd.B1 });
  }
  return out;
}

const CD_SOURCE = 'your line list through combination differences: R(J−1) − P(J+1) = 4B₀(J+½), R(J) − P(J) = 4B₁(J+½)';

/** Every defensible value of a quantity from the student's own data, the preferred first. */
export function recompute(key: QuantityKey, own: OwnData): Recomputed[] {
  return candidates(key, own).filter((r): r is Recomputed => r !== undefined);
}

/** One step per quantity (or family of quantities); a step leaves out what it cannot compute. */
function candidates(key: QuantityKey, own: OwnData): (Recomputed | undefined)[] {
  switch (key) {
    case 'bandCentre':
      return bandCentreValues(own);
    case 'reducedMass':
      return [
        {
          valueSI: own.species.reducedMassKg,
          sigmaSI: 0,
          inputRoundingSI: 0,
          kind: 'arithmetic',
          source: `μ = m₁m₂/(m₁ + m₂) from the isotopic masses of ${own.species.display}`,
        },
      ];
    case 'forceConstant':
      return forceConstantValues(own);
    case 'forceConstantE':
      return equilibriumForceConstantValues(own);
    case 'B0':
    case 'B1':
    case 'Be':
    case 'alphaE':
    case 'D':
      return rotationalConstantValues(key, own);
    case 're':
    case 'r0':
      return bondLengthValues(key, own);
    case 'omegaE':
    case 'omegaExe':
      return vibrationalConstantValues(key, own);
    case 'zeroPointEnergy':
    case 'dissociationEnergy':
    case 'dissociationEnergy0':
      return energyValues(key, own);
    case 'isotopeShift':
    case 'isotopeRatio':
      return isotopeValues(key, own);
  }
}

function bandCentreValues(own: OwnData): (Recomputed | undefined)[] {
  const out: (Recomputed | undefined)[] = [];
  for (const f of fits(own)) out.push(fitted(f.nu0, fitSource(f), fitMethod(f)));
  const r0 = own.fit?.residuals.find((l) => l.branch === 'R' && l.J === 0);
  const p1 = own.fit?.residuals.find((l) => l.branch === 'P' && l.J === 1);
  // Read from the gap: the midpoint of R(0) and P(1) is ν̃₀ + B₁ − B₀.
  if (r0 && p1)
    out.push(
      arithmetic(
        (a, b) => (a + b) / 2,
        [exactly(r0.observed * CM), exactly(p1.observed * CM)],
        'the middle of the band gap, (R(0) + P(1))/2, from your line list',
        'band-gap',
      ),
    );
  return out;
}

/** μ as the student typed it when they did (a rounded μ is not a slip), else exactly. */
function typedReducedMass(own: OwnData): TypedInput {
  const mu = own.species.reducedMassKg;
  return own.reported.reducedMass ? { valueSI: mu, roundingSI: own.reported.reducedMass.roundingSI } : exactly(mu);
}

function forceConstantValues(own: OwnData): (Recomputed | undefined)[] {
  const out: (Recomputed | undefined)[] = [];
  const mu = own.species.reducedMassKg;
  // k = 4π²c²ν̃₀²μ.
  const muIn = typedReducedMass(own);
  const k = (nu: number, m: number) => forceConstantFromBand(nu, m);
  if (own.bandCentre) out.push(arithmetic(k, [own.bandCentre, muIn], 'k = 4π²c²ν̃₀²μ from your band centre'));
  if (own.reportedBandCentre) out.push(arithmetic(k, [own.reportedBandCentre, muIn], 'k = 4π²c²ν̃₀²μ from your reported band centre'));
  if (!own.bandCentre && own.fit) {
    const e = own.fit.nu0;
    const kv = forceConstantFromBand(e.value * CM, mu);
    out.push({
      valueSI: kv,
      sigmaSI: (2 * e.stdError * kv) / e.value,
      inputRoundingSI: 0,
      kind: 'fitted',
      source: 'k = 4π²c²ν̃₀²μ from the band centre of your line fit',
    });
  }
  return out;
}

function equilibriumForceConstantValues(own: OwnData): (Recomputed | undefined)[] {
  const out: (Recomputed | undefined)[] = [];
  const rep = own.reported;
  const muIn = typedReducedMass(own);
  if (own.bandCentre && own.overtone) {
    out.push(
      arithmetic(
        (n1, n2, m) => forceConstantFromBand(3 * n1 - n2, m),
        [own.bandCentre, own.overtone, muIn],
        'kₑ = 4π²c²ωₑ²μ with ωₑ = 3ν̃₁←₀ − ν̃₂←₀ from your band positions',
        'your-band-positions',
      ),
    );
  }
  if (rep.omegaE)
    out.push(arithmetic((w, m) => forceConstantFromBand(w, m), [rep.omegaE, muIn], 'kₑ = 4π²c²ωₑ²μ from your ωₑ', 'your-reported-values'));
  return out;
}

function rotationalConstantValues(key: 'B0' | 'B1' | 'Be' | 'alphaE' | 'D', own: OwnData): (Recomputed | undefined)[] {
  const out: (Recomputed | undefined)[] = [];
  const rep = own.reported;
  for (const f of fits(own)) out.push(fitted(f[key], fitSource(f), fitMethod(f)));
  if (key !== 'D') {
    for (const cd of combinationDifferenceBs(own)) {
      const v = { B0: cd.B0, B1: cd.B1, Be: combine(cd.B0, cd.B1, 1.5, -0.5), alphaE: combine(cd.B0, cd.B1, 1, -1) }[key];
      out.push(fitted(v, CD_SOURCE, 'combination-differences'));
    }
  }
  // Bₑ and αₑ are arithmetic on the student's own B₀ and B₁ (an error in those is carried forward).
  if ((key === 'Be' || key === 'alphaE') && rep.B0 && rep.B1) {
    const f = key === 'Be' ? (b0: number, b1: number) => (3 * b0 - b1) / 2 : (b0: number, b1: number) => b0 - b1;
    out.push(
      arithmetic(
        f,
        [rep.B0, rep.B1],
        key === 'Be' ? 'Bₑ = (3B₀ − B₁)/2 from your B₀ and B₁' : 'αₑ = B₀ − B₁ from your B₀ and B₁',
        'your-rotational-constants',
      ),
    );
  }
  return out;
}

function bondLengthValues(key: 're' | 'r0', own: OwnData): (Recomputed | undefined)[] {
  const out: (Recomputed | undefined)[] = [];
  const mu = own.species.reducedMassKg;
  const rep = own.reported;
  const r = (B: number) => bondLengthFromB(B, mu);
  const name = key === 're' ? 'rₑ' : 'r₀';
  const B = key === 're' ? 'Bₑ' : 'B₀';
  const own_ = key === 're' ? rep.Be : rep.B0;
  if (own_ && own_.valueSI > 0) out.push(arithmetic(r, [own_], `${name} = √(h/(8π²cμ${B})) from your ${B}`, 'your-rotational-constants'));
  else if (key === 're' && rep.B0 && rep.B1) {
    out.push(
      arithmetic(
        (b0, b1) => r((3 * b0 - b1) / 2),
        [rep.B0, rep.B1],
        'rₑ = √(h/(8π²cμBₑ)) with Bₑ = (3B₀ − B₁)/2 from your B₀ and B₁',
        'your-rotational-constants',
      ),
    );
  }
  for (const f of fits(own)) {
    const e = f[key === 're' ? 'Be' : 'B0'];
    if (!(e.value > 0)) continue;
    const v = r(e.value * CM);
    out.push({
      valueSI: v,
      sigmaSI: (v * e.stdError) / (2 * e.value),
      inputRoundingSI: 0,
      kind: 'fitted',
      source: `${name} = √(h/(8π²cμ${B})) from ${B} of your line list (fit ${f.model === 'cubic' ? 'with' : 'without'} the centrifugal term)`,
      method: fitMethod(f),
    });
  }
  return out;
}

function vibrationalConstantValues(key: 'omegaE' | 'omegaExe', own: OwnData): (Recomputed | undefined)[] {
  if (!own.bandCentre || !own.overtone) return [];
  return key === 'omegaE'
    ? [
        arithmetic(
          (n1, n2) => 3 * n1 - n2,
          [own.bandCentre, own.overtone],
          'ωₑ = 3ν̃₁←₀ − ν̃₂←₀ from your band positions',
          'your-band-positions',
        ),
      ]
    : [
        arithmetic(
          (n1, n2) => (2 * n1 - n2) / 2,
          [own.bandCentre, own.overtone],
          'ωₑxₑ = (2ν̃₁←₀ − ν̃₂←₀)/2 from your band positions',
          'your-band-positions',
        ),
      ];
}

function energyValues(key: 'zeroPointEnergy' | 'dissociationEnergy' | 'dissociationEnergy0', own: OwnData): (Recomputed | undefined)[] {
  const out: (Recomputed | undefined)[] = [];
  const rep = own.reported;
  const energy = ENERGY_FORMULAS[key];
  // From the student's own ωₑ and ωₑxₑ (carried forward), else from their band positions.
  if (rep.omegaE && rep.omegaExe)
    out.push(
      arithmetic((w, x) => energy.of(w, x), [rep.omegaE, rep.omegaExe], `${energy.formula} from your ωₑ and ωₑxₑ`, 'your-reported-values'),
    );
  if (own.bandCentre && own.overtone) {
    out.push(
      arithmetic(
        (n1, n2) => energy.of(3 * n1 - n2, (2 * n1 - n2) / 2),
        [own.bandCentre, own.overtone],
        `${energy.formula} with ωₑ and ωₑxₑ from your band positions`,
        'your-band-positions',
      ),
    );
  }
  return out;
}

function isotopeValues(key: 'isotopeShift' | 'isotopeRatio', own: OwnData): (Recomputed | undefined)[] {
  const out: (Recomputed | undefined)[] = [];
  const partner = own.partner;
  if (!partner || !own.bandCentre) return out;
  const ratio = Math.sqrt(own.species.reducedMassKg / partner.reducedMassKg);
  if (own.partnerBandCentre) {
    const f = key === 'isotopeShift' ? (a: number, b: number) => b - a : (a: number, b: number) => b / a;
    out.push(
      arithmetic(
        f,
        [own.bandCentre, own.partnerBandCentre],
        `your band centres of ${own.species.display} and ${partner.display}`,
        'your-band-positions',
      ),
    );
  }
  // The harmonic prediction ν̃₀′ = ν̃₀√(μ/μ′) from the student's own band centre.
  const f = key === 'isotopeShift' ? (a: number) => a * ratio - a : () => ratio;
  out.push(
    arithmetic(
      f,
      [own.bandCentre],
      `the harmonic prediction ν̃₀′ = ν̃₀√(μ/μ′) for ${partner.display} from your band centre`,
      'harmonic-prediction',
    ),
  );
  return out;
}

/** a·x + b·y for two estimates (their covariance is not known here; taken as independent). */
function combine(x: Estimate, y: Estimate, a: number, b: number): Estimate {
  return { value: a * x.value + b * y.value, stdError: Math.hypot(a * x.stdError, b * y.stdError) };
}

/** The energies from ωₑ and ωₑxₑ (SI wavenumbers in, joules out). */
export const ENERGY_FORMULAS: Record<
  'zeroPointEnergy' | 'dissociationEnergy' | 'dissociationEnergy0',
  { formula: string; of: (omegaE: number, omegaExe: number) => number }
> = {
  zeroPointEnergy: { formula: 'G(0) = ωₑ/2 − ωₑxₑ/4', of: (w, x) => ENERGY_PER_WAVENUMBER * (w / 2 - x / 4) },
  dissociationEnergy: { formula: 'Morse Dₑ = ωₑ²/(4ωₑxₑ)', of: (w, x) => ENERGY_PER_WAVENUMBER * ((w * w) / (4 * x)) },
  dissociationEnergy0: {
    formula: 'Morse D₀ = ωₑ²/(4ωₑxₑ) − G(0)',
    of: (w, x) => ENERGY_PER_WAVENUMBER * ((w * w) / (4 * x) - (w / 2 - x / 4)),
  },
};
