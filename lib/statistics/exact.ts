/**
 * Exact sums of doubles, for the kept statistics (lib/statistics/keep.ts).
 *
 * The kept sums of x and x² are updated by adding and subtracting one submission at a time. In
 * floating point that drifts: remove a slip-sized value (10⁶ %, so x² = 10¹²) and the rounding
 * left behind is larger than a whole cohort's x² near zero, and the spread printed would be wrong.
 * Every double is exactly m·2^e with integer m, so sums and squares are kept exactly as BigInt
 * mantissa and exponent; the order of updates does not matter, and a sum kept over years of
 * changes equals the sum recomputed from scratch bit for bit.
 *
 * Stored as text "m:e" (value m·2^e, m odd or 0) plus ":+k" / ":-k" when ±infinities were added.
 */

export interface Exact {
  m: bigint;
  e: number;
  /** How many +∞ and −∞ terms are in the sum (the engine stores none, but a sum must not lie). */
  pinf: number;
  ninf: number;
}

export const ZERO: Exact = Object.freeze({ m: 0n, e: 0, pinf: 0, ninf: 0 }) as Exact;

const view = new DataView(new ArrayBuffer(8));

function canonical(m: bigint, e: number, pinf = 0, ninf = 0): Exact {
  if (m === 0n) return { m: 0n, e: 0, pinf, ninf };
  while ((m & 0xffffffffn) === 0n) {
    m >>= 32n;
    e += 32;
  }
  while ((m & 1n) === 0n) {
    m >>= 1n;
    e += 1;
  }
  return { m, e, pinf, ninf };
}

/** The exact value of a double. NaN is refused (no statistic is defined over it). */
export function exactOf(x: number): Exact {
  if (Number.isNaN(x)) throw new Error('NaN cannot be summed');
  if (x === Infinity) return { m: 0n, e: 0, pinf: 1, ninf: 0 };
  if (x === -Infinity) return { m: 0n, e: 0, pinf: 0, ninf: 1 };
  if (x === 0) return ZERO;
  view.setFloat64(0, x);
  const hi = view.getUint32(0);
  const lo = view.getUint32(4);
  const negative = hi >>> 31 === 1;
  const field = (hi >>> 20) & 0x7ff;
  let m = (BigInt(hi & 0xfffff) << 32n) | BigInt(lo);
  let e: number;
  if (field === 0) e = -1074;
  else {
    m |= 1n << 52n;
    e = field - 1075;
  }
  return canonical(negative ? -m : m, e);
}

export function add(a: Exact, b: Exact): Exact {
  const pinf = a.pinf + b.pinf;
  const ninf = a.ninf + b.ninf;
  if (a.m === 0n) return { ...b, pinf, ninf };
  if (b.m === 0n) return { ...a, pinf, ninf };
  const e = Math.min(a.e, b.e);
  return canonical((a.m << BigInt(a.e - e)) + (b.m << BigInt(b.e - e)), e, pinf, ninf);
}

export function negate(a: Exact): Exact {
  return { m: -a.m, e: a.e, pinf: -a.pinf, ninf: -a.ninf };
}

export function multiply(a: Exact, b: Exact): Exact {
  if (a.pinf || a.ninf || b.pinf || b.ninf) throw new Error('infinite terms cannot be multiplied');
  return canonical(a.m * b.m, a.e + b.e);
}

export function scale(a: Exact, k: number): Exact {
  return canonical(a.m * BigInt(k), a.e, a.pinf * k, a.ninf * k);
}

export const isZero = (a: Exact) => a.m === 0n && a.pinf === 0 && a.ninf === 0;

/** The double nearest to the exact value (±∞ or NaN when infinite terms are in the sum). */
export function toNumber(a: Exact): number {
  if (a.pinf > 0 && a.ninf > 0) return NaN;
  if (a.pinf > 0) return Infinity;
  if (a.ninf > 0) return -Infinity;
  if (a.m === 0n) return 0;
  // Keep 64 significant bits (rounding to nearest on the way), then scale by powers of two.
  let m = a.m;
  let e = a.e;
  const negative = m < 0n;
  if (negative) m = -m;
  const bits = m.toString(2).length;
  if (bits > 64) {
    const shift = BigInt(bits - 64);
    const sticky = (m & ((1n << shift) - 1n)) !== 0n;
    m = (m >> shift) | (sticky ? 1n : 0n);
    e += bits - 64;
  }
  let v = Number(m);
  while (e > 0) {
    const step = Math.min(e, 1000);
    v *= 2 ** step;
    e -= step;
  }
  while (e < 0) {
    const step = Math.max(e, -1000);
    v *= 2 ** step;
    e -= step;
  }
  return negative ? -v : v;
}

export function serialise(a: Exact): string {
  let s = a.m === 0n ? '0:0' : `${a.m.toString(16)}:${a.e}`;
  if (a.pinf) s += `:+${a.pinf}`;
  if (a.ninf) s += `:-${a.ninf}`;
  return s;
}

export function parse(text: string | null | undefined): Exact {
  if (!text) return ZERO;
  const [m, e, ...rest] = text.split(':');
  let pinf = 0;
  let ninf = 0;
  for (const r of rest) {
    if (r.startsWith('+')) pinf = Number(r.slice(1));
    else if (r.startsWith('-')) ninf = Number(r.slice(1));
  }
  const negative = m.startsWith('-');
  const mag = BigInt(`0x${negative ? m.slice(1) : m}`);
  return canonical(negative ? -mag : mag, Number(e), pinf, ninf);
}

/** Mean Σx/n and population variance (nΣx² − (Σx)²)/n², the latter computed exactly before rounding. */
export function meanAndVariance(n: number, sum: Exact, squares: Exact): { mean: number; variance: number } {
  const mean = toNumber(sum) / n;
  if (sum.pinf || sum.ninf || squares.pinf) return { mean, variance: NaN };
  const numerator = add(scale(squares, n), negate(multiply(sum, sum)));
  return { mean, variance: toNumber(numerator) / n / n };
}
