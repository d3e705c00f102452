/**
 * Fine bins of relative deviation (percent) for the kept statistics. Each kept quantity row holds
 * a count per fine bin; the page's histogram adds fine bins up into the buckets of
 * HISTOGRAM_EDGES_PERCENT (which are fine edges too, so the counts are the same as counting the
 * values), and a quartile is found by walking the fine counts to the bin that holds its rank and
 * reading only that bin's values, in order, from the index on statistics_values — exact, and
 * cheap because a bin holds a small share of the rows.
 *
 * Edges: 0, ±10⁻⁶ % … ±10⁶ % with 32 per decade (each bin ≈ 7.5 % wide in |x|), written with three
 * significant digits so every edge is a fixed decimal (the same double on every machine), plus
 * the display edges. A value's bin is the number of edges at or below it, as for the buckets.
 */
import { HISTOGRAM_EDGES_PERCENT } from './definitions';

const PER_DECADE = 32;

function buildEdges(): number[] {
  const set = new Set<number>([0, ...HISTOGRAM_EDGES_PERCENT]);
  for (let k = 0; k <= 12 * PER_DECADE; k++) {
    const v = Number((1e-6 * 10 ** (k / PER_DECADE)).toPrecision(3));
    set.add(v);
    set.add(-v);
  }
  return [...set].sort((a, b) => a - b);
}

export const FINE_EDGES: readonly number[] = buildEdges();
/** Number of fine bins: 0 … FINE_EDGES.length. */
export const FINE_BINS = FINE_EDGES.length + 1;

/** Number of fine edges at or below x (x finite or ±∞). */
export function fineBin(x: number): number {
  let lo = 0;
  let hi = FINE_EDGES.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (FINE_EDGES[mid] <= x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** The display bucket (index into the HISTOGRAM_EDGES_PERCENT buckets) every value of a fine bin falls in. */
export const coarseOfFine: readonly number[] = Array.from({ length: FINE_BINS }, (_, b) => {
  const lower = b === 0 ? -Infinity : FINE_EDGES[b - 1];
  return HISTOGRAM_EDGES_PERCENT.filter((e) => e <= lower).length;
});

/** Sparse fine histogram as stored: [[bin, count], …] sorted by bin, zero counts left out. */
export type FineHistogram = Map<number, number>;

export function histogramText(h: FineHistogram): string {
  return JSON.stringify([...h.entries()].filter(([, c]) => c !== 0).sort((a, b) => a[0] - b[0]));
}

export function parseHistogram(text: string | null | undefined, into: FineHistogram = new Map()): FineHistogram {
  if (!text) return into;
  for (const [b, c] of JSON.parse(text) as [number, number][]) into.set(b, (into.get(b) ?? 0) + c);
  return into;
}
