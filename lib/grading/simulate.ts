/**
 * Line lists of the fundamental band generated from published constants by the textbook
 * formulas, for the app's spectrum generator, the demo and the tests:
 *   F_v(J) = B_v J(J+1) − D J²(J+1)²,  B_v = Bₑ − αₑ(v+½)
 *   R(J) = ν̃₀ + F₁(J+1) − F₀(J),  P(J) = ν̃₀ + F₁(J−1) − F₀(J)
 * Relative intensity: the Boltzmann population of the lower level, (2J+1) exp(−hcB₀J(J+1)/kT),
 * times the natural abundance of the isotopologue when a chlorine partner is added.
 */
import { c, h, kB } from './constants';
import { referenceEntry, vibrationalTerm, type MolecularConstants } from './reference';
import { parseSpecies, speciesFromAtoms, type Species } from './species';
import { isotope, stableIsotopes } from './isotopes';
import type { Branch } from './fit';

export interface SimulatedLine {
  branch: Branch;
  J: number;
  /** cm⁻¹ */
  wavenumber: number;
  /** Relative intensity, strongest line of the list = 1. */
  intensity: number;
  /** Normalised formula of the isotopologue that makes this line. */
  species: string;
}

export interface SimulateOptions {
  /** Highest lower-level J of either branch (default 10). */
  jMax?: number;
  /** Include −D J²(J+1)² in the rotational terms (default true). */
  withCentrifugal?: boolean;
  /** Add the lines of the other chlorine isotopologue (H³⁷Cl beside H³⁵Cl), weighted by abundance. */
  isotopeChlorine?: boolean;
  /** Temperature for the populations, K (default 298). */
  temperature?: number;
  /** Override the band origin (cm⁻¹), e.g. to mimic a calibration offset. */
  bandOrigin?: number;
}

export interface BandConstants {
  nu0: number;
  B0: number;
  B1: number;
  D: number;
}

/** ν̃₀, B₀ = Bₑ − αₑ/2, B₁ = Bₑ − 3αₑ/2 and D for a species from the reference table. */
export function bandConstants(species: Species | string): BandConstants | undefined {
  const entry = referenceEntry(species);
  if (!entry) return undefined;
  const k: MolecularConstants = entry.constants;
  const nu0 = entry.bandOrigin?.value ?? vibrationalTerm(k, 1) - vibrationalTerm(k, 0);
  return { nu0, B0: k.Be - k.alphaE / 2, B1: k.Be - (3 * k.alphaE) / 2, D: k.De ?? 0 };
}

/** Lines of one isotopologue from given band constants. */
export function linesFromConstants(
  k: BandConstants,
  opts: { jMax?: number; withCentrifugal?: boolean; temperature?: number; abundance?: number; species?: string } = {},
): SimulatedLine[] {
  const jMax = Math.max(1, Math.min(200, Math.floor(opts.jMax ?? 10)));
  const D = opts.withCentrifugal === false ? 0 : k.D;
  const T = opts.temperature ?? 298;
  const F = (B: number, J: number) => B * J * (J + 1) - D * J * J * (J + 1) * (J + 1);
  // hc/kT with B in cm⁻¹: c in cm s⁻¹
  const beta = (h * c * 100) / (kB * T);
  const pop = (J: number) => (2 * J + 1) * Math.exp(-beta * k.B0 * J * (J + 1));
  const out: SimulatedLine[] = [];
  const species = opts.species ?? '';
  const ab = opts.abundance ?? 1;
  for (let J = jMax; J >= 1; J--)
    out.push({ branch: 'P', J, wavenumber: k.nu0 + F(k.B1, J - 1) - F(k.B0, J), intensity: ab * pop(J), species });
  for (let J = 0; J <= jMax; J++)
    out.push({ branch: 'R', J, wavenumber: k.nu0 + F(k.B1, J + 1) - F(k.B0, J), intensity: ab * pop(J), species });
  return out;
}

/** The partner that differs only in the chlorine isotope (H³⁵Cl ↔ H³⁷Cl), if any. */
export function chlorinePartner(species: Species): Species | undefined {
  const idx = species.atoms.findIndex((a) => a.symbol === 'Cl');
  if (idx < 0) return undefined;
  const other = species.atoms[idx].massNumber === 35 ? 37 : 35;
  const iso = isotope('Cl', other);
  if (!iso) return undefined;
  const atoms = [...species.atoms] as [Species['atoms'][0], Species['atoms'][1]];
  atoms[idx] = { symbol: 'Cl', massNumber: other, massU: iso.massU, source: iso.source };
  return speciesFromAtoms(atoms[0], atoms[1]);
}

function abundanceOf(s: Species): number {
  return s.atoms.reduce((prod, a) => prod * (stableIsotopes(a.symbol).find((i) => i.massNumber === a.massNumber)?.abundance ?? 1), 1);
}

/**
 * Simulated line list of the fundamental band. Returns [] for a species without reference
 * constants (check with referenceValues first).
 */
export function simulateLineList(speciesInput: Species | string, options: SimulateOptions = {}): SimulatedLine[] {
  const species =
    typeof speciesInput === 'string'
      ? (() => {
          const p = parseSpecies(speciesInput);
          return p.ok ? p.species : undefined;
        })()
      : speciesInput;
  if (!species) return [];
  const k = bandConstants(species);
  if (!k) return [];
  if (options.bandOrigin !== undefined && Number.isFinite(options.bandOrigin)) k.nu0 = options.bandOrigin;
  const base = { jMax: options.jMax, withCentrifugal: options.withCentrifugal, temperature: options.temperature };
  let lines: SimulatedLine[];
  if (options.isotopeChlorine) {
    const partner = chlorinePartner(species);
    const kp = partner ? bandConstants(partner) : undefined;
    lines = linesFromConstants(k, { ...base, abundance: abundanceOf(species), species: species.formula });
    if (partner && kp) {
      if (options.bandOrigin !== undefined && Number.isFinite(options.bandOrigin))
        kp.nu0 += options.bandOrigin - (bandConstants(species)?.nu0 ?? 0);
      lines = lines.concat(linesFromConstants(kp, { ...base, abundance: abundanceOf(partner), species: partner.formula }));
    }
  } else {
    lines = linesFromConstants(k, { ...base, species: species.formula });
  }
  const max = lines.reduce((mx, l) => Math.max(mx, l.intensity), 0) || 1;
  for (const l of lines) l.intensity /= max;
  return lines.sort((a, b) => a.wavenumber - b.wavenumber);
}
