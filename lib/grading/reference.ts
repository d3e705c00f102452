/**
 * Published ground-state (X) spectroscopic constants, each with its provenance.
 *
 * Compilation: K. P. Huber and G. Herzberg, Molecular Spectra and Molecular Structure IV:
 * Constants of Diatomic Molecules (Van Nostrand Reinhold, 1979), as tabulated in the NIST
 * Chemistry WebBook (NIST Standard Reference Database 69). The provenance strings are kept
 * honest: most rows are quoted from memory of that compilation, as the shared reference
 * table states. Isotopologues not in the table are computed from a parent row by the
 * isotope relations (same potential, Born–Oppenheimer) and say so.
 *
 * Units here: cm⁻¹, except rₑ in Å.
 */
import { c, e, h } from './constants';
import { parseSpecies, type Species, elementKey, isotopologueKey } from './species';

/** 1 cm⁻¹ in eV: hc × 100 m⁻¹ / e (CODATA 2018). */
const WAVENUMBER_IN_EV = (h * c * 100) / e;

export interface MolecularConstants {
  omegaE: number;
  omegaExe: number;
  omegaEye?: number;
  Be: number;
  alphaE: number;
  /** Centrifugal distortion constant Dₑ (rotational, not the dissociation energy). */
  De?: number;
  /** Equilibrium bond length in Å. */
  reAngstrom: number;
}

export interface ReferenceEntry {
  /** Normalised formula of the isotopologue. */
  formula: string;
  constants: MolecularConstants;
  provenance: string;
  /** Measured band origin of the fundamental (v = 1 ← 0), cm⁻¹, where known. */
  bandOrigin?: { value: number; provenance: string };
  /** Measured first overtone (v = 2 ← 0), cm⁻¹, where known. */
  overtone?: { value: number; provenance: string };
  /**
   * Measured dissociation energy D₀ from the lowest level, eV (the spectroscopic value, not the
   * Morse estimate, which overshoots it).
   */
  dissociationEnergy0?: { valueEV: number; provenance: string; /** The row whose tabulated D₀ this one is computed from. */ from?: string };
  /** Harmonic force constant kₑ as a standard physical chemistry textbook table gives it, N m⁻¹. */
  textbookForceConstant?: { value: number; provenance: string };
  /** For computed isotopologues: the formula of the row they were derived from. */
  derivedFrom?: string;
}

const HH = 'Huber & Herzberg (1979) via NIST Chemistry WebBook';
const MEMORY = `${HH}, from memory`;
const MEMORY_CCCBDB = `${HH}, from memory; NIST CCCBDB (Irikura, J. Phys. Chem. Ref. Data 36, 389 (2007)) agrees`;
const BAND_ORIGIN = 'band origin of high-resolution measurements, from memory';
const TEXTBOOK = 'standard physical chemistry textbook table, from memory';

function row(
  formula: string,
  omegaE: number,
  omegaExe: number,
  omegaEye: number | undefined,
  Be: number,
  alphaE: number,
  De: number | undefined,
  reAngstrom: number,
  provenance: string,
  extra: Partial<ReferenceEntry> = {},
): ReferenceEntry {
  return { formula, constants: { omegaE, omegaExe, omegaEye, Be, alphaE, De, reAngstrom }, provenance, ...extra };
}

const DISSOCIATION = `D₀ as tabulated by ${HH}, from memory`;
const band = (value: number) => ({ value, provenance: BAND_ORIGIN });
const d0 = (valueEV: number) => ({ valueEV, provenance: DISSOCIATION });
const textbook = (value: number) => ({ value, provenance: TEXTBOOK });

/** The rows of the shared reference table, by normalised formula. */
export const REFERENCE_TABLE: readonly ReferenceEntry[] = [
  row('H35Cl', 2990.946, 52.8186, 0.2243, 10.59341, 0.30718, 5.3194e-4, 1.27455, MEMORY_CCCBDB, {
    bandOrigin: band(2885.98),
    overtone: band(5667.98),
    textbookForceConstant: textbook(516),
    dissociationEnergy0: d0(4.4336),
  }),
  row('D35Cl', 2145.163, 27.1825, 0.08649, 5.448794, 0.113291, 1.395e-4, 1.27458, MEMORY),
  row('H79Br', 2648.975, 45.2175, -0.0029, 8.464884, 0.23328, 3.4575e-4, 1.41444, MEMORY, {
    bandOrigin: band(2558.53),
    textbookForceConstant: textbook(412),
    dissociationEnergy0: d0(3.758),
  }),
  // Bₑ computed from rₑ = 1.60916 Å with AME2020 masses: the number an earlier table gave as Bₑ
  // (6.426365) is B₀ = Bₑ − αₑ/2 (shared reference table, note on H¹²⁷I).
  row(
    'H127I',
    2309.014,
    39.6435,
    -0.02,
    6.511,
    0.16886,
    2.069e-4,
    1.60916,
    `${HH}: ωₑ, ωₑxₑ, ωₑyₑ, αₑ read from a stored copy of the NIST WebBook page; Bₑ computed from rₑ`,
    {
      textbookForceConstant: textbook(314),
      dissociationEnergy0: d0(3.0541),
    },
  ),
  row('H19F', 4138.32, 89.88, 0.9, 20.9557, 0.798, 2.151e-3, 0.91681, MEMORY, {
    bandOrigin: band(3961.42),
    textbookForceConstant: textbook(966),
    dissociationEnergy0: d0(5.869),
  }),
  row('12C16O', 2169.81358, 13.28831, 0.010511, 1.93128087, 0.01750441, 6.12147e-6, 1.128323, MEMORY, {
    bandOrigin: band(2143.27),
    overtone: band(4260.06),
    textbookForceConstant: textbook(1902),
    dissociationEnergy0: d0(11.092),
  }),
  row('14N2', 2358.57, 14.324, -0.00226, 1.998241, 0.017318, 5.76e-6, 1.09768, MEMORY, {
    textbookForceConstant: textbook(2294),
    dissociationEnergy0: d0(9.759),
  }),
  row(
    '16O2',
    1580.193,
    11.981,
    0.04747,
    1.44563,
    0.0159,
    4.839e-6,
    1.20752,
    `${HH}: ωₑ, ωₑxₑ, ωₑyₑ as printed in a public reproduction of the NIST table; the rest from memory`,
    {
      textbookForceConstant: textbook(1177),
      dissociationEnergy0: d0(5.1156),
    },
  ),
  row('H2', 4401.213, 121.336, 0.8129, 60.853, 3.0622, 4.71e-2, 0.74144, MEMORY_CCCBDB, {
    textbookForceConstant: textbook(575),
    dissociationEnergy0: d0(4.4781),
  }),
  row('35Cl2', 559.72, 2.675, undefined, 0.2439, 0.0014, undefined, 1.9879, MEMORY, {
    textbookForceConstant: textbook(323),
    dissociationEnergy0: d0(2.4794),
  }),
  row('7LiH', 1405.65, 23.2, 0.163, 7.5131, 0.2132, 8.617e-4, 1.5957, `${HH}, read from a stored copy of the NIST WebBook page`, {
    dissociationEnergy0: d0(2.429),
  }),
];

/** Band origins measured for isotopologues whose other constants are computed. */
const EXTRA_BAND_ORIGINS: Record<string, number> = { H37Cl: 2883.88 };

/** Isotopologues the app offers besides the table rows; their constants are computed. */
const DERIVED_FORMULAS = [
  'H37Cl',
  'D37Cl',
  'H81Br',
  'D79Br',
  'D81Br',
  'D19F',
  'D127I',
  '13C16O',
  '12C18O',
  '13C18O',
  'HD',
  'D2',
  '14N15N',
  '15N2',
  '16O18O',
  '18O2',
  '35Cl37Cl',
  '37Cl2',
  '6LiH',
  '7LiD',
];

const byKey = new Map<string, ReferenceEntry>();
const parentsByElements = new Map<string, { entry: ReferenceEntry; species: Species }[]>();
for (const entry of REFERENCE_TABLE) {
  const parsed = parseSpecies(entry.formula);
  if (!parsed.ok) continue;
  byKey.set(isotopologueKey(parsed.species), entry);
  const list = parentsByElements.get(elementKey(parsed.species)) ?? [];
  list.push({ entry, species: parsed.species });
  parentsByElements.set(elementKey(parsed.species), list);
}

// Table rows without a tabulated D₀ (D³⁵Cl) take it from a row of the same molecule (H³⁵Cl).
for (const list of parentsByElements.values()) {
  const withD0 = list.find((p) => p.entry.dissociationEnergy0);
  if (!withD0) continue;
  for (const p of list)
    if (!p.entry.dissociationEnergy0) p.entry.dissociationEnergy0 = dissociationEnergyFromParent(withD0.entry, p.entry.constants);
}

/** D₀ of an isotopologue from another one's D₀: the same well depth Dₑ = D₀ + G(0), so D₀ moves by the change in G(0). */
function dissociationEnergyFromParent(parent: ReferenceEntry, constants: MolecularConstants): ReferenceEntry['dissociationEnergy0'] {
  const parentD0 = parent.dissociationEnergy0;
  if (!parentD0) return undefined;
  const origin = parentD0.from ?? parent.formula;
  return {
    valueEV: parentD0.valueEV + (vibrationalTerm(parent.constants, 0) - vibrationalTerm(constants, 0)) * WAVENUMBER_IN_EV,
    provenance: `computed from D₀ of ${origin} (${DISSOCIATION}) through the zero-point energies (same well depth)`,
    from: origin,
  };
}

/**
 * Isotope relations for the same potential, with ρ = √(μ/μᵢ):
 * ωₑ ∝ ρ, ωₑxₑ ∝ ρ², ωₑyₑ ∝ ρ³, Bₑ ∝ ρ², αₑ ∝ ρ³, Dₑ ∝ ρ⁴; rₑ unchanged.
 */
export function scaleByIsotopeRelations(k: MolecularConstants, muParent: number, muTarget: number): MolecularConstants {
  const rho = Math.sqrt(muParent / muTarget);
  return {
    omegaE: k.omegaE * rho,
    omegaExe: k.omegaExe * rho ** 2,
    omegaEye: k.omegaEye === undefined ? undefined : k.omegaEye * rho ** 3,
    Be: k.Be * rho ** 2,
    alphaE: k.alphaE * rho ** 3,
    De: k.De === undefined ? undefined : k.De * rho ** 4,
    reAngstrom: k.reAngstrom,
  };
}

/** G(v) = ωₑ(v+½) − ωₑxₑ(v+½)² + ωₑyₑ(v+½)³, cm⁻¹. */
export function vibrationalTerm(k: MolecularConstants, v: number): number {
  const x = v + 0.5;
  return k.omegaE * x - k.omegaExe * x * x + (k.omegaEye ?? 0) * x * x * x;
}

const derivedCache = new Map<string, ReferenceEntry | undefined>();

/**
 * The reference entry for any isotopologue of a molecule in the table: the row itself, or a
 * computed entry derived from the row of the same molecule (the one closest in reduced mass).
 */
export function referenceEntry(speciesOrFormula: Species | string): ReferenceEntry | undefined {
  let species: Species;
  if (typeof speciesOrFormula === 'string') {
    const parsed = parseSpecies(speciesOrFormula);
    if (!parsed.ok) return undefined;
    species = parsed.species;
  } else species = speciesOrFormula;
  const key = isotopologueKey(species);
  const direct = byKey.get(key);
  if (direct) return direct;
  if (derivedCache.has(key)) return derivedCache.get(key);
  const parents = parentsByElements.get(elementKey(species));
  let result: ReferenceEntry | undefined;
  if (parents && parents.length > 0) {
    const parent = parents.reduce((best, p) =>
      Math.abs(Math.log(p.species.reducedMassU / species.reducedMassU)) <
      Math.abs(Math.log(best.species.reducedMassU / species.reducedMassU))
        ? p
        : best,
    );
    const constants = scaleByIsotopeRelations(parent.entry.constants, parent.species.reducedMassU, species.reducedMassU);
    let bandOrigin: ReferenceEntry['bandOrigin'];
    if (EXTRA_BAND_ORIGINS[species.formula] !== undefined) {
      bandOrigin = band(EXTRA_BAND_ORIGINS[species.formula]);
    } else if (parent.entry.bandOrigin) {
      // Carry the parent's measured origin over with the computed change in G(1) − G(0): this keeps
      // the measured correction for the terms the three-term G(v) leaves out.
      const shift =
        vibrationalTerm(constants, 1) -
        vibrationalTerm(constants, 0) -
        (vibrationalTerm(parent.entry.constants, 1) - vibrationalTerm(parent.entry.constants, 0));
      bandOrigin = {
        value: parent.entry.bandOrigin.value + shift,
        provenance: `computed from ${parent.entry.formula} (${BAND_ORIGIN}) by isotope relations`,
      };
    }
    const dissociationEnergy0 = dissociationEnergyFromParent(parent.entry, constants);
    result = {
      formula: species.formula,
      constants,
      provenance: `computed from ${parent.entry.formula} by isotope relations (${parent.entry.provenance})`,
      bandOrigin,
      dissociationEnergy0,
      derivedFrom: parent.entry.formula,
    };
  }
  derivedCache.set(key, result);
  return result;
}

/** Every isotopologue the reference table covers, the table rows first, then the computed ones. */
export function listKnownSpecies(): { formula: string; display: string; provenance: string; derived: boolean }[] {
  const out: { formula: string; display: string; provenance: string; derived: boolean }[] = [];
  for (const f of [...REFERENCE_TABLE.map((r) => r.formula), ...DERIVED_FORMULAS]) {
    const parsed = parseSpecies(f);
    if (!parsed.ok) continue;
    const entry = referenceEntry(parsed.species);
    if (!entry) continue;
    out.push({
      formula: parsed.species.formula,
      display: parsed.species.display,
      provenance: entry.provenance,
      derived: entry.derivedFrom !== undefined,
    });
  }
  return out;
}
