/**
 * The two statistical tests the band fit needs, on the distribution functions of jStat.
 *
 * - Is the centrifugal term needed? Nested least-squares models, the standard partial F-test:
 *   F = ((RSS₁ − RSS₂)/(p₂ − p₁)) / (RSS₂/(n − p₂)) follows F(p₂ − p₁, n − p₂) when the extra
 *   terms are zero (common practice; for one extra term F is the square of its t-value).
 * - Are the residuals systematic? The Wald–Wolfowitz runs test on the signs of the residuals in
 *   order of m: an arc (a model term left out) gives far fewer runs of one sign than chance.
 *   Normal approximation for the number of runs (common practice for n ≥ 10).
 */
import { centralF, normal } from 'jstat';

export interface FTest {
  F: number;
  /** P(F′ ≥ F) under the simpler model. */
  p: number;
  /** Numerator and denominator degrees of freedom. */
  df1: number;
  df2: number;
}

export function partialFTest(rssSimple: number, rssFull: number, extraParameters: number, residualDof: number): FTest | undefined {
  if (!(residualDof > 0) || !(extraParameters > 0) || !Number.isFinite(rssSimple) || !Number.isFinite(rssFull)) return undefined;
  const num = Math.max(0, rssSimple - rssFull) / extraParameters;
  const den = rssFull / residualDof;
  if (den === 0) return num === 0 ? undefined : { F: Infinity, p: 0, df1: extraParameters, df2: residualDof };
  const F = num / den;
  return { F, p: Math.max(0, 1 - centralF.cdf(F, extraParameters, residualDof)), df1: extraParameters, df2: residualDof };
}

export interface RunsTest {
  runs: number;
  expectedRuns: number;
  z: number;
  /** One-sided P(as few runs or fewer) under random signs. */
  p: number;
}

/** Runs of equal sign in `values` (zeros skipped), against what random signs would give. */
export function runsTest(values: ArrayLike<number>): RunsTest | undefined {
  let plus = 0;
  let minus = 0;
  let runs = 0;
  let last = 0;
  for (let i = 0; i < values.length; i++) {
    const s = Math.sign(values[i]);
    if (s === 0) continue;
    if (s > 0) plus++;
    else minus++;
    if (s !== last) runs++;
    last = s;
  }
  const n = plus + minus;
  if (plus === 0 || minus === 0 || n < 3) return undefined;
  const expectedRuns = (2 * plus * minus) / n + 1;
  const variance = (2 * plus * minus * (2 * plus * minus - n)) / (n * n * (n - 1));
  if (!(variance > 0)) return undefined;
  // Continuity correction of ½ run, towards the mean.
  const z = (runs - expectedRuns + 0.5) / Math.sqrt(variance);
  return { runs, expectedRuns, z, p: normal.cdf(z, 0, 1) };
}
