/**
 * Numbers for people: sensible significant figures, Unicode minus and ×10ⁿ.
 */
import { formatUnit, superscript } from './units';

/** Formats with `sig` significant figures; scientific (× 10ⁿ) for very large or small magnitudes. */
export function formatNumber(value: number, sig = 6): string {
  if (!Number.isFinite(value)) return '—';
  if (value === 0) return '0';
  const s = Math.max(1, Math.min(15, Math.round(sig)));
  const exp = Math.floor(Math.log10(Math.abs(value)));
  const minus = value < 0 ? '−' : '';
  const abs = Math.abs(value);
  if (exp >= 6 || exp <= -4) {
    const [mant, e] = abs.toExponential(s - 1).split('e');
    return `${minus}${mant} × 10${superscript(String(Number(e)))}`;
  }
  // Round to the significant figures first (42747 at 3 s.f. is 42700), then print without exponent.
  const digits = abs.toPrecision(s);
  // Usually toPrecision already prints it without an exponent ("2885.98"): then its text is what
  // the round trip below would print, and the round trip (the slow part) can be skipped. At 15
  // figures Math.log10 of a value just below a power of ten is too close to call, so 15 figures
  // take the long way. (tests/unit/grading/format.test.ts compares the two on many values.)
  if (s <= 14 && !digits.includes('e')) return `${minus}${digits}`;
  const rounded = Number(digits);
  const e2 = Math.floor(Math.log10(rounded));
  const decimals = Math.max(0, s - 1 - e2);
  return `${minus}${rounded.toFixed(Math.min(20, decimals))}`;
}

/** "481.0 N m⁻¹": value and unit, without a stray space for a pure number. */
export function withUnit(text: string, unit: string): string {
  return unit ? `${text} ${unit}` : text;
}

/** A number as the student typed it, with its uncertainty and the unit typeset: "481.0 ± 0.3 N m⁻¹". */
export function formatTyped(valueText: string, unit: string, uncertaintyText?: string | null): string {
  const value = uncertaintyText ? `${valueText} ± ${uncertaintyText}` : valueText;
  return withUnit(value, unit.trim() ? formatUnit(unit) : '');
}
