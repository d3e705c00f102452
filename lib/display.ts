/**
 * How numbers, units, cohorts and sources are written on screen (and in the PDFs). Display only:
 * every computed number comes from lib/grading; here it is only rounded and typeset.
 *
 * - The minus sign is U+2212 everywhere, a plus is written for positive deviations.
 * - A number and its unit (or %) are joined by a no-break space, so they never split over lines.
 * - No e-notation in running text: percentages keep two significant figures for small values.
 */
// Module by module, not the engine's index: client components use these helpers too, and the
// index would bring the whole engine (and its isotope tables) into the browser bundle.
import { QUANTITIES, isQuantityKey } from '@/lib/grading/quantities';
import { fromSI } from '@/lib/grading/units';
import { formatNumber } from '@/lib/grading/format';
import { parseTypedNumber } from '@/lib/grading/uncertainty';

export const NBSP = '\u00a0';
export const MINUS = '−';

/** Joins a number and a unit with a no-break space ("2886.07 cm⁻¹"). */
export function joinUnit(text: string, unit: string | null | undefined): string {
  return unit ? `${text}${NBSP}${unit}` : text;
}

/**
 * A percentage as a person reads it: "−0.0026 %", "+1.4 %", "12 188 %". Values below 1 keep two
 * significant figures (never fewer than `digits` decimals), larger ones `digits` decimals; a
 * value that rounds to nothing is "0 %". `signed` writes + before positive values.
 */
export function percentText(
  v: number | null | undefined,
  { digits = 2, signed = false }: { digits?: number; signed?: boolean } = {},
): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return '—';
  const abs = Math.abs(v);
  let text: string;
  if (abs === 0) text = '0';
  else if (abs >= 1000) text = groupThousands(Math.round(abs));
  else if (abs >= 1) text = abs.toFixed(digits);
  else {
    // Two significant figures, at most six decimals (below that it is zero for every purpose here).
    const decimals = Math.min(6, Math.max(digits, 1 - Math.floor(Math.log10(abs))));
    text = abs.toFixed(decimals);
    if (Number(text) === 0) text = '0';
  }
  const zero = Number(text.replace(/\s/g, '')) === 0;
  const sign = zero ? '' : v < 0 ? MINUS : signed ? '+' : '';
  return `${sign}${text}${NBSP}%`;
}

function groupThousands(n: number): string {
  return String(n).replace(/\B(?=(\d{3})+(?!\d))/g, '\u2009');
}

/** A cohort with its term, because two cohorts of a course may share a name ("Group A (2026)"). */
export function cohortName(c: { name: string; term?: string | null }): string {
  return c.term ? `${c.name} (${c.term})` : c.name;
}

/**
 * An expected value shown to the precision that matters: one digit finer than the student typed
 * (consistency is judged to the precision they typed, half a unit in their last digit), at least
 * three and at most six significant figures. Without a typed number, five significant figures.
 */
export function expectedToPrecision(valueSI: number | null | undefined, key: string, typedValue?: string | null): string {
  if (valueSI === null || valueSI === undefined || !Number.isFinite(valueSI)) return '—';
  const info = isQuantityKey(key) ? QUANTITIES[key] : null;
  let value = valueSI;
  let unit = info?.siUnit ?? '';
  if (info) {
    const r = fromSI(valueSI, info.displayUnit, info.dimension);
    if (r.ok) {
      value = r.value;
      unit = r.unit;
    }
  }
  if (value === 0) return joinUnit('0', unit);
  const magnitude = Math.floor(Math.log10(Math.abs(value)));
  let sig = 5;
  const typed = typedValue ? parseTypedNumber(typedValue) : null;
  if (typed && typed.ok && typed.precisionKnown && Number.isFinite(typed.lastDigitPower)) {
    // Digits from the value's first digit down to one below the typed last digit.
    sig = magnitude - (typed.lastDigitPower - 1) + 1;
  }
  sig = Math.max(3, Math.min(6, sig));
  return joinUnit(formatNumber(value, sig), unit);
}

/**
 * The published source of a reference value, for instructors and students: the compilation or
 * evaluation and its year, without the provenance notes kept for developers in lib/grading
 * ("from memory", which npm package carried the table, how a row was copied).
 */
export function publishedSource(source: string | null | undefined): string {
  if (!source) return '';
  let s = source;
  s = s.replace(
    /AME2020 atomic masses \/ NIST Atomic Weights and Isotopic Compositions(, via npm [\w-]+)?/g,
    'AME2020 atomic mass evaluation (Wang et al., Chin. Phys. C 45, 030003, 2021)',
  );
  s = s.replace(
    /Huber & Herzberg \(1979\) via NIST Chemistry WebBook/g,
    'Huber & Herzberg, Constants of Diatomic Molecules (1979), NIST Chemistry WebBook (SRD 69)',
  );
  s = s.replace(/:\s*ωₑ, ωₑxₑ, ωₑyₑ as printed in a public reproduction of the NIST table; the rest from memory/g, '');
  s = s.replace(/,?\s*read from a stored copy of the NIST WebBook page/g, '');
  s = s.replace(/;\s*NIST CCCBDB \(Irikura[^)]*\)\)\s*agrees/g, '');
  s = s.replace(/band origin of high-resolution measurements/g, 'band origin from high-resolution spectra');
  s = s.replace(/standard physical chemistry textbook table/g, 'textbook table');
  s = s.replace(/,?\s*from memory/g, '');
  s = s.replace(/,?\s*via npm [\w-]+/g, '');
  return s
    .replace(/\s{2,}/g, ' ')
    .replace(/\s+([,;)])/g, '$1')
    .trim();
}

const SUP: Record<string, string> = { '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' };
const SUB: Record<string, string> = { '0': '₀', '1': '₁', '2': '₂', '3': '₃', '4': '₄', '5': '₅', '6': '₆', '7': '₇', '8': '₈', '9': '₉' };

/**
 * An isotopologue as printed: mass numbers raised, atom counts lowered ("H35Cl" → "H³⁵Cl",
 * "12C16O" → "¹²C¹⁶O", "35Cl2" → "³⁵Cl₂"). Typesetting only, for places that must not load the
 * engine's species parser (lib/grading speciesDisplay).
 */
export function isotopologueText(formula: string): string {
  return formula.replace(/\d+(?=[A-Z])|\d+/g, (digits, offset: number, whole: string) => {
    const before = whole[offset + digits.length];
    const map = before && /[A-Z]/.test(before) ? SUP : SUB;
    return digits.replace(/\d/g, (d: string) => map[d]);
  });
}
