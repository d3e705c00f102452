/**
 * What the cell should show: the isotopologues of each molecule named (in natural isotopic
 * abundance) and the lines of their fundamental (v = 1 ← 0) and first overtone (v = 2 ← 0)
 * predicted from the published constants.
 *
 * Isotopologues: an element written without a mass number ("HCl", "CO") stands for each of
 * its isotopes with a natural abundance of at least 0.5 % (³⁵Cl and ³⁷Cl, ⁷⁹Br and ⁸¹Br,
 * ¹²C and ¹³C; ²H, ¹⁵N, ¹⁷O and ¹⁸O fall below it), weighted by that abundance (IUPAC
 * representative isotopic compositions, through lib/grading's isotope table). An isotope
 * written out ("D", "35Cl") is the sample's own choice and weighs 1.
 *
 * Lines (the same formulas as the fit): F_v(J) = B_v J(J+1) − D J²(J+1)², B_v = Bₑ − αₑ(v+½),
 * R(J) = ν̃₀ + F_v(J+1) − F₀(J), P(J) = ν̃₀ + F_v(J−1) − F₀(J), i.e. with m = J+1 for R(J) and
 * m = −J for P(J): ν̃(m) = ν̃₀ + (B_v+B₀)m + (B_v−B₀)m² − 4Dm³.
 * Band origins: the measured one where the reference table has it (carried to a computed
 * isotopologue with the computed change of G(v) − G(0)), otherwise G(v) − G(0).
 * Relative intensities (for weighting and plausibility only; nothing is fitted to them):
 * abundance × Hönl–London factor × Boltzmann population at 298 K, S_R = J+1, S_P = J.
 */
import {
  c,
  h,
  kB,
  isotopologueKey,
  parseSpecies,
  referenceEntry,
  speciesFromAtoms,
  stableIsotopes,
  vibrationalTerm,
  type MolecularConstants,
  type Species,
} from '@/lib/grading';

/** Isotopes below this natural abundance are not looked for. */
export const MIN_NATURAL_ABUNDANCE = 0.005;
const TEMPERATURE = 298;
/** Lines weaker than this share of the band's strongest are not predicted. */
const MIN_RELATIVE_INTENSITY = 2e-4;

export type BandKind = 'fundamental' | 'overtone';

export const BAND_LABEL: Record<BandKind, string> = { fundamental: 'fundamental (1←0)', overtone: 'first overtone (2←0)' };

export interface Isotopologue {
  formula: string;
  display: string;
  species: Species;
  /** The molecule as the caller named it ("HCl"). */
  molecule: string;
  /** Product of the natural abundances of the atoms the name left open (1 for those written out). */
  abundance: number;
  /** 0 for the most abundant isotopologue of the molecule, then 1, 2, … */
  rank: number;
  /** Same elements (HCl and DCl share one potential). */
  elements: string;
  referenceProvenance: string;
}

export type IsotopologueList = { ok: true; isotopologues: Isotopologue[] } | { ok: false; message: string };

const SUPERSCRIPT_DIGITS: Record<string, string> = {
  '⁰': '0',
  '¹': '1',
  '²': '2',
  '³': '3',
  '⁴': '4',
  '⁵': '5',
  '⁶': '6',
  '⁷': '7',
  '⁸': '8',
  '⁹': '9',
};

/** Whether the name writes the atom's isotope out ("35Cl", "D", "¹³C"). */
function isotopeWrittenOut(name: string, atom: Species['atoms'][0]): boolean {
  const text = name.replace(/[⁰¹²³⁴⁵⁶⁷⁸⁹]/g, (ch) => SUPERSCRIPT_DIGITS[ch]).replace(/\s+/g, '');
  if (atom.symbol === 'H' && atom.massNumber !== 1) return true; // D or T
  return new RegExp(`(^|[^0-9])${atom.massNumber}${atom.symbol}(?![a-z])`).test(text);
}

/** The isotopologues a molecule's name stands for, most abundant first. */
export function isotopologuesOf(name: string): IsotopologueList {
  const parsed = parseSpecies(name);
  if (!parsed.ok) return { ok: false, message: parsed.message };
  const [a, b] = parsed.species.atoms;
  if (a.symbol === b.symbol) {
    return {
      ok: false,
      message: `${parsed.species.display} has no dipole moment to change, so it has no infrared vibrational spectrum of its own.`,
    };
  }
  const choices = [a, b].map((atom) => {
    if (isotopeWrittenOut(name, atom)) return [{ atom, abundance: 1 }];
    const natural = stableIsotopes(atom.symbol).filter((i) => i.abundance >= MIN_NATURAL_ABUNDANCE);
    return natural.map((i) => ({
      atom: { symbol: atom.symbol, massNumber: i.massNumber, massU: i.massU, source: i.source },
      abundance: i.abundance,
    }));
  });
  const out: Isotopologue[] = [];
  for (const x of choices[0]) {
    for (const y of choices[1]) {
      const species = speciesFromAtoms(x.atom, y.atom);
      const entry = referenceEntry(species);
      if (!entry) {
        return { ok: false, message: `Oscillab has no published constants for ${species.display}, so its bands cannot be predicted.` };
      }
      out.push({
        formula: species.formula,
        display: species.display,
        species,
        molecule: name.trim(),
        abundance: x.abundance * y.abundance,
        rank: 0,
        elements: [a.symbol, b.symbol].sort().join(''),
        referenceProvenance: entry.provenance,
      });
    }
  }
  out.sort((p, q) => q.abundance - p.abundance);
  out.forEach((iso, i) => (iso.rank = i));
  return { ok: true, isotopologues: out };
}

/** Isotopologues of several molecules, without repeats (HCl and H35Cl name one). */
export function isotopologuesOfAll(names: readonly string[]): { isotopologues: Isotopologue[]; problems: string[] } {
  const seen = new Set<string>();
  const isotopologues: Isotopologue[] = [];
  const problems: string[] = [];
  for (const name of names) {
    const r = isotopologuesOf(name);
    if (!r.ok) {
      problems.push(`${name}: ${r.message}`);
      continue;
    }
    for (const iso of r.isotopologues) {
      const key = isotopologueKey(iso.species);
      if (seen.has(key)) continue;
      seen.add(key);
      isotopologues.push(iso);
    }
  }
  return { isotopologues, problems };
}

export interface BandConstantsGuess {
  /** Band origin ν̃₀, cm⁻¹. */
  origin: number;
  /** Lower (v = 0) and upper level rotational constants, cm⁻¹. */
  B0: number;
  Bupper: number;
  /** Centrifugal distortion constant, cm⁻¹ (the same in both levels). */
  D: number;
}

export interface PredictedLine {
  branch: 'P' | 'R';
  J: number;
  m: number;
  wavenumber: number;
  /** Relative to the strongest line of the molecule's major isotopologue in the same band. */
  intensity: number;
}

export interface BandPrediction {
  isotopologue: Isotopologue;
  band: BandKind;
  vUpper: 1 | 2;
  constants: BandConstantsGuess;
  originProvenance: string;
  /**
   * G(v) − G(0) from the published ωₑ, ωₑxₑ, ωₑyₑ: one model for every band and isotopologue,
   * what a calibration check compares with. Three terms reproduce measured origins to about
   * 0.1 cm⁻¹ for a fundamental and 1 cm⁻¹ for an overtone (higher terms left out).
   */
  termOrigin: { value: number; uncertainty: number };
  lines: PredictedLine[];
}

/** ν̃(m) = ν̃₀ + (B′+B″)m + (B′−B″)m² − 4Dm³. */
export function linePosition(k: BandConstantsGuess, m: number): number {
  return k.origin + (k.Bupper + k.B0) * m + (k.Bupper - k.B0) * m * m - 4 * k.D * m * m * m;
}

function overtoneOrigin(k: MolecularConstants, iso: Isotopologue): { value: number; provenance: string } {
  const computed = vibrationalTerm(k, 2) - vibrationalTerm(k, 0);
  const entry = referenceEntry(iso.species);
  if (entry?.overtone) return { value: entry.overtone.value, provenance: entry.overtone.provenance };
  if (entry?.derivedFrom) {
    const parent = referenceEntry(entry.derivedFrom);
    if (parent?.overtone) {
      const parentComputed = vibrationalTerm(parent.constants, 2) - vibrationalTerm(parent.constants, 0);
      return {
        value: parent.overtone.value + computed - parentComputed,
        provenance: `computed from ${parent.formula} (${parent.overtone.provenance}) by isotope relations`,
      };
    }
  }
  return { value: computed, provenance: 'G(2) − G(0) from the reference constants' };
}

/** hc/k_B in cm K (c in cm s⁻¹). */
const SECOND_RADIATION = (h * c * 100) / kB;

/** The predicted band of one isotopologue; undefined when there are no constants. */
export function predictBand(iso: Isotopologue, band: BandKind): BandPrediction | undefined {
  const entry = referenceEntry(iso.species);
  if (!entry) return undefined;
  const k = entry.constants;
  const v = band === 'fundamental' ? 1 : 2;
  const origin =
    band === 'fundamental'
      ? (entry.bandOrigin ?? {
          value: vibrationalTerm(k, 1) - vibrationalTerm(k, 0),
          provenance: 'G(1) − G(0) from the reference constants',
        })
      : overtoneOrigin(k, iso);
  const constants: BandConstantsGuess = {
    origin: origin.value,
    B0: k.Be - k.alphaE / 2,
    Bupper: k.Be - k.alphaE * (v + 0.5),
    D: k.De ?? 0,
  };
  const beta = SECOND_RADIATION / TEMPERATURE;
  const population = (J: number) => Math.exp(-beta * (constants.B0 * J * (J + 1) - constants.D * J * J * (J + 1) * (J + 1)));
  const raw: PredictedLine[] = [];
  let strongest = 0;
  for (let J = 0; J <= 80; J++) {
    const p = population(J);
    const r = (J + 1) * p;
    const q = J * p;
    strongest = Math.max(strongest, r, q);
    if (J > 3 && Math.max(r, q) < MIN_RELATIVE_INTENSITY * strongest) break;
    raw.push({ branch: 'R', J, m: J + 1, wavenumber: linePosition(constants, J + 1), intensity: r });
    if (J >= 1) raw.push({ branch: 'P', J, m: -J, wavenumber: linePosition(constants, -J), intensity: q });
  }
  // Past the R-branch head (where B′ < B″ turns the branch back) the lines pile up unresolved.
  const lines: PredictedLine[] = [];
  for (const l of raw) {
    if (l.intensity < MIN_RELATIVE_INTENSITY * strongest) continue;
    if (l.branch === 'R') {
      const spacing = linePosition(constants, l.m + 1) - l.wavenumber;
      if (!(spacing > 0) && l.m > 1) continue;
    }
    lines.push(l);
  }
  // Scale: the strongest line of a fully abundant isotopologue = 1, times this one's abundance.
  for (const l of lines) l.intensity = (l.intensity / strongest) * iso.abundance;
  lines.sort((p, q) => p.wavenumber - q.wavenumber);
  const termOrigin = { value: vibrationalTerm(k, v) - vibrationalTerm(k, 0), uncertainty: v === 1 ? 0.1 : 1 };
  return { isotopologue: iso, band, vUpper: v, constants, originProvenance: origin.provenance, termOrigin, lines };
}
