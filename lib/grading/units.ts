/**
 * Units as people type them, converted to SI.
 *
 * Wavenumbers are stored in m⁻¹, masses in kg, force constants in N m⁻¹, lengths in m and
 * energies in J per molecule. A frequency (Hz) or wavelength (µm) typed for a wavenumber is
 * converted through c; an energy typed in cm⁻¹ is converted through hc. A unit of the wrong
 * dimension (a mass in cm⁻¹) is an error, never silently zero.
 */
import { AVOGADRO_CONSTANT, c, e, h, u } from './constants';

export type Dimension = 'wavenumber' | 'mass' | 'forceConstant' | 'length' | 'energy' | 'ratio';

export const SI_UNIT: Record<Dimension, string> = {
  wavenumber: 'm⁻¹',
  mass: 'kg',
  forceConstant: 'N m⁻¹',
  length: 'm',
  energy: 'J',
  ratio: '1',
};

/** How a typed unit maps to SI: linear (value × factor) or reciprocal (factor / value, wavelength → wavenumber). */
export interface UnitDefinition {
  /** Canonical typeset form, e.g. "cm⁻¹". */
  display: string;
  dimension: Dimension;
  kind: 'linear' | 'reciprocal';
  factor: number;
}

const lin = (display: string, dimension: Dimension, factor: number): UnitDefinition => ({ display, dimension, kind: 'linear', factor });

const hc = h * c;
// Energy per molecule for one mole-based unit: value × 1000 / N_A.
const perMole = 1 / AVOGADRO_CONSTANT.value;

/**
 * Keys are "squashed" spellings: spaces, '·', '*', '^' and '.' removed, superscript digits made
 * plain ("cm⁻¹" → "cm-1"), µ/μ made 'u'. Several dimensions may share a spelling (cm⁻¹ is a
 * wavenumber and also an energy); the dimension asked for decides.
 */
const UNIT_TABLE: Record<string, UnitDefinition[]> = {};
function add(spellings: string[], ...defs: UnitDefinition[]) {
  for (const s of spellings) UNIT_TABLE[s] = [...(UNIT_TABLE[s] ?? []), ...defs];
}

// Wavenumber (and energy expressed as a wavenumber, E = hc ν̃)
add(
  ['cm-1', '/cm', '1/cm', 'percm', 'kayser', 'wavenumber', 'wavenumbers'],
  lin('cm⁻¹', 'wavenumber', 100),
  lin('cm⁻¹', 'energy', 100 * hc),
);
add(['m-1', '/m', '1/m'], lin('m⁻¹', 'wavenumber', 1), lin('m⁻¹', 'energy', hc));
// Frequencies for a wavenumber: ν̃ = ν / c; for an energy E = hν.
add(['Hz', 's-1', '/s', '1/s'], lin('Hz', 'wavenumber', 1 / c), lin('Hz', 'energy', h));
add(['kHz'], lin('kHz', 'wavenumber', 1e3 / c));
add(['MHz'], lin('MHz', 'wavenumber', 1e6 / c), lin('MHz', 'energy', 1e6 * h));
add(['GHz'], lin('GHz', 'wavenumber', 1e9 / c), lin('GHz', 'energy', 1e9 * h));
add(['THz'], lin('THz', 'wavenumber', 1e12 / c), lin('THz', 'energy', 1e12 * h));
// Angular frequency: ν̃ = ω / (2πc)
add(['rad/s', 'rads-1', 'rad s-1'], lin('rad s⁻¹', 'wavenumber', 1 / (2 * Math.PI * c)));
// Wavelength typed for a wavenumber: ν̃ = 1/λ
add(['um', 'micron', 'microns', 'micrometre', 'micrometer'], { display: 'µm', dimension: 'wavenumber', kind: 'reciprocal', factor: 1e6 });
add(['nm'], { display: 'nm', dimension: 'wavenumber', kind: 'reciprocal', factor: 1e9 });

// Mass. g mol⁻¹ is read as a molar mass and converted per molecule (÷ N_A).
add(['kg'], lin('kg', 'mass', 1));
add(['g'], lin('g', 'mass', 1e-3));
add(['u', 'Da', 'amu', 'dalton', 'daltons'], lin('u', 'mass', u));
add(['g/mol', 'gmol-1', 'g/mole'], lin('g mol⁻¹', 'mass', 1e-3 * perMole));
add(['kg/mol', 'kgmol-1'], lin('kg mol⁻¹', 'mass', perMole));

// Force constant
add(['N/m', 'Nm-1', 'kgs-2', 'kg/s2', 'J/m2', 'Jm-2'], lin('N m⁻¹', 'forceConstant', 1));
add(['mdyn/Å', 'mdyn/A', 'mdynÅ-1', 'mdynA-1', 'mdyn/Angstrom', 'mdyn/angstrom', 'aJ/Å2', 'aJÅ-2'], lin('mdyn Å⁻¹', 'forceConstant', 100));
add(['dyn/cm', 'dyncm-1', 'dyne/cm', 'dynecm-1'], lin('dyn cm⁻¹', 'forceConstant', 1e-3));
add(['kN/m', 'kNm-1'], lin('kN m⁻¹', 'forceConstant', 1e3));
add(['N/cm', 'Ncm-1'], lin('N cm⁻¹', 'forceConstant', 100));
add(['mN/m', 'mNm-1'], lin('mN m⁻¹', 'forceConstant', 1e-3));

// Length
add(['m'], lin('m', 'length', 1));
add(['cm'], lin('cm', 'length', 1e-2));
add(['mm'], lin('mm', 'length', 1e-3));
add(['um'], lin('µm', 'length', 1e-6));
add(['nm'], lin('nm', 'length', 1e-9));
add(['pm'], lin('pm', 'length', 1e-12));
add(['Å', 'A', 'Ang', 'angstrom', 'Angstrom', 'angstroms', 'Angstroms', 'Å'], lin('Å', 'length', 1e-10));

// Energy
add(['J'], lin('J', 'energy', 1));
add(['aJ'], lin('aJ', 'energy', 1e-18));
add(['zJ'], lin('zJ', 'energy', 1e-21));
add(['eV'], lin('eV', 'energy', e));
add(['meV'], lin('meV', 'energy', 1e-3 * e));
add(['kJ/mol', 'kJmol-1'], lin('kJ mol⁻¹', 'energy', 1e3 * perMole));
add(['J/mol', 'Jmol-1'], lin('J mol⁻¹', 'energy', perMole));
add(['kcal/mol', 'kcalmol-1'], lin('kcal mol⁻¹', 'energy', 4184 * perMole));

// Ratio (dimensionless)
add(['', '1', '-', 'none', 'dimensionless'], lin('', 'ratio', 1));
add(['%'], lin('%', 'ratio', 0.01));

const SUPERSCRIPTS: Record<string, string> = {
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
  '⁻': '-',
  '⁺': '+',
};

const squashCache = new Map<string, string>();

/** Squash a typed unit to the table's spelling. */
export function squashUnit(unit: string): string {
  const hit = squashCache.get(unit);
  if (hit !== undefined) return hit;
  const out = squashUnitUncached(unit);
  if (squashCache.size < 2000) squashCache.set(unit, out);
  return out;
}

function squashUnitUncached(unit: string): string {
  let s = unit.normalize('NFC').trim();
  s = s.replace(/[⁰¹²³⁴⁵⁶⁷⁸⁹⁻⁺]/g, (ch) => SUPERSCRIPTS[ch] ?? ch);
  s = s.replace(/[−–]/g, '-');
  s = s.replace(/[µμ]/g, 'u');
  s = s.replace(/Å/g, 'Å');
  s = s.replace(/[\s·*^.⋅]/g, '');
  s = s.replace(/\+/g, '');
  return s;
}

// Parsed units, cached: per dimension asked for (or none), the typed spelling → its definition
// (null: not understood). A marking batch asks for the same few spellings over and over.
// Nested maps rather than one map keyed by `${dimension}|${unit}`: building that key string on
// every call cost more than the lookup itself.
const lookupCache = new Map<Dimension | undefined, Map<string, UnitDefinition | null>>();
let lookupCacheSize = 0;

export function lookupUnit(unit: string, dimension?: Dimension): UnitDefinition | undefined {
  if (typeof unit !== 'string') return undefined;
  let forDimension = lookupCache.get(dimension);
  const hit = forDimension?.get(unit);
  if (hit !== undefined) return hit ?? undefined;
  const out = lookupUnitUncached(unit, dimension);
  if (lookupCacheSize < 2000) {
    if (forDimension === undefined) {
      forDimension = new Map();
      lookupCache.set(dimension, forDimension);
    }
    forDimension.set(unit, out ?? null);
    lookupCacheSize++;
  }
  return out;
}

function lookupUnitUncached(unit: string, dimension?: Dimension): UnitDefinition | undefined {
  const key = squashUnit(unit);
  let defs = UNIT_TABLE[key];
  if (!defs) {
    // Forgive capitalisation ("CM-1", "n/m") when it is unambiguous and cannot change a prefix
    // (Pm is the petametre, MeV a million eV: see caseConfusion).
    if (caseConfusion(key)) return undefined;
    const lower = key.toLowerCase();
    const matches = Object.keys(UNIT_TABLE).filter((k) => k.toLowerCase() === lower);
    const all = matches.flatMap((k) => UNIT_TABLE[k]);
    const fitting = dimension ? all.filter((d) => d.dimension === dimension) : all;
    const distinct = new Set(fitting.map((d) => `${d.dimension}:${d.factor}:${d.kind}`));
    if (distinct.size === 1) defs = fitting;
    else return undefined;
  }
  if (!dimension) return defs[0];
  return defs.find((d) => d.dimension === dimension);
}

/**
 * A spelling that matches a known unit only by changing the case of a letter whose case carries
 * meaning: m/M (milli, mega), p/P (pico, peta), and "a" for Å (a is atto, or nothing). Returns the
 * unit it would have been read as, so the message can ask; undefined when the case is harmless.
 */
function caseConfusion(squashed: string): string | undefined {
  if (squashed === 'a') return 'Å';
  if (squashed.length < 2) return undefined;
  const first = squashed[0];
  if (!'mMpP'.includes(first)) return undefined;
  const flipped = (first === first.toLowerCase() ? first.toUpperCase() : first.toLowerCase()) + squashed.slice(1);
  if (UNIT_TABLE[flipped]) return flipped;
  const lower = squashed.toLowerCase();
  const match = Object.keys(UNIT_TABLE).find((k) => k.toLowerCase() === lower && k[0] !== first);
  return match;
}

const PREFIX_NAMES: Record<string, string> = { m: 'milli', M: 'mega', p: 'pico', P: 'peta' };

/** Why a spelling was refused when its case (or a lone "a") makes it ambiguous, for the message. */
export function ambiguousUnitMessage(unit: string): string | undefined {
  const squashed = squashUnit(unit);
  const meant = caseConfusion(squashed);
  if (!meant) return undefined;
  const shown = UNIT_TABLE[meant]?.[0]?.display ?? meant;
  if (squashed === 'a') return `"${unit.trim()}" is not a unit here: did you mean Å (ångström)?`;
  const typedPrefix = PREFIX_NAMES[squashed[0]];
  const meantPrefix = PREFIX_NAMES[meant[0]];
  return `"${unit.trim()}": case matters in units${typedPrefix ? ` (${squashed[0]} is ${typedPrefix}${meantPrefix ? `, ${meant[0]} is ${meantPrefix}` : ''})` : ''}. Did you mean ${shown}?`;
}

/** Every unit spelling understood for a dimension, typeset and deduplicated (for help texts). */
const unitsForCache = new Map<Dimension, UnitDefinition[]>();

export function unitsFor(dimension: Dimension): UnitDefinition[] {
  const hit = unitsForCache.get(dimension);
  if (hit) return hit;
  const seen = new Map<string, UnitDefinition>();
  for (const defs of Object.values(UNIT_TABLE)) {
    for (const d of defs) if (d.dimension === dimension && !seen.has(d.display + d.kind)) seen.set(d.display + d.kind, d);
  }
  const list = [...seen.values()];
  unitsForCache.set(dimension, list);
  return list;
}

export type ToSIResult = { ok: true; valueSI: number; unitSI: string; unit: UnitDefinition } | { ok: false; message: string };

function describe(dimension: Dimension): string {
  return {
    wavenumber: 'a wavenumber (e.g. cm⁻¹)',
    mass: 'a mass (e.g. u or kg)',
    forceConstant: 'a force constant (e.g. N m⁻¹)',
    length: 'a length (e.g. Å or pm)',
    energy: 'an energy (e.g. cm⁻¹, eV or kJ mol⁻¹)',
    ratio: 'a pure number (no unit)',
  }[dimension];
}

export function toSI(value: number, unit: string, dimension: Dimension): ToSIResult {
  if (typeof value !== 'number' || !Number.isFinite(value)) return { ok: false, message: 'The value is not a finite number.' };
  if (typeof unit !== 'string') return { ok: false, message: 'The unit must be text.' };
  const def = lookupUnit(unit, dimension);
  if (!def) {
    const other = lookupUnit(unit);
    if (unit.trim() === '') return { ok: false, message: `No unit given; expected ${describe(dimension)}.` };
    const ambiguous = ambiguousUnitMessage(unit);
    if (ambiguous) return { ok: false, message: ambiguous };
    if (other) {
      return {
        ok: false,
        message: `"${unit}" is a unit of ${other.dimension === 'forceConstant' ? 'force constant' : other.dimension}, but this quantity is ${describe(dimension)}.`,
      };
    }
    return { ok: false, message: `Unknown unit "${unit}"; expected ${describe(dimension)}.` };
  }
  if (def.kind === 'reciprocal') {
    if (value <= 0) return { ok: false, message: 'A wavelength must be positive to convert it to a wavenumber.' };
    return { ok: true, valueSI: 1 / (value / def.factor), unitSI: SI_UNIT[dimension], unit: def };
  }
  return { ok: true, valueSI: value * def.factor, unitSI: SI_UNIT[dimension], unit: def };
}

/** Converts a standard uncertainty along with its value (reciprocal units need the value). */
export function uncertaintyToSI(sigma: number, value: number, def: UnitDefinition): number {
  if (def.kind === 'linear') return Math.abs(sigma * def.factor);
  const lambda = value / def.factor; // m
  return Math.abs(sigma / def.factor / (lambda * lambda));
}

export type FromSIResult = { ok: true; value: number; unit: string } | { ok: false; message: string };

export function fromSI(valueSI: number, unit: string, dimension?: Dimension): FromSIResult {
  if (!Number.isFinite(valueSI)) return { ok: false, message: 'The value is not a finite number.' };
  const def = lookupUnit(unit, dimension);
  if (!def) return { ok: false, message: `Unknown unit "${unit}"${dimension ? ` for ${describe(dimension)}` : ''}.` };
  if (def.kind === 'reciprocal') {
    if (valueSI <= 0) return { ok: false, message: 'A wavenumber must be positive to convert it to a wavelength.' };
    return { ok: true, value: def.factor / valueSI, unit: def.display };
  }
  return { ok: true, value: valueSI / def.factor, unit: def.display };
}

const TO_SUPERSCRIPT: Record<string, string> = {
  '0': '⁰',
  '1': '¹',
  '2': '²',
  '3': '³',
  '4': '⁴',
  '5': '⁵',
  '6': '⁶',
  '7': '⁷',
  '8': '⁸',
  '9': '⁹',
  '-': '⁻',
  '+': '⁺',
};

const toSuperscriptChar = (ch: string) => TO_SUPERSCRIPT[ch] ?? ch;

export function superscript(text: string): string {
  return text.replace(/[0-9+-]/g, toSuperscriptChar);
}

/** Typesets a unit: "cm-1" → "cm⁻¹", "N/m" → "N m⁻¹", "mdyn/A" → "mdyn Å⁻¹". Unknown units get superscript exponents. */
export function formatUnit(unit: string): string {
  if (typeof unit !== 'string') return '';
  const def = lookupUnit(unit);
  if (def && squashUnit(unit) !== '') return def.display;
  return unit.trim().replace(/\^?\(?(-?\d+)\)?/g, (m, exp: string, offset: number, whole: string) => {
    const prev = whole[offset - 1];
    return prev && /[A-Za-zÅµ]/.test(prev) ? superscript(exp) : m;
  });
}
