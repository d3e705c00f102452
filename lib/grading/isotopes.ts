/**
 * Isotopic masses and natural abundances.
 *
 * Source: the npm package chemical-elements (cheminfo), which carries the AME2020 atomic
 * masses and the NIST "Atomic Weights and Isotopic Compositions" abundances. Masses are
 * atomic (neutral-atom) masses in u, as spectroscopists use them for reduced masses.
 * This small module is the only place that knows the package's data shape.
 */
import { elementsAndIsotopesObject } from 'chemical-elements';

export const ISOTOPE_SOURCE = 'AME2020 atomic masses / NIST Atomic Weights and Isotopic Compositions, via npm chemical-elements';

export interface IsotopeData {
  symbol: string;
  massNumber: number;
  /** Atomic mass in u. */
  massU: number;
  /** Natural abundance as a fraction (0–1); 0 for isotopes with no natural abundance. */
  abundance: number;
  source: string;
}

interface RawIsotope {
  nominal: number;
  mass: number;
  abundance?: number;
}
interface RawElement {
  symbol: string;
  number: number;
  mass: number | null;
  isotopes: RawIsotope[];
}

function element(symbol: string): RawElement | undefined {
  if (!Object.prototype.hasOwnProperty.call(elementsAndIsotopesObject, symbol)) return undefined;
  return elementsAndIsotopesObject[symbol] as RawElement | undefined;
}

export function isKnownElement(symbol: string): boolean {
  return element(symbol) !== undefined;
}

export function atomicNumber(symbol: string): number | undefined {
  return element(symbol)?.number;
}

export function isotope(symbol: string, massNumber: number): IsotopeData | undefined {
  const el = element(symbol);
  if (!el) return undefined;
  const iso = el.isotopes.find((i) => i.nominal === massNumber);
  if (!iso || !Number.isFinite(iso.mass)) return undefined;
  return { symbol, massNumber, massU: iso.mass, abundance: iso.abundance ?? 0, source: ISOTOPE_SOURCE };
}

/** Naturally occurring isotopes, most abundant first. */
export function stableIsotopes(symbol: string): IsotopeData[] {
  const el = element(symbol);
  if (!el) return [];
  return el.isotopes
    .filter((i) => typeof i.abundance === 'number' && i.abundance > 0)
    .sort((a, b) => (b.abundance ?? 0) - (a.abundance ?? 0))
    .map((i) => ({ symbol, massNumber: i.nominal, massU: i.mass, abundance: i.abundance ?? 0, source: ISOTOPE_SOURCE }));
}

/** "HF" means ¹H¹⁹F: an element written without mass number is its most abundant isotope. */
export function mostAbundantIsotope(symbol: string): IsotopeData | undefined {
  return stableIsotopes(symbol)[0];
}

/**
 * Abundance-weighted mean atomic mass (what a periodic table prints as the atomic weight,
 * e.g. Cl 35.45). Used only to recognise the slip of using it instead of an isotope's mass.
 */
export function meanAtomicMass(symbol: string): number | undefined {
  const el = element(symbol);
  if (!el || el.mass === null || !Number.isFinite(el.mass)) return undefined;
  return el.mass;
}
