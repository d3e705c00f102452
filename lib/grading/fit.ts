/**
 * The rovibrational fit of a fundamental band.
 *
 * With the running index m = J+1 for R(J) and m = −J for P(J), the line positions are
 *   ν̃(m) = ν̃₀ + (B₁+B₀)m + (B₁−B₀)m² [− 4Dm³]
 * (exact for F_v(J) = B_v J(J+1) − D J²(J+1)² with the same D in both levels), a linear
 * least-squares problem in 3 or 4 parameters. It is solved here by Householder QR, which
 * keeps the precision that the normal equations lose for the m³ column; the parameter
 * covariance is s²(XᵀX)⁻¹ = s² R⁻¹R⁻ᵀ with s² = Σ residual²/(n − p).
 *
 * Units: line wavenumbers and all fitted constants in cm⁻¹ (what the spectrum and the
 * student use); bond lengths in Å.
 */
import { u } from './constants';
import { bondLengthFromB } from './harmonic';
import { parseSpecies, type Species } from './species';

export type Branch = 'P' | 'R';

export interface Line {
  branch: Branch;
  J: number;
  /** cm⁻¹ */
  wavenumber: number;
}

export interface Estimate {
  value: number;
  /** Standard error from the least-squares covariance; 0 when there are no degrees of freedom left. */
  stdError: number;
}

export interface LineResidual {
  branch: Branch;
  J: number;
  m: number;
  observed: number;
  calculated: number;
  residual: number;
}

export interface CombinationDifferenceEstimate extends Estimate {
  /** Number of line pairs used. */
  pairs: number;
}

export interface BandFit {
  ok: true;
  model: 'quadratic' | 'cubic';
  units: { wavenumber: 'cm⁻¹'; length: 'Å' };
  nu0: Estimate;
  B0: Estimate;
  B1: Estimate;
  alphaE: Estimate;
  Be: Estimate;
  D?: Estimate;
  /** Bond lengths from Bₑ and B₀, when the species is known. */
  re?: Estimate;
  r0?: Estimate;
  /** Polynomial coefficients in m: [ν̃₀, B₁+B₀, B₁−B₀, (−4D)]. */
  coefficients: number[];
  covariance: number[][];
  residuals: LineResidual[];
  /** Root-mean-square residual, cm⁻¹. */
  rms: number;
  degreesOfFreedom: number;
  lineCount: number;
  /** Ground state from R(J−1) − P(J+1) = 4B₀(J+½); upper state from R(J) − P(J) = 4B₁(J+½). */
  combinationDifferences: { B0?: CombinationDifferenceEstimate; B1?: CombinationDifferenceEstimate };
  warnings: string[];
}

export interface FitFailure {
  ok: false;
  problems: { field: string; message: string }[];
}

export interface FitOptions {
  /** Fit the −4Dm³ term (centrifugal distortion). Default false. */
  centrifugal?: boolean;
  /** Species (formula or parsed) to turn Bₑ and B₀ into rₑ and r₀. */
  species?: string | Species;
  /** "J" reproduces the slip of numbering the R branch with m = J instead of J + 1. */
  rBranchIndex?: 'J+1' | 'J';
}

/** More lines than any real band has; a bigger list is a pasting accident. */
export const MAX_LINES = 5000;

// ---------------------------------------------------------------------------------------
// Linear least squares by Householder QR

export interface LeastSquaresSolution {
  beta: number[];
  /** (XᵀX)⁻¹; multiply by s² for the covariance. */
  unscaledCovariance: number[][];
  residualSumOfSquares: number;
  degreesOfFreedom: number;
}

/**
 * Solves min ‖Xβ − y‖ for a small number of columns. `design` is row-major n × p.
 * Returns undefined when the columns are (numerically) dependent.
 */
export function leastSquares(design: Float64Array, n: number, p: number, y: Float64Array): LeastSquaresSolution | undefined {
  const A = Float64Array.from(design);
  const b = Float64Array.from(y);
  const rDiag = new Float64Array(p);
  let maxNorm = 0;
  for (let j = 0; j < p; j++) {
    let norm = 0;
    for (let i = j; i < n; i++) norm += A[i * p + j] * A[i * p + j];
    norm = Math.sqrt(norm);
    maxNorm = Math.max(maxNorm, norm);
    if (norm === 0 || norm <= 1e-13 * maxNorm) return undefined;
    const alpha = A[j * p + j] > 0 ? -norm : norm;
    // v = x − αe₁, stored in place of column j below the diagonal
    A[j * p + j] -= alpha;
    let vv = 0;
    for (let i = j; i < n; i++) vv += A[i * p + j] * A[i * p + j];
    if (vv === 0) return undefined;
    for (let k = j + 1; k < p; k++) {
      let dot = 0;
      for (let i = j; i < n; i++) dot += A[i * p + j] * A[i * p + k];
      const f = (2 * dot) / vv;
      for (let i = j; i < n; i++) A[i * p + k] -= f * A[i * p + j];
    }
    let dot = 0;
    for (let i = j; i < n; i++) dot += A[i * p + j] * b[i];
    const f = (2 * dot) / vv;
    for (let i = j; i < n; i++) b[i] -= f * A[i * p + j];
    rDiag[j] = alpha;
  }
  const R = (i: number, k: number) => (i === k ? rDiag[i] : A[i * p + k]);
  // Back-substitution R β = (Qᵀy)[0..p)
  const beta = new Array<number>(p).fill(0);
  for (let i = p - 1; i >= 0; i--) {
    let s = b[i];
    for (let k = i + 1; k < p; k++) s -= R(i, k) * beta[k];
    beta[i] = s / R(i, i);
  }
  // R⁻¹ (upper triangular), then (XᵀX)⁻¹ = R⁻¹R⁻ᵀ
  const Rinv: number[][] = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  for (let col = 0; col < p; col++) {
    for (let i = col; i >= 0; i--) {
      let s = i === col ? 1 : 0;
      for (let k = i + 1; k <= col; k++) s -= R(i, k) * Rinv[k][col];
      Rinv[i][col] = s / R(i, i);
    }
  }
  const cov: number[][] = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  for (let i = 0; i < p; i++) {
    for (let k = 0; k < p; k++) {
      let s = 0;
      for (let l = Math.max(i, k); l < p; l++) s += Rinv[i][l] * Rinv[k][l];
      cov[i][k] = s;
    }
  }
  let ssr = 0;
  for (let i = p; i < n; i++) ssr += b[i] * b[i];
  if (!beta.every(Number.isFinite)) return undefined;
  return { beta, unscaledCovariance: cov, residualSumOfSquares: ssr, degreesOfFreedom: n - p };
}

/** Fits y = Σ βₖ x^powers[k]; x is scaled to |x| ≤ 1 first so the columns stay comparable. */
export function polynomialLeastSquares(x: ArrayLike<number>, y: ArrayLike<number>, powers: number[]): (LeastSquaresSolution & { covariance: number[][] }) | undefined {
  const n = x.length;
  const p = powers.length;
  if (n < p) return undefined;
  let scale = 0;
  for (let i = 0; i < n; i++) scale = Math.max(scale, Math.abs(x[i]));
  if (scale === 0) scale = 1;
  const X = new Float64Array(n * p);
  const Y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const t = x[i] / scale;
    for (let k = 0; k < p; k++) X[i * p + k] = powers[k] === 0 ? 1 : powers[k] === 1 ? t : Math.pow(t, powers[k]);
    Y[i] = y[i];
  }
  const sol = leastSquares(X, n, p, Y);
  if (!sol) return undefined;
  const f = powers.map((pw) => Math.pow(scale, -pw));
  const beta = sol.beta.map((b, k) => b * f[k]);
  const unscaled = sol.unscaledCovariance.map((row, i) => row.map((v, k) => v * f[i] * f[k]));
  const s2 = sol.degreesOfFreedom > 0 ? sol.residualSumOfSquares / sol.degreesOfFreedom : 0;
  return { ...sol, beta, unscaledCovariance: unscaled, covariance: unscaled.map((row) => row.map((v) => v * s2)) };
}

// ---------------------------------------------------------------------------------------
// Line list checks

export function runningIndex(branch: Branch, J: number, rBranchIndex: 'J+1' | 'J' = 'J+1'): number {
  return branch === 'R' ? (rBranchIndex === 'J' ? J : J + 1) : -J;
}

/** Checks a line list and names every bad line ("line 4, P(0): ..."). */
export function validateLines(lines: unknown, parameterCount: number): { ok: true; lines: Line[] } | FitFailure {
  const problems: { field: string; message: string }[] = [];
  if (!Array.isArray(lines)) return { ok: false, problems: [{ field: 'lines', message: 'The line list must be a list of { branch, J, wavenumber }.' }] };
  if (lines.length > MAX_LINES) {
    return { ok: false, problems: [{ field: 'lines', message: `The line list has ${lines.length} lines; a fundamental band has at most a few hundred (limit ${MAX_LINES}). Paste the assigned lines only.` }] };
  }
  const out: Line[] = [];
  const seen = new Map<number, number>();
  lines.forEach((raw: unknown, i: number) => {
    const where = `lines[${i}]`;
    const n = i + 1;
    if (raw === null || typeof raw !== 'object') {
      problems.push({ field: where, message: `Line ${n} is not a { branch, J, wavenumber } entry.` });
      return;
    }
    const r = raw as { branch?: unknown; J?: unknown; wavenumber?: unknown };
    const branch = typeof r.branch === 'string' ? r.branch.trim().toUpperCase() : '';
    const J = typeof r.J === 'string' && r.J.trim() !== '' ? Number(r.J) : r.J;
    const wn = typeof r.wavenumber === 'string' && r.wavenumber.trim() !== '' ? Number(r.wavenumber) : r.wavenumber;
    const name = () => `${branch || '?'}(${typeof J === 'number' && Number.isFinite(J) ? J : '?'})`;
    if (branch !== 'P' && branch !== 'R') {
      problems.push({ field: `${where}.branch`, message: `Line ${n}: branch must be P or R, not "${String(r.branch)}".` });
      return;
    }
    if (typeof J !== 'number' || !Number.isInteger(J)) {
      problems.push({ field: `${where}.J`, message: `Line ${n} (${name()}): J must be a whole number.` });
      return;
    }
    if (J < 0) {
      problems.push({ field: `${where}.J`, message: `Line ${n} (${name()}): J cannot be negative.` });
      return;
    }
    if (J > 500) {
      problems.push({ field: `${where}.J`, message: `Line ${n} (${name()}): J = ${J} is far beyond any populated level.` });
      return;
    }
    if (branch === 'P' && J === 0) {
      problems.push({ field: `${where}.J`, message: `Line ${n}: P(0) does not exist (it would end on J = −1); the first P line is P(1).` });
      return;
    }
    if (typeof wn !== 'number' || !Number.isFinite(wn) || wn <= 0) {
      problems.push({ field: `${where}.wavenumber`, message: `Line ${n} (${name()}): the wavenumber must be a positive number of cm⁻¹.` });
      return;
    }
    const key = branch === 'R' ? J + 1 : -J;
    const earlier = seen.get(key);
    if (earlier !== undefined) {
      problems.push({ field: where, message: `Line ${n} (${name()}) repeats the assignment of line ${earlier + 1}; each line can be assigned only once.` });
      return;
    }
    seen.set(key, i);
    out.push({ branch: branch as Branch, J, wavenumber: wn });
  });
  if (problems.length > 0) return { ok: false, problems: problems.slice(0, 20) };
  if (out.length < parameterCount) {
    return { ok: false, problems: [{ field: 'lines', message: `The fit has ${parameterCount} parameters but only ${out.length} line${out.length === 1 ? '' : 's'}; assign at least ${parameterCount} lines.` }] };
  }
  return { ok: true, lines: out };
}

// ---------------------------------------------------------------------------------------
// The band fit

function est(value: number, variance: number): Estimate {
  return { value, stdError: Math.sqrt(Math.max(0, variance)) };
}

/**
 * Fits the line list. Never throws: a list that cannot be fitted comes back as
 * { ok: false, problems } naming the bad line.
 */
export function fitBand(lines: unknown, options: FitOptions = {}): BandFit | FitFailure {
  const cubic = options.centrifugal === true;
  const p = cubic ? 4 : 3;
  const checked = validateLines(lines, p);
  if (!checked.ok) return checked;
  const list = checked.lines;
  const n = list.length;
  const m = new Float64Array(n);
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    m[i] = runningIndex(list[i].branch, list[i].J, options.rBranchIndex);
    y[i] = list[i].wavenumber;
  }
  const distinct = new Set(m).size;
  if (distinct < p) {
    return { ok: false, problems: [{ field: 'lines', message: `The lines cover only ${distinct} different values of m; a ${p}-parameter fit needs at least ${p}.` }] };
  }
  const powers = cubic ? [0, 1, 2, 3] : [0, 1, 2];
  const sol = polynomialLeastSquares(m, y, powers);
  if (!sol) return { ok: false, problems: [{ field: 'lines', message: 'The line positions cannot be fitted (the equations are singular).' }] };
  const [a, b, cc, d = 0] = sol.beta;
  const V = sol.covariance;
  const warnings: string[] = [];
  if (sol.degreesOfFreedom === 0) warnings.push('As many lines as parameters: the fit is exact and gives no standard errors.');

  // B₁ = (b + c)/2, B₀ = (b − c)/2, αₑ = B₀ − B₁ = −c, Bₑ = (3B₀ − B₁)/2 = b/2 − c.
  const varB1 = (V[1][1] + V[2][2] + 2 * V[1][2]) / 4;
  const varB0 = (V[1][1] + V[2][2] - 2 * V[1][2]) / 4;
  const varBe = V[1][1] / 4 + V[2][2] - V[1][2];
  const B0 = est((b - cc) / 2, varB0);
  const B1 = est((b + cc) / 2, varB1);
  const Be = est(b / 2 - cc, varBe);
  const alphaE = est(-cc, V[2][2]);
  const D = cubic ? est(-d / 4, V[3][3] / 16) : undefined;

  const residuals: LineResidual[] = new Array(n);
  let ss = 0;
  for (let i = 0; i < n; i++) {
    const mi = m[i];
    const calc = a + b * mi + cc * mi * mi + d * mi * mi * mi;
    const r = y[i] - calc;
    ss += r * r;
    residuals[i] = { branch: list[i].branch, J: list[i].J, m: mi, observed: y[i], calculated: calc, residual: r };
  }

  let re: Estimate | undefined;
  let r0: Estimate | undefined;
  const species = typeof options.species === 'string' ? (() => { const s = parseSpecies(options.species); return s.ok ? s.species : undefined; })() : options.species;
  if (species && Be.value > 0 && B0.value > 0) {
    const mu = species.reducedMassU * u;
    const reV = bondLengthFromB(Be.value * 100, mu) * 1e10;
    const r0V = bondLengthFromB(B0.value * 100, mu) * 1e10;
    // r ∝ B^−½, so σ_r/r = ½ σ_B/B
    re = { value: reV, stdError: (reV * Be.stdError) / (2 * Be.value) };
    r0 = { value: r0V, stdError: (r0V * B0.stdError) / (2 * B0.value) };
  }

  return {
    ok: true,
    model: cubic ? 'cubic' : 'quadratic',
    units: { wavenumber: 'cm⁻¹', length: 'Å' },
    nu0: est(a, V[0][0]),
    B0,
    B1,
    alphaE,
    Be,
    D,
    re,
    r0,
    coefficients: sol.beta,
    covariance: V,
    residuals,
    rms: Math.sqrt(ss / n),
    degreesOfFreedom: sol.degreesOfFreedom,
    lineCount: n,
    combinationDifferences: combinationDifferences(list, cubic),
    warnings,
  };
}

/**
 * Combination differences share a level, so each isolates one state's B:
 *   R(J−1) − P(J+1) = (4B₀ − 6D)(J+½) − 8D(J+½)³  (ground state)
 *   R(J) − P(J)     = (4B₁ − 6D)(J+½) − 8D(J+½)³  (upper state)
 * fitted through the origin ([x] or [x, x³] with x = J+½).
 */
export function combinationDifferences(lines: Line[], centrifugal = false): BandFit['combinationDifferences'] {
  const R = new Map<number, number>();
  const P = new Map<number, number>();
  for (const l of lines) (l.branch === 'R' ? R : P).set(l.J, l.wavenumber);
  const lower: { x: number; d: number }[] = [];
  const upper: { x: number; d: number }[] = [];
  for (const [J, p] of P) {
    const rBelow = R.get(J - 2); // R(J'−1) − P(J'+1) with J' = J − 1
    if (rBelow !== undefined && J >= 2) lower.push({ x: J - 1 + 0.5, d: rBelow - p });
    const rSame = R.get(J);
    if (rSame !== undefined) upper.push({ x: J + 0.5, d: rSame - p });
  }
  const fitCD = (pts: { x: number; d: number }[]): CombinationDifferenceEstimate | undefined => {
    const useD = centrifugal && pts.length >= 3;
    if (pts.length < 1) return undefined;
    const sol = polynomialLeastSquares(pts.map((q) => q.x), pts.map((q) => q.d), useD ? [1, 3] : [1]);
    if (!sol) return undefined;
    if (useD) {
      const Dv = -sol.beta[1] / 8;
      const B = (sol.beta[0] + 6 * Dv) / 4;
      // B = (b₁ − (6/8) b₂)/4
      const v = (sol.covariance[0][0] + (9 / 16) * sol.covariance[1][1] - 1.5 * sol.covariance[0][1]) / 16;
      return { value: B, stdError: Math.sqrt(Math.max(0, v)), pairs: pts.length };
    }
    return { value: sol.beta[0] / 4, stdError: Math.sqrt(Math.max(0, sol.covariance[0][0])) / 4, pairs: pts.length };
  };
  return { B0: fitCD(lower), B1: fitCD(upper) };
}
