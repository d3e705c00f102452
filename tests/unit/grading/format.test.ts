import { describe, expect, it } from 'vitest';
import { formatNumber } from '@/lib/grading';

/** formatNumber as first written: round to the significant figures, read back, print with toFixed. */
function formatByRoundTrip(value: number, sig: number): string {
  const s = Math.max(1, Math.min(15, Math.round(sig)));
  const abs = Math.abs(value);
  const exp = Math.floor(Math.log10(abs));
  if (exp >= 6 || exp <= -4) return formatNumber(value, sig); // the scientific branch is unchanged
  const rounded = Number(abs.toPrecision(s));
  const e2 = Math.floor(Math.log10(rounded));
  const decimals = Math.max(0, s - 1 - e2);
  return `${value < 0 ? '−' : ''}${rounded.toFixed(Math.min(20, decimals))}`;
}

describe('formatNumber', () => {
  it('prints significant figures without an exponent in the everyday range', () => {
    expect(formatNumber(2885.98, 6)).toBe('2885.98');
    expect(formatNumber(42747, 3)).toBe('42700');
    expect(formatNumber(9.9996, 4)).toBe('10.00');
    expect(formatNumber(-0.0012345, 3)).toBe('−0.00123');
    expect(formatNumber(1.6605e-27, 5)).toBe('1.6605 × 10⁻²⁷');
  });

  it("takes toPrecision's text directly only where it equals the round trip", () => {
    let seed = 12345;
    const rnd = () => (seed = (seed * 48271) % 2147483647) / 2147483647;
    const values: [number, number][] = [];
    for (let i = 0; i < 20000; i++) {
      const e = Math.floor(rnd() * 10) - 4;
      const s = 1 + Math.floor(rnd() * 15);
      const v = (1 + rnd() * 9) * Math.pow(10, e);
      values.push([v, s]);
      // just below the next power of ten, where rounding carries into a new digit
      values.push([Math.pow(10, e + 1) * (1 - Math.pow(10, -s) / 2), s]);
      values.push([Math.pow(10, e + 1) - Math.pow(10, e - s + 1), s]);
    }
    for (let e = -3; e < 6; e++) for (let s = 1; s <= 15; s++) values.push([Math.pow(10, e), s]);
    let mismatches = 0;
    for (const [v, s] of values) if (formatNumber(v, s) !== formatByRoundTrip(v, s)) mismatches++;
    expect(mismatches).toBe(0);
  });
});
