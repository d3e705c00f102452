/**
 * Isotopologues: "H35Cl", "D35Cl", "1H79Br", "12C16O", "14N2", "HF", "H³⁵Cl", or two isotope
 * labels ["1H", "35Cl"]. D means ²H; an element without a mass number means its most
 * abundant isotope. Masses are isotopic (not average atomic) masses.
 */
import { u } from './constants';
import { isKnownElement, isotope, mostAbundantIsotope, atomicNumber } from './isotopes';
import { superscript } from './units';

export interface Atom {
  /** Element symbol ("H" also for deuterium). */
  symbol: string;
  massNumber: number;
  /** Atomic mass in u. */
  massU: number;
  source: string;
}

export interface Species {
  /** Normalised formula: "H35Cl", "D35Cl", "12C16O", "14N2", "H2", "HD". */
  formula: string;
  /** Unicode display: "H³⁵Cl", "¹²C¹⁶O", "¹⁴N₂". */
  display: string;
  atoms: [Atom, Atom];
  /** μ = m₁m₂/(m₁+m₂) in u. */
  reducedMassU: number;
  reducedMassKg: number;
}

export type ParseSpeciesResult = { ok: true; species: Species } | { ok: false; message: string };

export type SpeciesInput = string | readonly string[] | { atoms: readonly { symbol: string; massNumber?: number; massU?: number }[] };

/** μ = m₁m₂/(m₁+m₂): the mass that moves in the relative coordinate of a two-body oscillator. */
export function reducedMass(m1: number, m2: number): number {
  return (m1 * m2) / (m1 + m2);
}

const SUP_DIGITS: Record<string, string> = {
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

interface Token {
  symbol: string;
  massNumber?: number;
  count: number;
  label: string;
}

function tokenize(text: string): Token[] | string {
  let s = text
    .normalize('NFC')
    .replace(/[⁰¹²³⁴⁵⁶⁷⁸⁹]/g, (ch) => `^${SUP_DIGITS[ch]}`)
    .replace(/₂/g, '2')
    .replace(/\^+/g, '');
  s = s.replace(/[\s\-–—,;:/()[\]{}·]+/g, ' ').trim();
  const re = /(\d+)?([A-Z][a-z]?)(\d+)?/y;
  const tokens: Token[] = [];
  let pos = 0;
  while (pos < s.length) {
    if (s[pos] === ' ') {
      pos++;
      continue;
    }
    re.lastIndex = pos;
    const m = re.exec(s);
    if (!m) return `Cannot read "${text}" at "${s.slice(pos)}": write isotopologues like H35Cl, D35Cl, 12C16O or 14N2.`;
    pos = re.lastIndex;
    const [, pre, sym, post] = m;
    let count = 1;
    if (post !== undefined) {
      // A number after a symbol is a mass number of the next atom when a symbol follows it
      // directly ("H35Cl"), otherwise a count ("N2", "14N2").
      const nextSymbol = /^[A-Z][a-z]?/.exec(s.slice(pos))?.[0];
      const isMassNumberOfNext =
        nextSymbol !== undefined && (nextSymbol === 'D' || isotope(nextSymbol, Number(post)) !== undefined || Number(post) > 9);
      if (isMassNumberOfNext) {
        // Put the digits back for the next atom.
        pos -= post.length;
      } else {
        count = Number(post);
      }
    }
    if (sym === 'D' || sym === 'T') {
      if (pre !== undefined) return `"${pre}${sym}" is not an isotope: D already means ²H.`;
      tokens.push({ symbol: 'H', massNumber: sym === 'D' ? 2 : 3, count, label: sym });
      continue;
    }
    if (!isKnownElement(sym)) return `"${sym}" is not a chemical element.`;
    tokens.push({ symbol: sym, massNumber: pre === undefined ? undefined : Number(pre), count, label: sym });
  }
  return tokens;
}

function atomFrom(symbol: string, massNumber: number | undefined): Atom | string {
  const iso = massNumber === undefined ? mostAbundantIsotope(symbol) : isotope(symbol, massNumber);
  if (!iso) {
    return massNumber === undefined
      ? `${symbol} has no naturally occurring isotope; give a mass number.`
      : `There is no isotope ${massNumber}${symbol} in the isotope table.`;
  }
  return { symbol, massNumber: iso.massNumber, massU: iso.massU, source: iso.source };
}

function atomLabel(a: Atom): { formula: string; display: string } {
  if (a.symbol === 'H' && a.massNumber === 1) return { formula: 'H', display: 'H' };
  if (a.symbol === 'H' && a.massNumber === 2) return { formula: 'D', display: 'D' };
  return { formula: `${a.massNumber}${a.symbol}`, display: `${superscript(String(a.massNumber))}${a.symbol}` };
}

/** Builds a species from two atoms (lighter-element first is not imposed: the order typed is kept). */
export function speciesFromAtoms(a: Atom, b: Atom): Species {
  const la = atomLabel(a);
  const lb = atomLabel(b);
  const same = a.symbol === b.symbol && a.massNumber === b.massNumber;
  const formula = same ? `${la.formula}2` : la.formula + lb.formula;
  const display = same ? `${la.display}₂` : la.display + lb.display;
  const reducedMassU = reducedMass(a.massU, b.massU);
  return { formula, display, atoms: [a, b], reducedMassU, reducedMassKg: reducedMassU * u };
}

const cache = new Map<string, ParseSpeciesResult>();

export function parseSpecies(input: unknown): ParseSpeciesResult {
  if (typeof input === 'string') {
    const hit = cache.get(input);
    if (hit) return hit;
    const result = parseSpeciesUncached(input);
    if (cache.size < 1000) cache.set(input, result);
    return result;
  }
  return parseSpeciesUncached(input);
}

function parseSpeciesUncached(input: unknown): ParseSpeciesResult {
  try {
    if (Array.isArray(input)) {
      if (input.length !== 2 || !input.every((x) => typeof x === 'string')) {
        return { ok: false, message: 'Give a diatomic molecule as two isotope labels, e.g. ["1H", "35Cl"].' };
      }
      return parseSpeciesUncached(`${input[0]} ${input[1]}`);
    }
    if (input !== null && typeof input === 'object' && Array.isArray((input as { atoms?: unknown }).atoms)) {
      return fromAtomList((input as { atoms: unknown[] }).atoms);
    }
    if (typeof input !== 'string') return { ok: false, message: 'The species must be a formula such as "H35Cl".' };
    const text = input.trim();
    if (text === '') return { ok: false, message: 'No species given; write it like H35Cl or 12C16O.' };
    if (text.length > 40) return { ok: false, message: 'The species formula is too long.' };
    const tokens = tokenize(text);
    if (typeof tokens === 'string') return { ok: false, message: tokens };
    const atoms: Atom[] = [];
    for (const t of tokens) {
      for (let i = 0; i < t.count && atoms.length < 3; i++) {
        const atom = atomFrom(t.symbol, t.massNumber);
        if (typeof atom === 'string') return { ok: false, message: atom };
        atoms.push(atom);
      }
    }
    if (atoms.length !== 2) {
      return {
        ok: false,
        message: `"${text}" is not a diatomic molecule (Oscillab marks two-atom molecules such as HCl, DCl, HBr or CO).`,
      };
    }
    return { ok: true, species: speciesFromAtoms(atoms[0], atoms[1]) };
  } catch {
    return { ok: false, message: 'The species could not be read.' };
  }
}

function fromAtomList(list: unknown[]): ParseSpeciesResult {
  if (list.length !== 2) return { ok: false, message: 'A diatomic molecule has exactly two atoms.' };
  const atoms: Atom[] = [];
  for (const raw of list) {
    const a = raw as { symbol?: unknown; massNumber?: unknown; massU?: unknown };
    if (typeof a?.symbol !== 'string' || !isKnownElement(a.symbol))
      return { ok: false, message: `"${String(a?.symbol)}" is not a chemical element.` };
    if (a.massU !== undefined) {
      if (typeof a.massU !== 'number' || !Number.isFinite(a.massU) || a.massU <= 0) {
        return { ok: false, message: `The mass of ${a.symbol} must be a positive number of u.` };
      }
      const mn =
        typeof a.massNumber === 'number' && Number.isInteger(a.massNumber) && a.massNumber > 0 ? a.massNumber : Math.round(a.massU);
      atoms.push({ symbol: a.symbol, massNumber: mn, massU: a.massU, source: 'given with the submission' });
      continue;
    }
    if (a.massNumber !== undefined && (typeof a.massNumber !== 'number' || !Number.isInteger(a.massNumber) || a.massNumber <= 0)) {
      return { ok: false, message: `The mass number of ${a.symbol} must be a positive whole number.` };
    }
    const atom = atomFrom(a.symbol, a.massNumber as number | undefined);
    if (typeof atom === 'string') return { ok: false, message: atom };
    atoms.push(atom);
  }
  return { ok: true, species: speciesFromAtoms(atoms[0], atoms[1]) };
}

/** Order-independent identity of an isotopologue (H35Cl and 35ClH are the same molecule). */
export function isotopologueKey(s: Species): string {
  return s.atoms
    .map((a) => `${a.massNumber}${a.symbol}`)
    .sort()
    .join('-');
}

/** Same elements (HCl and DCl are isotopologues of one molecule). */
export function elementKey(s: Species): string {
  return s.atoms
    .map((a) => a.symbol)
    .sort((x, y) => (atomicNumber(x) ?? 0) - (atomicNumber(y) ?? 0))
    .join('');
}

/** "H35Cl" → "H³⁵Cl" when the species is understood; otherwise the text as given. */
export function speciesDisplay(formula: string): string {
  if (!formula) return '';
  const p = parseSpecies(formula);
  return p.ok ? p.species.display : formula;
}
