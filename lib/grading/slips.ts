/**
 * Slip diagnosis: the usual ways a calculation goes wrong, each as a model that redoes the
 * calculation with the slip. A slip is named only when its model reproduces the student's
 * number within rounding; never otherwise. `unit-mismatch` is named only when no calculation
 * slip fits, and `power-of-ten` only when nothing more specific does.
 */
import { c, h, u } from './constants';
import { forceConstantFromBand, bondLengthFromB } from './harmonic';
import { meanAtomicMass, stableIsotopes } from './isotopes';
import type { QuantityKey } from './quantities';
import { QUANTITIES } from './quantities';
import { reducedMass, speciesFromAtoms, type Species } from './species';
import { lookupUnit, toSI, unitsFor, squashUnit } from './units';

export const SLIP_CODES = [
  'mass-numbers-used',
  'average-atomic-mass-used',
  'single-atom-mass-used',
  'sum-of-masses-used',
  'molar-mass-not-per-molecule',
  'grams-not-kilograms',
  'unified-mass-not-converted',
  'missing-2pi',
  'wavenumber-used-as-frequency',
  'speed-of-light-in-m-per-s',
  'per-metre-per-centimetre-confusion',
  'omega-e-instead-of-band-centre',
  'band-centre-instead-of-omega-e',
  'wrong-isotopologue',
  'r-branch-numbered-from-j',
  'b0-b1-swapped',
  'r0-reported-as-re',
  'p-branch-numbered-from-j-plus-1',
  'zero-point-energy-omitted',
  'anharmonicity-not-halved',
  'isotope-shift-sign',
  'ratio-without-square-root',
  'constants-rounded',
  'power-of-ten',
  'unit-mismatch',
] as const;

export type SlipCode = (typeof SLIP_CODES)[number];

export interface SlipInfo {
  code: SlipCode;
  title: string;
  explanation: string;
  /** The correct relation, as plain text, for the feedback PDF and statistics page. */
  formula: string;
}

function slip(code: SlipCode, title: string, explanation: string, formula: string): SlipInfo {
  return { code, title, explanation, formula };
}

export const SLIPS: Record<SlipCode, SlipInfo> = {
  'mass-numbers-used': slip(
    'mass-numbers-used',
    'Mass numbers used as masses',
    'The reduced mass was worked out from the whole mass numbers (such as 1 and 35) instead of the isotopic masses. Use the isotopic masses in u (¹H 1.007825 u, ³⁵Cl 34.968853 u).',
    'μ = m₁m₂/(m₁ + m₂) with isotopic masses',
  ),
  'average-atomic-mass-used': slip(
    'average-atomic-mass-used',
    'Average atomic mass used',
    'The periodic-table (abundance-averaged) atomic mass was used, but each line of the spectrum belongs to one isotopologue: use the mass of the isotope in that molecule.',
    'μ = m₁m₂/(m₁ + m₂) with the masses of the specific isotopes',
  ),
  'single-atom-mass-used': slip(
    'single-atom-mass-used',
    'Mass of one atom used instead of μ',
    'The mass of a single atom was used where the reduced mass belongs. Both atoms move about the centre of mass; the oscillator mass is μ = m₁m₂/(m₁ + m₂).',
    'μ = m₁m₂/(m₁ + m₂)',
  ),
  'sum-of-masses-used': slip(
    'sum-of-masses-used',
    'Sum of the masses used instead of μ',
    'The total mass m₁ + m₂ was used where the reduced mass m₁m₂/(m₁ + m₂) belongs.',
    'μ = m₁m₂/(m₁ + m₂)',
  ),
  'molar-mass-not-per-molecule': slip(
    'molar-mass-not-per-molecule',
    'Molar mass not divided by the Avogadro constant',
    'A molar mass (per mole) was used as the mass of one molecule. Divide by N_A = 6.02214076 × 10²³ mol⁻¹ to get kg per molecule.',
    'μ/kg = (μ/g mol⁻¹) × 10⁻³ / N_A',
  ),
  'grams-not-kilograms': slip(
    'grams-not-kilograms',
    'Grams not converted to kilograms',
    'The mass was in grams when the SI formula needs kilograms (a factor of 1000).',
    '1 g = 10⁻³ kg',
  ),
  'unified-mass-not-converted': slip(
    'unified-mass-not-converted',
    'Mass in u used as if in kg',
    'The reduced mass in atomic mass units was put into an SI formula without converting to kilograms.',
    '1 u = 1.66053906660 × 10⁻²⁷ kg',
  ),
  'missing-2pi': slip(
    'missing-2pi',
    'Factor 2π missing',
    'The factor of 2π that relates frequency and angular frequency was left out (k came out smaller by 4π²).',
    'k = 4π²c²ν̃²μ',
  ),
  'wavenumber-used-as-frequency': slip(
    'wavenumber-used-as-frequency',
    'Wavenumber used as a frequency',
    'The wavenumber was used as if it were a frequency in Hz; the speed of light is missing. Multiply by c to turn a wavenumber into a frequency.',
    'ν = cν̃, so k = 4π²c²ν̃²μ',
  ),
  'speed-of-light-in-m-per-s': slip(
    'speed-of-light-in-m-per-s',
    'c in m s⁻¹ with ν̃ in cm⁻¹',
    'The speed of light was taken in m s⁻¹ while the wavenumber stayed in cm⁻¹. Use c = 2.99792458 × 10¹⁰ cm s⁻¹ with cm⁻¹, or convert ν̃ to m⁻¹.',
    'k = 4π²c²ν̃²μ with c and ν̃ in matching units',
  ),
  'per-metre-per-centimetre-confusion': slip(
    'per-metre-per-centimetre-confusion',
    'cm⁻¹ and m⁻¹ confused',
    'A wavenumber in cm⁻¹ and one in m⁻¹ were mixed up (1 cm⁻¹ = 100 m⁻¹).',
    '1 cm⁻¹ = 100 m⁻¹',
  ),
  'omega-e-instead-of-band-centre': slip(
    'omega-e-instead-of-band-centre',
    'ωₑ used instead of the band centre',
    'This quantity is asked for from the measured band centre ν̃₀, but the harmonic wavenumber ωₑ was used.',
    'k = 4π²c²ν̃₀²μ (band centre); kₑ = 4π²c²ωₑ²μ',
  ),
  'band-centre-instead-of-omega-e': slip(
    'band-centre-instead-of-omega-e',
    'Band centre used instead of ωₑ',
    'This quantity belongs to the harmonic wavenumber ωₑ = ν̃₀ + 2ωₑxₑ, but the band centre ν̃₀ was used.',
    'ωₑ = ν̃₁←₀ + 2ωₑxₑ; kₑ = 4π²c²ωₑ²μ',
  ),
  'wrong-isotopologue': slip(
    'wrong-isotopologue',
    'Masses of the wrong isotopologue',
    'The masses belong to a different isotopologue (for example H instead of D, or ³⁷Cl instead of ³⁵Cl) from the one whose band was measured.',
    'μ from the isotopes of the molecule measured',
  ),
  'r-branch-numbered-from-j': slip(
    'r-branch-numbered-from-j',
    'R branch numbered from J instead of J + 1',
    'In the fit against the running number m, R(J) lines must have m = J + 1 (and P(J) lines m = −J). Numbering the R branch with m = J shifts ν̃₀ and the rotational constants.',
    'R(J): m = J + 1; P(J): m = −J; ν̃(m) = ν̃₀ + (B₁+B₀)m + (B₁−B₀)m²',
  ),
  'b0-b1-swapped': slip(
    'b0-b1-swapped',
    'B₀ and B₁ swapped',
    'The ground- and upper-state rotational constants were interchanged (a sign that αₑ came out negative). The m² coefficient is B₁ − B₀ and is negative, since B₁ < B₀.',
    'B₀ = (b − c)/2, B₁ = (b + c)/2 from ν̃ = ν̃₀ + bm + cm²',
  ),
  'r0-reported-as-re': slip(
    'r0-reported-as-re',
    'r₀ reported as rₑ',
    'The bond length from B₀ is r₀, averaged over the zero-point vibration; rₑ comes from Bₑ = B₀ + αₑ/2.',
    'rₑ = √(h/(8π²cμBₑ)), r₀ = √(h/(8π²cμB₀))',
  ),
  'p-branch-numbered-from-j-plus-1': slip(
    'p-branch-numbered-from-j-plus-1',
    'P lines numbered one too high',
    'The lines of the P branch are labelled one J too high (the band gap misread): the first line below the gap is P(1). Numbered so, the fit leaves residuals of several cm⁻¹; renumbered, it fits to the precision of the measurement.',
    'P(J) = ν̃₀ − (B₁ + B₀)J + (B₁ − B₀)J², the first P line is P(1)',
  ),
  'zero-point-energy-omitted': slip(
    'zero-point-energy-omitted',
    'Zero-point energy not subtracted',
    'D₀ is measured from the lowest level v = 0, not from the bottom of the well: subtract the zero-point energy G(0) from Dₑ.',
    'D₀ = Dₑ − G(0), G(0) = ωₑ/2 − ωₑxₑ/4',
  ),
  'anharmonicity-not-halved': slip(
    'anharmonicity-not-halved',
    'ωₑxₑ not divided by 2',
    'From ν̃₁←₀ = ωₑ − 2ωₑxₑ and ν̃₂←₀ = 2ωₑ − 6ωₑxₑ it follows that 2ν̃₁←₀ − ν̃₂←₀ = 2ωₑxₑ: the difference is twice the anharmonicity constant.',
    'ωₑxₑ = (2ν̃₁←₀ − ν̃₂←₀)/2, ωₑ = ν̃₁←₀ + 2ωₑxₑ',
  ),
  'isotope-shift-sign': slip(
    'isotope-shift-sign',
    'Isotope shift with the wrong sign',
    'The shift is defined as ν̃₀(partner) − ν̃₀(this isotopologue): the heavier isotopologue has the lower band centre, so the shift to a heavier partner is negative.',
    'Δν̃₀ = ν̃₀′ − ν̃₀ = ν̃₀(√(μ/μ′) − 1)',
  ),
  'ratio-without-square-root': slip(
    'ratio-without-square-root',
    'Ratio of reduced masses without the square root',
    'With the same force constant the wavenumber goes as 1/√μ, so the band centres are in the ratio of the square roots of the reduced masses, not of the masses themselves.',
    'ν̃₀′/ν̃₀ = √(μ/μ′)',
  ),
  'constants-rounded': slip(
    'constants-rounded',
    'Constants rounded more than the answer',
    'The number follows from rounded constants or masses (such as c = 3.00 × 10⁸ m s⁻¹, h = 6.626 × 10⁻³⁴ J s or masses to four decimals), but it is quoted to more figures than those constants carry. Use the constants to at least as many figures as the answer (CODATA 2018, AME2020), or round the answer.',
    'c = 2.99792458 × 10⁸ m s⁻¹, h = 6.62607015 × 10⁻³⁴ J s, u = 1.66053906660 × 10⁻²⁷ kg',
  ),
  'power-of-ten': slip(
    'power-of-ten',
    'Out by a power of ten',
    'The digits are right but the number is out by a power of ten: check unit prefixes and conversions.',
    'check prefixes: 10⁻² m = 1 cm, 10⁻¹⁰ m = 1 Å, 10⁻³ kg = 1 g',
  ),
  'unit-mismatch': slip(
    'unit-mismatch',
    'Unit missing or wrong',
    'The number is right, but the unit given with it is wrong or missing.',
    'a quantity = number × unit',
  ),
};

// ---------------------------------------------------------------------------------------

/** Values of the student's (or the reference) inputs, SI: wavenumbers in m⁻¹. */
export interface SlipInputs {
  species: Species;
  nu0?: number;
  omegaE?: number;
  omegaExe?: number;
  B0?: number;
  B1?: number;
  /** Bₑ the student worked from (their own, else (3B₀ − B₁)/2). */
  Be?: number;
  /** The fit redone with the R branch numbered m = J (SI wavenumbers), when lines were given. */
  misnumberedFit?: () => FittedConstants | undefined;
  /**
   * When the student's P lines were found numbered one too high and the check renumbered them:
   * the constants of the fit of the lines as the student numbered them (SI wavenumbers).
   */
  asLabelledFit?: FittedConstants;
  /** Reduced mass of the partner isotopologue, kg, and its band centre when measured (m⁻¹). */
  partnerMu?: number;
  partnerNu0?: number;
}

export interface FittedConstants {
  nu0: number;
  B0: number;
  B1: number;
  Be: number;
  alphaE: number;
  D?: number;
}

export interface SlipCandidate {
  code: SlipCode;
  valueSI: number;
  detail?: string;
}

interface MassVariant {
  code: SlipCode;
  muKg: number;
  detail?: string;
}

const massCache = new WeakMap<Species, MassVariant[]>();

/** Reduced masses a student might have used instead of the right one, kg. */
export function massVariants(species: Species): MassVariant[] {
  const hit = massCache.get(species);
  if (hit) return hit;
  const [a, b] = species.atoms;
  const out: MassVariant[] = [];
  out.push({ code: 'mass-numbers-used', muKg: reducedMass(a.massNumber, b.massNumber) * u });
  const ma = meanAtomicMass(a.symbol);
  const mb = meanAtomicMass(b.symbol);
  if (ma !== undefined && mb !== undefined) out.push({ code: 'average-atomic-mass-used', muKg: reducedMass(ma, mb) * u });
  out.push({ code: 'single-atom-mass-used', muKg: a.massU * u, detail: `the mass of ${a.symbol} alone` });
  if (b.massU !== a.massU) out.push({ code: 'single-atom-mass-used', muKg: b.massU * u, detail: `the mass of ${b.symbol} alone` });
  out.push({ code: 'sum-of-masses-used', muKg: (a.massU + b.massU) * u });
  out.push({ code: 'molar-mass-not-per-molecule', muKg: species.reducedMassU * 1e-3 });
  out.push({ code: 'grams-not-kilograms', muKg: species.reducedMassKg * 1e3 });
  out.push({ code: 'unified-mass-not-converted', muKg: species.reducedMassU });
  const seen = new Set<string>([species.formula]);
  for (const idx of [0, 1] as const) {
    const atom = species.atoms[idx];
    for (const iso of stableIsotopes(atom.symbol)) {
      if (iso.massNumber === atom.massNumber) continue;
      const atoms: [Species['atoms'][0], Species['atoms'][1]] = [species.atoms[0], species.atoms[1]];
      atoms[idx] = { symbol: atom.symbol, massNumber: iso.massNumber, massU: iso.massU, source: iso.source };
      const other = speciesFromAtoms(atoms[0], atoms[1]);
      if (seen.has(other.formula)) continue;
      seen.add(other.formula);
      out.push({ code: 'wrong-isotopologue', muKg: other.reducedMassKg, detail: `the masses of ${other.display}` });
    }
  }
  massCache.set(species, out);
  return out;
}

/** Constants as students round them, as factors on the exact value, with the words for the message. */
const ROUNDED_CONSTANTS: { c: number; h: number; u: number; detail: string }[] = [
  { c: 3e8 / c, h: 1, u: 1, detail: 'c = 3 × 10⁸ m s⁻¹' },
  { c: 2.998e8 / c, h: 1, u: 1, detail: 'c = 2.998 × 10⁸ m s⁻¹' },
  { c: 1, h: 6.626e-34 / h, u: 1, detail: 'h = 6.626 × 10⁻³⁴ J s' },
  { c: 1, h: 6.63e-34 / h, u: 1, detail: 'h = 6.63 × 10⁻³⁴ J s' },
  { c: 1, h: 1, u: 1.6605e-27 / u, detail: 'u = 1.6605 × 10⁻²⁷ kg' },
  { c: 1, h: 1, u: 1.661e-27 / u, detail: 'u = 1.661 × 10⁻²⁷ kg' },
  { c: 1, h: 1, u: 1.66e-27 / u, detail: 'u = 1.66 × 10⁻²⁷ kg' },
];

/** k = 4π²c²ν̃²μ and r = √(h/(8π²cμB)) with one constant rounded (added to `out`); NaN scalings are skipped. */
function pushRoundedConstants(out: SlipCandidate[], exact: number, scaling: (c: number, h: number, u: number) => number): void {
  for (const r of ROUNDED_CONSTANTS) {
    const f = scaling(r.c, r.h, r.u);
    if (Number.isFinite(f)) out.push({ code: 'constants-rounded', valueSI: exact * f, detail: r.detail });
  }
}

/** μ from isotopic masses rounded to four or three decimals. */
function pushRoundedMasses(out: SlipCandidate[], species: Species): void {
  const [a, b] = species.atoms;
  for (const places of [4, 3]) {
    const f = 10 ** places;
    const muU = reducedMass(Math.round(a.massU * f) / f, Math.round(b.massU * f) / f);
    out.push({ code: 'constants-rounded', valueSI: muU * u, detail: `isotopic masses to ${places} decimals` });
  }
}

/** A wavenumber-based value with cm⁻¹ and m⁻¹ confused, either way (added to `out`). */
function pushPerMetre(out: SlipCandidate[], x: number): void {
  out.push({ code: 'per-metre-per-centimetre-confusion', valueSI: x * 100 });
  out.push({ code: 'per-metre-per-centimetre-confusion', valueSI: x / 100 });
}

/** k = 4π²c²ν̃²μ redone under each slip (added to `out`). */
function pushForceConstantSlips(
  out: SlipCandidate[],
  nu: number,
  mu: number,
  species: Species,
  alternativeNu: number | undefined,
  alternativeCode: SlipCode,
): void {
  const k = forceConstantFromBand(nu, mu);
  for (const v of massVariants(species)) out.push({ code: v.code, valueSI: forceConstantFromBand(nu, v.muKg), detail: v.detail });
  out.push({ code: 'missing-2pi', valueSI: k / (4 * Math.PI * Math.PI) });
  // ν̃ (in cm⁻¹ or m⁻¹) put where ν in Hz belongs: c missing from k = 4π²ν²μ.
  out.push({ code: 'wavenumber-used-as-frequency', valueSI: 4 * Math.PI * Math.PI * (nu / 100) ** 2 * mu });
  out.push({ code: 'wavenumber-used-as-frequency', valueSI: 4 * Math.PI * Math.PI * nu ** 2 * mu });
  // c in m s⁻¹ with ν̃ in cm⁻¹: (c/100)² too small by 10⁴. ν̃ in m⁻¹ with c in cm s⁻¹: 10⁴ too big.
  out.push({ code: 'speed-of-light-in-m-per-s', valueSI: k * 1e-4 });
  out.push({ code: 'per-metre-per-centimetre-confusion', valueSI: k * 1e4 });
  if (alternativeNu !== undefined && alternativeNu > 0)
    out.push({ code: alternativeCode, valueSI: forceConstantFromBand(alternativeNu, mu) });
  // k ∝ c²·u (μ in kg from μ in u); h does not enter.
  pushRoundedConstants(out, k, (cf, hf, uf) => (hf === 1 ? cf * cf * uf : NaN));
}

/** r = √(h/(8π²cμB)) redone under each slip (added to `out`). */
function pushBondLengthSlips(out: SlipCandidate[], B: number, species: Species): void {
  const mu = species.reducedMassKg;
  const r = bondLengthFromB(B, mu);
  for (const v of massVariants(species)) out.push({ code: v.code, valueSI: bondLengthFromB(B, v.muKg), detail: v.detail });
  // B in cm⁻¹ with c in m s⁻¹ → r × 10; B in m⁻¹ with c in cm s⁻¹ → r / 10.
  out.push({ code: 'speed-of-light-in-m-per-s', valueSI: r * 10 });
  out.push({ code: 'per-metre-per-centimetre-confusion', valueSI: r / 10 });
  // 8π² written as 8 (π² lost) or as 2 ((2π)² lost).
  out.push({ code: 'missing-2pi', valueSI: r * Math.PI });
  out.push({ code: 'missing-2pi', valueSI: r * 2 * Math.PI });
  // r ∝ √(h/(c·u)).
  pushRoundedConstants(out, r, (cf, hf, uf) => Math.sqrt(hf / (cf * uf)));
}

const hc = h * c;

/** Candidate values (SI) of a quantity under each calculation slip, from the given inputs. */
export function slipCandidates(key: QuantityKey, x: SlipInputs): SlipCandidate[] {
  const mu = x.species.reducedMassKg;
  const out: SlipCandidate[] = [];
  const Be = x.Be ?? (x.B0 !== undefined && x.B1 !== undefined ? (3 * x.B0 - x.B1) / 2 : undefined);
  const BeSwapped = x.B0 !== undefined && x.B1 !== undefined ? (3 * x.B1 - x.B0) / 2 : undefined;
  switch (key) {
    case 'reducedMass':
      for (const v of massVariants(x.species))
        if (v.code !== 'unified-mass-not-converted') out.push({ code: v.code, valueSI: v.muKg, detail: v.detail });
      pushRoundedMasses(out, x.species);
      break;
    case 'forceConstant':
      if (x.nu0 !== undefined) pushForceConstantSlips(out, x.nu0, mu, x.species, x.omegaE, 'omega-e-instead-of-band-centre');
      break;
    case 'forceConstantE':
      if (x.omegaE !== undefined) pushForceConstantSlips(out, x.omegaE, mu, x.species, x.nu0, 'band-centre-instead-of-omega-e');
      if (x.nu0 !== undefined && x.omegaExe !== undefined)
        out.push({ code: 'anharmonicity-not-halved', valueSI: forceConstantFromBand(x.nu0 + 4 * x.omegaExe, mu) });
      break;
    case 'bandCentre': {
      const f = x.misnumberedFit?.();
      if (f) out.push({ code: 'r-branch-numbered-from-j', valueSI: f.nu0 });
      if (x.asLabelledFit) out.push({ code: 'p-branch-numbered-from-j-plus-1', valueSI: x.asLabelledFit.nu0 });
      if (x.nu0 !== undefined) pushPerMetre(out, x.nu0);
      break;
    }
    case 'B0':
    case 'B1':
    case 'Be':
    case 'alphaE':
    case 'D': {
      const f = x.misnumberedFit?.();
      const v = f?.[key];
      if (v !== undefined) out.push({ code: 'r-branch-numbered-from-j', valueSI: v });
      const labelled = x.asLabelledFit?.[key];
      if (labelled !== undefined) out.push({ code: 'p-branch-numbered-from-j-plus-1', valueSI: labelled });
      if (x.B0 !== undefined && x.B1 !== undefined) {
        const swapped = { B0: x.B1, B1: x.B0, Be: BeSwapped, alphaE: x.B1 - x.B0, D: undefined }[key];
        if (swapped !== undefined) out.push({ code: 'b0-b1-swapped', valueSI: swapped });
        const right = { B0: x.B0, B1: x.B1, Be, alphaE: x.B0 - x.B1, D: undefined }[key];
        if (right !== undefined) pushPerMetre(out, right);
      }
      break;
    }
    case 're':
      if (Be !== undefined && Be > 0) pushBondLengthSlips(out, Be, x.species);
      if (x.B0 !== undefined && x.B0 > 0) out.push({ code: 'r0-reported-as-re', valueSI: bondLengthFromB(x.B0, mu) });
      if (BeSwapped !== undefined && BeSwapped > 0) out.push({ code: 'b0-b1-swapped', valueSI: bondLengthFromB(BeSwapped, mu) });
      {
        const f = x.misnumberedFit?.();
        if (f && f.Be > 0) out.push({ code: 'r-branch-numbered-from-j', valueSI: bondLengthFromB(f.Be, mu) });
        if (x.asLabelledFit && x.asLabelledFit.Be > 0)
          out.push({ code: 'p-branch-numbered-from-j-plus-1', valueSI: bondLengthFromB(x.asLabelledFit.Be, mu) });
      }
      break;
    case 'r0':
      if (x.B0 !== undefined && x.B0 > 0) pushBondLengthSlips(out, x.B0, x.species);
      if (x.B1 !== undefined && x.B1 > 0) out.push({ code: 'b0-b1-swapped', valueSI: bondLengthFromB(x.B1, mu) });
      {
        const f = x.misnumberedFit?.();
        if (f && f.B0 > 0) out.push({ code: 'r-branch-numbered-from-j', valueSI: bondLengthFromB(f.B0, mu) });
        if (x.asLabelledFit && x.asLabelledFit.B0 > 0)
          out.push({ code: 'p-branch-numbered-from-j-plus-1', valueSI: bondLengthFromB(x.asLabelledFit.B0, mu) });
      }
      break;
    case 'omegaE':
      if (x.omegaE !== undefined) pushPerMetre(out, x.omegaE);
      // ωₑ = ν̃₁←₀ + 2ωₑxₑ with the undivided difference 2ν̃₁←₀ − ν̃₂←₀ = 2ωₑxₑ taken as ωₑxₑ.
      if (x.nu0 !== undefined && x.omegaExe !== undefined) out.push({ code: 'anharmonicity-not-halved', valueSI: x.nu0 + 4 * x.omegaExe });
      break;
    case 'omegaExe':
      if (x.omegaExe !== undefined) {
        pushPerMetre(out, x.omegaExe);
        out.push({ code: 'anharmonicity-not-halved', valueSI: 2 * x.omegaExe });
      }
      break;
    case 'zeroPointEnergy':
    case 'dissociationEnergy':
    case 'dissociationEnergy0': {
      if (x.omegaE === undefined || x.omegaExe === undefined) break;
      const energy = (we: number, wx: number) => {
        const zpe = we / 2 - wx / 4;
        const De = (we * we) / (4 * wx);
        return hc * (key === 'zeroPointEnergy' ? zpe : key === 'dissociationEnergy' ? De : De - zpe);
      };
      pushPerMetre(out, energy(x.omegaE, x.omegaExe));
      if (key === 'dissociationEnergy0')
        out.push({ code: 'zero-point-energy-omitted', valueSI: hc * ((x.omegaE * x.omegaE) / (4 * x.omegaExe)) });
      // ωₑxₑ left undivided, with ωₑ taken from the student's ωₑ or redone from it.
      out.push({ code: 'anharmonicity-not-halved', valueSI: energy(x.omegaE, 2 * x.omegaExe) });
      if (x.nu0 !== undefined) {
        out.push({ code: 'anharmonicity-not-halved', valueSI: energy(x.nu0 + 4 * x.omegaExe, 2 * x.omegaExe) });
        out.push({ code: 'band-centre-instead-of-omega-e', valueSI: energy(x.nu0, x.omegaExe) });
        if (key === 'zeroPointEnergy') out.push({ code: 'band-centre-instead-of-omega-e', valueSI: (hc * x.nu0) / 2 });
      }
      break;
    }
    case 'isotopeShift':
      if (x.nu0 !== undefined && x.partnerMu !== undefined) {
        const shift = x.partnerNu0 !== undefined ? x.partnerNu0 - x.nu0 : x.nu0 * (Math.sqrt(mu / x.partnerMu) - 1);
        out.push({ code: 'isotope-shift-sign', valueSI: -shift });
        out.push({ code: 'ratio-without-square-root', valueSI: x.nu0 * (mu / x.partnerMu - 1) });
        pushPerMetre(out, shift);
      }
      break;
    case 'isotopeRatio':
      if (x.partnerMu !== undefined) out.push({ code: 'ratio-without-square-root', valueSI: mu / x.partnerMu });
      break;
  }
  // A model that gives no finite number (a zero B, say) names nothing.
  const finite: SlipCandidate[] = [];
  for (const cand of out) if (Number.isFinite(cand.valueSI)) finite.push(cand);
  return finite;
}

// ---------------------------------------------------------------------------------------

export interface Diagnosis {
  code: SlipCode;
  message: string;
}

export interface DiagnoseInput {
  key: QuantityKey;
  reportedSI: number;
  /** The number as typed and the unit as typed (for unit-mismatch). */
  reportedValue: number;
  reportedUnit: string;
  expectedSI: number;
  /** Half-width of the band the number failed (candidates inside it are indistinguishable from right). */
  bandHalfWidthSI: number;
  /** Relative rounding of the typed number and of the inputs it was worked out from. */
  window: number;
  inputs?: SlipInputs;
}

/**
 * Largest relative window for "reproduces within rounding", for intermediate rounding in a hand
 * calculation. A slip that moves the number by less than twice this gets half its own size as
 * the window, so a small slip (average atomic masses move μ(HCl) by 0.055 %) is still told apart
 * from the right answer; and the number must always be nearer the slip than the right answer.
 */
export const MIN_SLIP_WINDOW = 0.003;

/** Does the slip's value `candidate` reproduce `reported` (and better than the right value `expected` does)? */
function reproduces(reported: number, candidate: number, expected: number, window: number): boolean {
  const toCandidate = Math.abs(reported - candidate);
  const toExpected = Math.abs(reported - expected);
  if (!(toCandidate < toExpected)) return false;
  const allowance = Math.max(
    window * Math.abs(candidate),
    Math.min(MIN_SLIP_WINDOW * Math.abs(candidate), 0.5 * Math.abs(candidate - expected)),
  );
  return toCandidate <= allowance;
}

function close(a: number, b: number, window: number): boolean {
  return Math.abs(a - b) <= window * Math.abs(b);
}

function message(code: SlipCode, detail?: string): string {
  const s = SLIPS[code];
  return detail ? `${s.title} (${detail}): ${s.explanation}` : `${s.title}: ${s.explanation}`;
}

/** 10ⁿ for n = −30 … 30, the factors tried for `power-of-ten` (computed once, not per diagnosis). */
const POWER_OF_TEN_MIN = -30;
const POWERS_OF_TEN: number[] = [];
for (let n = POWER_OF_TEN_MIN; n <= 30; n++) POWERS_OF_TEN.push(Math.pow(10, n));

const SUPERSCRIPT_DIGITS = '⁰¹²³⁴⁵⁶⁷⁸⁹';
const toSuperscriptDigit = (ch: string) => SUPERSCRIPT_DIGITS[Number(ch)];

/** Names the slips that reproduce the reported number. Empty when none does. */
export function diagnose(d: DiagnoseInput): Diagnosis[] {
  const { reportedSI, expectedSI, window } = d;
  if (!Number.isFinite(reportedSI) || !Number.isFinite(expectedSI)) return [];
  const found = new Map<SlipCode, string | undefined>();
  if (d.inputs) {
    for (const cand of slipCandidates(d.key, d.inputs)) {
      // A candidate inside the band the number failed is indistinguishable from the right answer.
      const distinguishable = Math.abs(cand.valueSI - expectedSI) > d.bandHalfWidthSI;
      if (!distinguishable) continue;
      if (reproduces(reportedSI, cand.valueSI, expectedSI, window) && !found.has(cand.code)) found.set(cand.code, cand.detail);
    }
  }
  if (found.size === 0) {
    const um = unitMismatch(d);
    if (um) found.set('unit-mismatch', um);
  }
  if (found.size === 0 && expectedSI !== 0) {
    for (let n = -30; n <= 30; n++) {
      if (n === 0) continue;
      const v = expectedSI * POWERS_OF_TEN[n - POWER_OF_TEN_MIN];
      if (close(reportedSI, v, Math.max(window, MIN_SLIP_WINDOW))) {
        found.set('power-of-ten', `out by a factor of 10${n < 0 ? '⁻' : ''}${String(Math.abs(n)).replace(/\d/g, toSuperscriptDigit)}`);
        break;
      }
    }
  }
  const out: Diagnosis[] = [];
  for (const [code, detail] of found) out.push({ code, message: message(code, detail) });
  return out;
}

/** The number typed is right when read in another unit of the same dimension (or the unit is missing). */
function unitMismatch(d: DiagnoseInput): string | undefined {
  const dim = QUANTITIES[d.key].dimension;
  const typed = lookupUnit(d.reportedUnit, dim);
  const missing = squashUnit(d.reportedUnit ?? '') === '' && dim !== 'ratio';
  for (const def of unitsFor(dim)) {
    if (typed && def.display === typed.display && def.kind === typed.kind) continue;
    const conv = toSI(d.reportedValue, def.display, dim);
    if (!conv.ok) continue;
    if (close(conv.valueSI, d.expectedSI, Math.max(d.window, MIN_SLIP_WINDOW))) {
      return missing
        ? `the number is right in ${def.display}, but no unit was given`
        : `the number is right in ${def.display || 'no unit'}, not in ${d.reportedUnit}`;
    }
  }
  return undefined;
}
