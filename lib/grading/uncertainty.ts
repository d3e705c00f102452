/**
 * Numbers as students type them, their significant figures, and uncertainty propagation.
 *
 * The raw text is kept because "481" and "481.03" are different claims about precision,
 * and the slip diagnosis needs to know how far a number may have been rounded.
 */

export interface TypedNumber {
  value: number;
  /** The text as typed (or the shortest decimal form of a JS number). */
  text: string;
  /** Significant figures; trailing zeros of an integer without a decimal point are not counted (ambiguous). */
  sigFigs: number;
  /** Power of ten of the last significant digit: 2885.98 → −2; 480 → 1. */
  lastDigitPower: number;
  /** Half a unit in the last significant digit: how far rounding may have moved the number. */
  roundingHalfWidth: number;
  /** False when the digits carry no precision information (a binary float with 15+ digits). */
  precisionKnown: boolean;
  /**
   * Trailing zeros of a whole number written without a decimal point ("480" has one): they may
   * or may not be significant. A stated uncertainty settles it (see effectiveLastDigitPower).
   */
  ambiguousZeros: number;
  /** Uncertainty given in the text, "2885.98(5)" or "481 ± 3", in the same unit. */
  uncertainty?: number;
}

export type ParseNumberResult = ({ ok: true } & TypedNumber) | { ok: false; message: string };

const SUP: Record<string, string> = {
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

interface Mantissa {
  value: number;
  sigFigs: number;
  lastDigitPower: number;
  ambiguousZeros: number;
  concise?: number; // the "(5)" of 2885.98(5), in units of the last digit
}

const MANTISSA = /^([+-]?)(\d*)(?:[.,](\d*))?(?:\((\d+)\))?$/;

function parseMantissa(text: string, exponent: number): Mantissa | string {
  const m = MANTISSA.exec(text);
  if (!m) return `"${text}" is not a number.`;
  const [, sign, intPart = '', fracPart, concise] = m;
  if (intPart === '' && (fracPart === undefined || fracPart === '')) return `"${text}" is not a number.`;
  if (text.includes(',') && fracPart !== undefined && fracPart.length === 3 && /[1-9]/.test(intPart)) {
    return `"${text}" is ambiguous: is the comma a decimal mark or a thousands separator? Write it without the comma or with a decimal point.`;
  }
  const frac = fracPart ?? '';
  const digits = (intPart + frac).replace(/^0+/, '');
  let sigFigs: number;
  let lastDigitPower: number;
  let ambiguousZeros = 0;
  if (fracPart !== undefined) {
    sigFigs = Math.max(1, digits.length);
    lastDigitPower = -frac.length + exponent;
  } else {
    const trailingZeros = /0*$/.exec(intPart)?.[0].length ?? 0;
    const stripped = digits.replace(/0+$/, '');
    sigFigs = Math.max(1, stripped.length);
    ambiguousZeros = digits.length === 0 ? 0 : trailingZeros;
    lastDigitPower = ambiguousZeros + exponent;
  }
  const value = Number(`${sign}${intPart || '0'}.${frac || '0'}e${exponent}`);
  return { value, sigFigs, lastDigitPower, ambiguousZeros, concise: concise === undefined ? undefined : Number(concise) };
}

function splitExponent(text: string): { mantissa: string; exponent: number } | string {
  // 1.23e-4, 1.23E-4, 1.23×10^-4, 1.23x10-4, 1.23X10^-4, 1.23*10^-4, 1.23*10**-4, 1.23·10⁻⁴
  const m = /^(.*?)(?:[eE]([+-]?\d+)|[xX×*·]10(?:\^|\*\*)?\(?([+-]?\d+)\)?)$/.exec(text);
  if (!m) return { mantissa: text, exponent: 0 };
  const exp = Number(m[2] ?? m[3]);
  if (!Number.isFinite(exp) || Math.abs(exp) > 300) return `The exponent in "${text}" is out of range.`;
  return { mantissa: m[1], exponent: exp };
}

const fromSuperscript = (ch: string) => SUP[ch] ?? ch;

/** Text made only of these characters is left as it is by normalise (no superscripts, dashes, spaces or ±). */
const ALREADY_NORMAL = /^[0-9.,eE-]*$/;

function normalise(raw: string): string {
  // Most numbers are typed plainly ("2885.98", "1.6e-27"): skip the rewriting for them.
  if (ALREADY_NORMAL.test(raw)) return raw;
  return raw
    .normalize('NFC')
    .replace(/[⁰¹²³⁴⁵⁶⁷⁸⁹⁻⁺]/g, fromSuperscript)
    .replace(/[−–—]/g, '-')
    .replace(/\+\/-|\+-/g, '±')
    .replace(/\*\*/g, '^')
    .replace(/[\s\u00a0\u2009\u202f']/g, '');
}

const SPACE = '[ \u00a0\u2009\u202f]';
const SPACED_DIGITS = new RegExp(`\\d+(?:${SPACE}+\\d+)+`, 'g');
const SPACE_RUN = new RegExp(`${SPACE}+`);

/**
 * Digits separated by spaces are read only as the SI grouping in threes ("2 885.98",
 * "0.979 593"); anything else ("4 8 0") is more likely two numbers than one, so it is refused
 * rather than silently joined.
 */
function badDigitSpacing(text: string): string | undefined {
  if (ALREADY_NORMAL.test(text)) return undefined;
  for (const match of text.matchAll(SPACED_DIGITS)) {
    const groups = match[0].split(SPACE_RUN);
    const before = text[match.index - 1];
    const fractional = before === '.' || before === ',';
    const ok = fractional
      ? groups.slice(0, -1).every((g) => g.length === 3) && groups[groups.length - 1].length <= 3
      : groups[0].length <= 3 && groups.slice(1).every((g) => g.length === 3);
    if (!ok)
      return `"${text}" has digits separated by spaces; type the number without spaces (digits may be grouped in threes, as in 2 885.98).`;
  }
  return undefined;
}

function parseSingle(text: string): Mantissa | string {
  const split = splitExponent(text);
  if (typeof split === 'string') return split;
  return parseMantissa(split.mantissa, split.exponent);
}

/** Parses what a student typed: "2885.98", "1.6266e-27", "1.6266 × 10⁻²⁷", "2885.98(5)", "481 ± 3", "(4.81 ± 0.03) × 10²". */
export function parseTypedNumber(input: unknown): ParseNumberResult {
  if (typeof input === 'number') {
    if (!Number.isFinite(input)) return { ok: false, message: 'The value is not a finite number.' };
    const text = String(input);
    const parsed = parseSingle(text.replace('e+', 'e'));
    if (typeof parsed === 'string') return { ok: false, message: parsed };
    // A JS number has lost its typed digits; 15+ significant digits are float noise, not precision.
    const precisionKnown = parsed.sigFigs <= 12;
    return finish(input, text, parsed, precisionKnown, undefined);
  }
  if (typeof input !== 'string') return { ok: false, message: 'The value must be a number or the text of a number.' };
  const text = input.trim();
  if (text === '') return { ok: false, message: 'The value is empty.' };
  if (text.length > 100) return { ok: false, message: 'The value is too long to be a number.' };
  const spacing = badDigitSpacing(text);
  if (spacing) return { ok: false, message: spacing };
  const s = normalise(text);

  // (a ± b) × 10^n
  const grouped = /^\((.+)±(.+)\)(?:[eE]([+-]?\d+)|[xX×*·]10(?:\^|\*\*)?\(?([+-]?\d+)\)?)?$/.exec(s);
  if (grouped) {
    const exp = Number(grouped[3] ?? grouped[4] ?? 0);
    const a = parseMantissa(grouped[1], exp);
    const b = parseMantissa(grouped[2], exp);
    if (typeof a === 'string') return { ok: false, message: a };
    if (typeof b === 'string') return { ok: false, message: b };
    return finish(a.value, text, a, true, Math.abs(b.value));
  }
  const parts = s.includes('±') ? s.split('±') : [s];
  if (parts.length > 2) return { ok: false, message: `"${text}" has more than one ±.` };
  const main = parseSingle(parts[0]);
  if (typeof main === 'string') return { ok: false, message: main };
  let sigma: number | undefined;
  if (parts.length === 2) {
    const unc = parseSingle(parts[1]);
    if (typeof unc === 'string') return { ok: false, message: `Uncertainty: ${unc}` };
    sigma = Math.abs(unc.value);
  } else if (main.concise !== undefined) {
    sigma = main.concise * Math.pow(10, main.lastDigitPower);
  }
  return finish(main.value, text, main, true, sigma);
}

function finish(value: number, text: string, m: Mantissa, precisionKnown: boolean, uncertainty: number | undefined): ParseNumberResult {
  if (!Number.isFinite(value)) return { ok: false, message: 'The value is not a finite number.' };
  return {
    ok: true,
    value,
    text,
    sigFigs: m.sigFigs,
    lastDigitPower: m.lastDigitPower,
    roundingHalfWidth: precisionKnown ? 0.5 * Math.pow(10, m.lastDigitPower) : 0,
    precisionKnown,
    ambiguousZeros: m.ambiguousZeros,
    uncertainty: uncertainty !== undefined && Number.isFinite(uncertainty) ? uncertainty : undefined,
  };
}

// ---------------------------------------------------------------------------------------
// Significant figures against a stated uncertainty

export type PrecisionVerdict = 'ok' | 'too-many-significant-figures' | 'too-few-significant-figures' | 'unknown';

/** Power of ten of the leading digit of a positive number (0.05 → −2), robust to 0.1 = 0.09999…. */
function leadingPower(x: number): number {
  return Math.floor(Math.log10(x) + 1e-9);
}

/**
 * Power of ten of the last significant digit, with the uncertainty settling trailing zeros of a
 * whole number: "480 ± 5" is precise to units, "480 ± 50" to tens (common practice). The zeros
 * count as far down as the uncertainty's leading digit and no further than the units.
 */
export function effectiveLastDigitPower(typed: TypedNumber, uncertainty?: number): number {
  if (typed.ambiguousZeros === 0 || !(uncertainty !== undefined && uncertainty > 0 && Number.isFinite(uncertainty)))
    return typed.lastDigitPower;
  const lowest = typed.lastDigitPower - typed.ambiguousZeros;
  return Math.min(typed.lastDigitPower, Math.max(lowest, leadingPower(uncertainty)));
}

/**
 * Common practice: quote the uncertainty to one or two significant figures and the value to
 * the same decimal place ("480 ± 5", "480.1 ± 0.5", "2885.98 ± 0.05"). A value quoted to one
 * place beyond the uncertainty's leading digit goes with a two-figure uncertainty; further is
 * spurious precision ("480.123 ± 5"). A value rounded coarser than its uncertainty's leading digit
 * throws information away ("500 ± 0.1").
 */
export function precisionAgainstUncertainty(typed: TypedNumber, uncertainty: number): PrecisionVerdict {
  if (!typed.precisionKnown || !(uncertainty > 0) || !Number.isFinite(uncertainty)) return 'unknown';
  const leading = leadingPower(uncertainty);
  const last = effectiveLastDigitPower(typed, uncertainty);
  if (last < leading - 1) return 'too-many-significant-figures';
  if (last > leading) return 'too-few-significant-figures';
  return 'ok';
}

/** Half a unit in the last significant digit, with trailing zeros read as effectiveLastDigitPower does. */
export function roundingHalfWidth(typed: TypedNumber, uncertainty?: number): number {
  if (!typed.precisionKnown) return 0;
  return 0.5 * Math.pow(10, effectiveLastDigitPower(typed, uncertainty));
}

/** An uncertainty should carry one or two significant figures (common practice); more say nothing. */
export function uncertaintyTooPrecise(uncertainty: number): boolean {
  if (!(uncertainty > 0) || !Number.isFinite(uncertainty)) return false;
  const digits = String(uncertainty).replace(/e.*$/, '').replace('.', '').replace(/^0+/, '');
  return digits.length > 2;
}

// ---------------------------------------------------------------------------------------
// Propagation for products of powers, the form of every formula here (k ∝ ν̃²μ, r ∝ (μB)^−½).

export interface PowerTerm {
  value: number;
  sigma: number;
  power: number;
}

/** Relative standard uncertainty of Π xᵢ^pᵢ for uncorrelated xᵢ: (σ_f/f)² = Σ (pᵢ σᵢ/xᵢ)². */
export function relativeUncertaintyOfProduct(terms: PowerTerm[]): number {
  let sum = 0;
  for (const t of terms) {
    if (t.value === 0) continue;
    const r = (t.power * t.sigma) / t.value;
    sum += r * r;
  }
  return Math.sqrt(sum);
}

/** Combined standard uncertainty of uncorrelated contributions: √(Σ σᵢ²). */
export function combinedUncertainty(...sigmas: (number | undefined)[]): number {
  let sum = 0;
  for (const s of sigmas) if (s !== undefined && Number.isFinite(s)) sum += s * s;
  return Math.sqrt(sum);
}
