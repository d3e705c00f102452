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
import { partialFTest, runsTest, type FTest, type RunsTest } from './statistics';

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
  /** Signs of the residuals in order of m (n ≥ 10): few runs mean an arc, not noise. */
  runsTest?: RunsTest;
  warnings: FitWarning[];
}

/** Something a reader of the fit should know: few lines, large or systematic residuals. */
export interface FitWarning {
  code: 'exact-fit' | 'few-lines' | 'large-residuals' | 'systematic-residuals';
  message: string;
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
  /** Read each P(J) as P(J + pBranchShift): −1 undoes P lines numbered one too high. */
  pBranchShift?: number;
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
  // Work on copies so the caller's arrays are untouched. (The copy constructor is much
  // cheaper than Float64Array.from, which walks an iterator.)
  return leastSquaresInPlace(new Float64Array(design), n, p, new Float64Array(y));
}

/** leastSquares on arrays it may overwrite: A becomes the Householder vectors and R, b becomes Qᵀy. */
function leastSquaresInPlace(A: Float64Array, n: number, p: number, b: Float64Array): LeastSquaresSolution | undefined {
  const rDiag = householderQR(A, n, p, b);
  return rDiag ? solveTriangular(A, rDiag, b, n, p, p) : undefined;
}

/**
 * Householder QR of the row-major n × p matrix A, applied to b as well. Afterwards R's diagonal
 * is the returned array, its entries above the diagonal are A[i·p + k] (k > i), and b holds Qᵀy.
 * Undefined when the columns are (numerically) dependent.
 */
function householderQR(A: Float64Array, n: number, p: number, b: Float64Array): Float64Array | undefined {
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
  return rDiag;
}

/**
 * The least-squares solution for the first q of the p columns that householderQR factored.
 * Householder QR is column by column, so the factors of the first q columns are the leading
 * q × q block of R and the first q entries of Qᵀy; the residual sum of squares then also takes
 * (Qᵀy)ᵢ² for q ≤ i < p. That gives a model and its nested simpler model from one factorisation.
 */
function solveTriangular(
  A: Float64Array,
  rDiag: Float64Array,
  b: Float64Array,
  n: number,
  p: number,
  q: number,
): LeastSquaresSolution | undefined {
  const beta = new Array<number>(q).fill(0);
  for (let i = q - 1; i >= 0; i--) {
    let s = b[i];
    for (let k = i + 1; k < q; k++) s -= A[i * p + k] * beta[k];
    beta[i] = s / rDiag[i];
  }
  // R⁻¹ (upper triangular, row-major q × q), then (XᵀX)⁻¹ = R⁻¹R⁻ᵀ
  const Rinv = new Array<number>(q * q).fill(0);
  for (let col = 0; col < q; col++) {
    for (let i = col; i >= 0; i--) {
      let s = i === col ? 1 : 0;
      for (let k = i + 1; k <= col; k++) s -= A[i * p + k] * Rinv[k * q + col];
      Rinv[i * q + col] = s / rDiag[i];
    }
  }
  const cov: number[][] = new Array(q);
  for (let i = 0; i < q; i++) {
    const row = new Array<number>(q);
    for (let k = 0; k < q; k++) {
      let s = 0;
      for (let l = Math.max(i, k); l < q; l++) s += Rinv[i * q + l] * Rinv[k * q + l];
      row[k] = s;
    }
    cov[i] = row;
  }
  let ssr = 0;
  for (let i = q; i < n; i++) ssr += b[i] * b[i];
  for (let k = 0; k < q; k++) if (!Number.isFinite(beta[k])) return undefined;
  return { beta, unscaledCovariance: cov, residualSumOfSquares: ssr, degreesOfFreedom: n - q };
}

// Scratch space for the design matrix and observations of polynomialLeastSquares. A marking
// batch runs thousands of small fits, and a fresh Float64Array of more than a few numbers
// gets its own off-heap buffer, which costs more than the whole QR solve. So the fits share
// these two, grown when a longer line list comes. That is safe because the engine is
// synchronous and a fit never starts another fit before it has finished with them (the
// solution it returns is always in new arrays).
let designScratch = new Float64Array(256);
let observationScratch = new Float64Array(64);

function scratchDesign(size: number): Float64Array {
  if (designScratch.length < size) designScratch = new Float64Array(Math.max(size, 2 * designScratch.length));
  return designScratch;
}

function scratchObservations(size: number): Float64Array {
  if (observationScratch.length < size) observationScratch = new Float64Array(Math.max(size, 2 * observationScratch.length));
  return observationScratch;
}

export type PolynomialSolution = LeastSquaresSolution & { covariance: number[][] };

/** Fits y = Σ βₖ x^powers[k]; x is scaled to |x| ≤ 1 first so the columns stay comparable. */
export function polynomialLeastSquares(x: ArrayLike<number>, y: ArrayLike<number>, powers: number[]): PolynomialSolution | undefined {
  return nestedPolynomialLeastSquares(x, y, powers, [powers.length])?.[0];
}

/**
 * polynomialLeastSquares for several nested models at once: the model with the first q of
 * `powers` for each q in `sizes`, all from one QR factorisation of the largest design
 * (see solveTriangular). Undefined when the largest model cannot be fitted.
 */
export function nestedPolynomialLeastSquares(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  powers: number[],
  sizes: number[],
): PolynomialSolution[] | undefined {
  const n = x.length;
  const p = powers.length;
  if (n < p) return undefined;
  let scale = 0;
  for (let i = 0; i < n; i++) scale = Math.max(scale, Math.abs(x[i]));
  if (scale === 0) scale = 1;
  const X = scratchDesign(n * p);
  const Y = scratchObservations(n);
  for (let i = 0; i < n; i++) {
    const t = x[i] / scale;
    for (let k = 0; k < p; k++) X[i * p + k] = power(t, powers[k]);
    Y[i] = y[i];
  }
  // X and Y are scratch space, free to overwrite
  const rDiag = householderQR(X, n, p, Y);
  if (!rDiag) return undefined;
  const out: PolynomialSolution[] = [];
  for (const q of sizes) {
    const sol = solveTriangular(X, rDiag, Y, n, p, q);
    if (!sol) return undefined;
    out.push(unscale(sol, powers, scale));
  }
  return out;
}

/** tⁿ for the small whole powers of a polynomial design (Math.pow is several times slower for these). */
function power(t: number, n: number): number {
  switch (n) {
    case 0:
      return 1;
    case 1:
      return t;
    case 2:
      return t * t;
    case 3:
      return t * t * t;
    default:
      return Math.pow(t, n);
  }
}

/** Undo the scaling of x: βₖ was fitted against (x/scale)^powₖ, so multiply it by scale^−powₖ, and the covariance entry (i, k) by scale^−powᵢ · scale^−powₖ. */
function unscale(sol: LeastSquaresSolution, powers: number[], scale: number): PolynomialSolution {
  const p = sol.beta.length;
  const f = new Array<number>(p);
  for (let k = 0; k < p; k++) f[k] = Math.pow(scale, -powers[k]);
  const s2 = sol.degreesOfFreedom > 0 ? sol.residualSumOfSquares / sol.degreesOfFreedom : 0;
  const beta = new Array<number>(p);
  const unscaled: number[][] = new Array(p);
  const covariance: number[][] = new Array(p);
  for (let i = 0; i < p; i++) {
    beta[i] = sol.beta[i] * f[i];
    const unscaledRow = new Array<number>(p);
    const covarianceRow = new Array<number>(p);
    for (let k = 0; k < p; k++) {
      unscaledRow[k] = sol.unscaledCovariance[i][k] * f[i] * f[k];
      covarianceRow[k] = unscaledRow[k] * s2;
    }
    unscaled[i] = unscaledRow;
    covariance[i] = covarianceRow;
  }
  return {
    beta,
    unscaledCovariance: unscaled,
    residualSumOfSquares: sol.residualSumOfSquares,
    degreesOfFreedom: sol.degreesOfFreedom,
    covariance,
  };
}

// ---------------------------------------------------------------------------------------
// Line list checks

export function runningIndex(branch: Branch, J: number, rBranchIndex: 'J+1' | 'J' = 'J+1'): number {
  return branch === 'R' ? (rBranchIndex === 'J' ? J : J + 1) : -J;
}

/** "R(3)", or "?(?)" for the parts that could not be read: how a bad line is named in a message. */
function lineName(branch: string, J: unknown): string {
  return `${branch || '?'}(${typeof J === 'number' && Number.isFinite(J) ? J : '?'})`;
}

/** Checks a line list and names every bad line ("line 4, P(0): ..."). */
export function validateLines(lines: unknown, parameterCount: number): { ok: true; lines: Line[] } | FitFailure {
  const problems: { field: string; message: string }[] = [];
  if (!Array.isArray(lines))
    return { ok: false, problems: [{ field: 'lines', message: 'The line list must be a list of { branch, J, wavenumber }.' }] };
  if (lines.length > MAX_LINES) {
    return {
      ok: false,
      problems: [
        {
          field: 'lines',
          message: `The line list has ${lines.length} lines; a fundamental band has at most a few hundred (limit ${MAX_LINES}). Paste the assigned lines only.`,
        },
      ],
    };
  }
  const out: Line[] = [];
  // Position of the line already assigned to each R(J) and P(J), by J, to catch a repeat.
  // (Plain arrays indexed by J: J is checked to be a whole number from 0 to 500 first.)
  const seenR: number[] = [];
  const seenP: number[] = [];
  for (let i = 0; i < lines.length; i++) {
    if (!(i in lines)) continue; // a hole in a sparse array is not a line (as Array.prototype.forEach skips it)
    const raw: unknown = lines[i];
    const where = `lines[${i}]`;
    const n = i + 1;
    if (raw === null || typeof raw !== 'object') {
      problems.push({ field: where, message: `Line ${n} is not a { branch, J, wavenumber } entry.` });
      continue;
    }
    const r = raw as { branch?: unknown; J?: unknown; wavenumber?: unknown };
    // "P" and "R" as they usually come need no tidying; " r" or "p " do.
    const branch = r.branch === 'P' || r.branch === 'R' ? r.branch : typeof r.branch === 'string' ? r.branch.trim().toUpperCase() : '';
    const J = typeof r.J === 'string' && r.J.trim() !== '' ? Number(r.J) : r.J;
    const wn = typeof r.wavenumber === 'string' && r.wavenumber.trim() !== '' ? Number(r.wavenumber) : r.wavenumber;
    if (branch !== 'P' && branch !== 'R') {
      problems.push({ field: `${where}.branch`, message: `Line ${n}: branch must be P or R, not "${String(r.branch)}".` });
      continue;
    }
    if (typeof J !== 'number' || !Number.isInteger(J)) {
      problems.push({ field: `${where}.J`, message: `Line ${n} (${lineName(branch, J)}): J must be a whole number.` });
      continue;
    }
    if (J < 0) {
      problems.push({ field: `${where}.J`, message: `Line ${n} (${lineName(branch, J)}): J cannot be negative.` });
      continue;
    }
    if (J > 500) {
      problems.push({ field: `${where}.J`, message: `Line ${n} (${lineName(branch, J)}): J = ${J} is far beyond any populated level.` });
      continue;
    }
    if (branch === 'P' && J === 0) {
      problems.push({ field: `${where}.J`, message: `Line ${n}: P(0) does not exist (it would end on J = −1); the first P line is P(1).` });
      continue;
    }
    if (typeof wn !== 'number' || !Number.isFinite(wn) || wn <= 0) {
      problems.push({
        field: `${where}.wavenumber`,
        message: `Line ${n} (${lineName(branch, J)}): the wavenumber must be a positive number of cm⁻¹.`,
      });
      continue;
    }
    const seen = branch === 'R' ? seenR : seenP;
    const earlier = seen[J];
    if (earlier !== undefined) {
      problems.push({
        field: where,
        message: `Line ${n} (${lineName(branch, J)}) repeats the assignment of line ${earlier + 1}; each line can be assigned only once.`,
      });
      continue;
    }
    seen[J] = i;
    out.push({ branch: branch as Branch, J, wavenumber: wn });
  }
  if (problems.length > 0) return { ok: false, problems: problems.slice(0, 20) };
  if (out.length < parameterCount) {
    return {
      ok: false,
      problems: [
        {
          field: 'lines',
          message: `The fit has ${parameterCount} parameters but only ${out.length} line${out.length === 1 ? '' : 's'}; assign at least ${parameterCount} lines.`,
        },
      ],
    };
  }
  return { ok: true, lines: out };
}

// ---------------------------------------------------------------------------------------
// The band fit

function est(value: number, variance: number): Estimate {
  return { value, stdError: Math.sqrt(Math.max(0, variance)) };
}

/** The fitted constants without the extras (residuals, bond lengths, combination differences). */
export interface BandConstantsFit {
  ok: true;
  cubic: boolean;
  /** The validated lines, with their running index m and wavenumber y (cm⁻¹) in the same order. */
  lines: Line[];
  m: number[];
  y: number[];
  solution: PolynomialSolution;
  nu0: Estimate;
  B0: Estimate;
  B1: Estimate;
  Be: Estimate;
  alphaE: Estimate;
  D?: Estimate;
}

const QUADRATIC_POWERS = [0, 1, 2];
const CUBIC_POWERS = [0, 1, 2, 3];
const NESTED_SIZES = [3, 4];

/** Running indices and wavenumbers of validated lines. */
function indexLines(list: Line[], rBranchIndex: FitOptions['rBranchIndex']): { m: number[]; y: number[] } {
  const n = list.length;
  // Plain arrays: small Float64Arrays are slow to create (see the scratch space above).
  const m = new Array<number>(n);
  const y = new Array<number>(n);
  for (let i = 0; i < n; i++) {
    m[i] = runningIndex(list[i].branch, list[i].J, rBranchIndex);
    y[i] = list[i].wavenumber;
  }
  return { m, y };
}

/** The lines with every P(J) read as P(J + shift) (−1 undoes P lines numbered one too high). */
function renumberP(list: Line[], shift: number | undefined): Line[] {
  if (!shift) return list;
  return list.map((l) => (l.branch === 'P' ? { branch: 'P', J: l.J + shift, wavenumber: l.wavenumber } : l));
}

/** ν̃₀, B₀, B₁, Bₑ, αₑ (and D) from the coefficients of ν̃(m) = a + bm + cm² [+ dm³] and their covariance. */
function constantsOf(list: Line[], m: number[], y: number[], sol: PolynomialSolution): BandConstantsFit {
  const cubic = sol.beta.length === 4;
  const b = sol.beta[1];
  const cc = sol.beta[2];
  const d = cubic ? sol.beta[3] : 0;
  const V = sol.covariance;
  // B₁ = (b + c)/2, B₀ = (b − c)/2, αₑ = B₀ − B₁ = −c, Bₑ = (3B₀ − B₁)/2 = b/2 − c, D = −d/4.
  const varB1 = (V[1][1] + V[2][2] + 2 * V[1][2]) / 4;
  const varB0 = (V[1][1] + V[2][2] - 2 * V[1][2]) / 4;
  const varBe = V[1][1] / 4 + V[2][2] - V[1][2];
  return {
    ok: true,
    cubic,
    lines: list,
    m,
    y,
    solution: sol,
    nu0: est(sol.beta[0], V[0][0]),
    B0: est((b - cc) / 2, varB0),
    B1: est((b + cc) / 2, varB1),
    Be: est(b / 2 - cc, varBe),
    alphaE: est(-cc, V[2][2]),
    D: cubic ? est(-d / 4, V[3][3] / 16) : undefined,
  };
}

const SINGULAR: FitFailure = {
  ok: false,
  problems: [{ field: 'lines', message: 'The line positions cannot be fitted (the equations are singular).' }],
};

/**
 * The least-squares part of fitBand alone: validates the lines and fits ν̃₀, B₀, B₁, Bₑ, αₑ
 * (and D). The slip diagnosis uses it to refit with the lines renumbered, where the residuals
 * and combination differences would be thrown away.
 */
export function fitBandConstants(lines: unknown, options: FitOptions = {}): BandConstantsFit | FitFailure {
  const cubic = options.centrifugal === true;
  const checked = validateLines(lines, cubic ? 4 : 3);
  if (!checked.ok) return checked;
  const list = renumberP(checked.lines, options.pBranchShift);
  const { m, y } = indexLines(list, options.rBranchIndex);
  // Every line has its own m: validateLines refused repeated assignments, and (branch, J) → m is
  // one-to-one in either numbering (R lines have m ≥ 0, P lines m ≤ −1). So there are n ≥ p
  // distinct values of m, as many as the fit needs, and no need to count them again here.
  const sol = polynomialLeastSquares(m, y, cubic ? CUBIC_POWERS : QUADRATIC_POWERS);
  return sol ? constantsOf(list, m, y, sol) : SINGULAR;
}

/**
 * Fits the line list with the model asked for (quadratic by default). Never throws: a list that
 * cannot be fitted comes back as { ok: false, problems } naming the bad line. To let the data
 * choose between the models, use fitBandModels.
 */
export function fitBand(lines: unknown, options: FitOptions = {}): BandFit | FitFailure {
  const k = fitBandConstants(lines, options);
  return k.ok ? completeFit(k, options.species) : k;
}

// ---------------------------------------------------------------------------------------
// Which model the data support

/** Significance level of the F-test for the centrifugal term (5 %, common practice). */
export const CENTRIFUGAL_TEST_LEVEL = 0.05;
/** Significance level of the runs test that calls residuals systematic (1 %: a warning must not cry wolf). */
export const SYSTEMATIC_RESIDUALS_LEVEL = 0.01;
/** Below this rms (cm⁻¹) the residuals are rounding of binary floating point, not data. */
const EXACT_RMS = 1e-9;

export interface ModelChoice {
  model: 'quadratic' | 'cubic';
  /**
   * requested: the student reports D (or the caller asked for it); significant / not-significant:
   * the F-test of the −4Dm³ term decided; exact: the quadratic model already fits to rounding;
   * too-few-lines: no degree of freedom left to test the cubic term.
   */
  reason: 'requested' | 'significant' | 'not-significant' | 'exact' | 'too-few-lines';
  fTest?: FTest;
}

export interface BandModels {
  ok: true;
  /** The model the data support (or the one asked for), complete. */
  fit: BandFit;
  /** The other model, complete, when it could be fitted: a student who used it may be right too. */
  alternative?: BandFit;
  choice: ModelChoice;
}

/**
 * Fits the band with and without the centrifugal term −4Dm³ (one QR factorisation serves both)
 * and chooses: the cubic model when D is asked for, or when the partial F-test finds the m³
 * term significant at CENTRIFUGAL_TEST_LEVEL; otherwise the quadratic model.
 */
export function fitBandModels(
  lines: unknown,
  options: { species?: string | Species; centrifugal?: boolean; pBranchShift?: number } = {},
): BandModels | FitFailure {
  const requested = options.centrifugal === true;
  const checked = validateLines(lines, requested ? 4 : 3);
  if (!checked.ok) return checked;
  const list = renumberP(checked.lines, options.pBranchShift);
  const { m, y } = indexLines(list, 'J+1');
  const n = list.length;
  if (n < 4) {
    const sol = polynomialLeastSquares(m, y, QUADRATIC_POWERS);
    if (!sol) return SINGULAR;
    return {
      ok: true,
      fit: completeFit(constantsOf(list, m, y, sol), options.species),
      choice: { model: 'quadratic', reason: 'too-few-lines' },
    };
  }
  const sols = nestedPolynomialLeastSquares(m, y, CUBIC_POWERS, NESTED_SIZES);
  if (!sols) {
    // The m³ column can be dependent on the others for odd line sets; the quadratic may still fit.
    if (requested) return SINGULAR;
    const sol = polynomialLeastSquares(m, y, QUADRATIC_POWERS);
    if (!sol) return SINGULAR;
    return {
      ok: true,
      fit: completeFit(constantsOf(list, m, y, sol), options.species),
      choice: { model: 'quadratic', reason: 'too-few-lines' },
    };
  }
  const [quadratic, cubic] = sols;
  const fTest = partialFTest(quadratic.residualSumOfSquares, cubic.residualSumOfSquares, 1, n - 4);
  let choice: ModelChoice;
  if (requested) choice = { model: 'cubic', reason: 'requested', fTest };
  else if (Math.sqrt(quadratic.residualSumOfSquares / n) < EXACT_RMS) choice = { model: 'quadratic', reason: 'exact', fTest };
  else if (!fTest) choice = { model: 'quadratic', reason: 'too-few-lines' };
  else
    choice = {
      model: fTest.p < CENTRIFUGAL_TEST_LEVEL ? 'cubic' : 'quadratic',
      reason: fTest.p < CENTRIFUGAL_TEST_LEVEL ? 'significant' : 'not-significant',
      fTest,
    };
  // The model not chosen is only compared with, so its residuals are not tested for runs.
  const q = completeFit(constantsOf(list, m, y, quadratic), options.species, choice.model === 'quadratic');
  const c = completeFit(constantsOf(list, m, y, cubic), options.species, choice.model === 'cubic');
  return choice.model === 'cubic' ? { ok: true, fit: c, alternative: q, choice } : { ok: true, fit: q, alternative: c, choice };
}

// ---------------------------------------------------------------------------------------
// What a fit says about itself

/** Fewer degrees of freedom than this and the standard errors mean little (common practice). */
export const MIN_DEGREES_OF_FREEDOM_FOR_ERRORS = 3;

/** Residuals, bond lengths, combination differences and warnings for fitted constants. */
function completeFit(k: BandConstantsFit, speciesOption: string | Species | undefined, testRuns = true): BandFit {
  const { cubic, lines: list, m, y, solution: sol, B0, B1, Be, alphaE, D } = k;
  const n = list.length;
  const a = sol.beta[0];
  const b = sol.beta[1];
  const cc = sol.beta[2];
  const d = cubic ? sol.beta[3] : 0;
  const V = sol.covariance;

  const residuals: LineResidual[] = new Array(n);
  let ss = 0;
  for (let i = 0; i < n; i++) {
    const mi = m[i];
    const calc = a + b * mi + cc * mi * mi + d * mi * mi * mi;
    const r = y[i] - calc;
    ss += r * r;
    residuals[i] = { branch: list[i].branch, J: list[i].J, m: mi, observed: y[i], calculated: calc, residual: r };
  }
  const rms = Math.sqrt(ss / n);

  let re: Estimate | undefined;
  let r0: Estimate | undefined;
  let species: Species | undefined;
  if (typeof speciesOption === 'string') {
    const parsed = parseSpecies(speciesOption);
    species = parsed.ok ? parsed.species : undefined;
  } else species = speciesOption;
  if (species && Be.value > 0 && B0.value > 0) {
    const mu = species.reducedMassU * u;
    const reV = bondLengthFromB(Be.value * 100, mu) * 1e10;
    const r0V = bondLengthFromB(B0.value * 100, mu) * 1e10;
    // r ∝ B^−½, so σ_r/r = ½ σ_B/B
    re = { value: reV, stdError: (reV * Be.stdError) / (2 * Be.value) };
    r0 = { value: r0V, stdError: (r0V * B0.stdError) / (2 * B0.value) };
  }

  const systematic = testRuns && rms > EXACT_RMS && n >= 10 ? runsTest(residualsInOrderOfM(residuals)) : undefined;
  return {
    ok: true,
    model: cubic ? 'cubic' : 'quadratic',
    units: { wavenumber: 'cm⁻¹', length: 'Å' },
    nu0: k.nu0,
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
    rms,
    degreesOfFreedom: sol.degreesOfFreedom,
    lineCount: n,
    combinationDifferences: combinationDifferences(list, cubic),
    runsTest: systematic,
    warnings: fitWarnings(n, sol.beta.length, rms, B0.value, systematic),
  };
}

function residualsInOrderOfM(residuals: LineResidual[]): number[] {
  // Line lists usually come in order of m (P branch down, then R up, or the reverse); sort only when not.
  let ordered = true;
  for (let i = 1; i < residuals.length && ordered; i++) ordered = residuals[i].m > residuals[i - 1].m;
  let descending = !ordered;
  for (let i = 1; i < residuals.length && descending; i++) descending = residuals[i].m < residuals[i - 1].m;
  if (ordered || descending) return residuals.map((r) => r.residual);
  const sorted = residuals.slice().sort((p, q) => p.m - q.m);
  const out = new Array<number>(sorted.length);
  for (let i = 0; i < sorted.length; i++) out[i] = sorted[i].residual;
  return out;
}

function fitWarnings(n: number, p: number, rms: number, B0: number, runs: RunsTest | undefined): FitWarning[] {
  const out: FitWarning[] = [];
  const dof = n - p;
  if (dof === 0)
    out.push({
      code: 'exact-fit',
      message: `${n} lines for ${p} parameters: the fit passes through every line and gives no standard errors. Assign more lines.`,
    });
  else if (dof < MIN_DEGREES_OF_FREEDOM_FOR_ERRORS)
    out.push({
      code: 'few-lines',
      message: `Only ${n} lines for ${p} parameters: the standard errors rest on ${dof} degree${dof === 1 ? '' : 's'} of freedom and say little. Assign more lines.`,
    });
  // Lines about 2B apart: residuals of a tenth of that spacing mean lines on the wrong J, not noise.
  if (B0 > 0 && rms > 0.2 * B0)
    out.push({
      code: 'large-residuals',
      message: `The residuals are large (rms ${formatRms(rms)} cm⁻¹, about ${Math.round((100 * rms) / (2 * B0))} % of the line spacing): some lines are probably assigned to the wrong J or branch.`,
    });
  else if (runs && runs.p < SYSTEMATIC_RESIDUALS_LEVEL)
    out.push({
      code: 'systematic-residuals',
      message: `The residuals are systematic, not random (${runs.runs} runs of one sign where about ${Math.round(runs.expectedRuns)} are expected): the model leaves out a term the lines need, or lines are misassigned.`,
    });
  return out;
}

function formatRms(x: number): string {
  return x >= 0.1 ? x.toFixed(2) : x.toPrecision(2);
}

/**
 * Combination differences share a level, so each isolates one state's B:
 *   R(J−1) − P(J+1) = (4B₀ − 6D)(J+½) − 8D(J+½)³  (ground state)
 *   R(J) − P(J)     = (4B₁ − 6D)(J+½) − 8D(J+½)³  (upper state)
 * fitted through the origin ([x] or [x, x³] with x = J+½).
 */
export function combinationDifferences(lines: Line[], centrifugal = false): BandFit['combinationDifferences'] {
  // Wavenumber of each R(J) and P(J) line, by J (of a repeated line, the last one counts).
  // Plain arrays indexed by J are much quicker here than Maps, and for any J a Map would hold
  // (negative, fractional) they still work, as named properties.
  const R: number[] = [];
  const P: number[] = [];
  for (const l of lines) (l.branch === 'R' ? R : P)[l.J] = l.wavenumber;
  // The pairs, as x = J + ½ and the difference d, taking each P(J) once, in the order the
  // P lines first come.
  const lowerX: number[] = [];
  const lowerD: number[] = [];
  const upperX: number[] = [];
  const upperD: number[] = [];
  const done: boolean[] = [];
  for (const l of lines) {
    if (l.branch === 'R' || done[l.J]) continue;
    done[l.J] = true;
    const J = l.J;
    const p = P[J];
    const rBelow = R[J - 2]; // R(J'−1) − P(J'+1) with J' = J − 1
    if (rBelow !== undefined && J >= 2) {
      lowerX.push(J - 1 + 0.5);
      lowerD.push(rBelow - p);
    }
    const rSame = R[J];
    if (rSame !== undefined) {
      upperX.push(J + 0.5);
      upperD.push(rSame - p);
    }
  }
  return { B0: fitCombinationDifferences(lowerX, lowerD, centrifugal), B1: fitCombinationDifferences(upperX, upperD, centrifugal) };
}

const CD_POWERS = [1];
const CD_POWERS_WITH_D = [1, 3];

/** B (and optionally D) from the differences d at x = J + ½, fitted through the origin. */
function fitCombinationDifferences(x: number[], d: number[], centrifugal: boolean): CombinationDifferenceEstimate | undefined {
  const pairs = x.length;
  const useD = centrifugal && pairs >= 3;
  if (pairs < 1) return undefined;
  const sol = polynomialLeastSquares(x, d, useD ? CD_POWERS_WITH_D : CD_POWERS);
  if (!sol) return undefined;
  if (useD) {
    const Dv = -sol.beta[1] / 8;
    const B = (sol.beta[0] + 6 * Dv) / 4;
    // B = (b₁ − (6/8) b₂)/4
    const v = (sol.covariance[0][0] + (9 / 16) * sol.covariance[1][1] - 1.5 * sol.covariance[0][1]) / 16;
    return { value: B, stdError: Math.sqrt(Math.max(0, v)), pairs };
  }
  return { value: sol.beta[0] / 4, stdError: Math.sqrt(Math.max(0, sol.covariance[0][0])) / 4, pairs };
}
