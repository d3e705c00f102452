/**
 * The one door from the spectrum analysis to the band fit, so the choice of fit model lives
 * in one place. Every fit of assigned lines in lib/spectrum goes through `fitAssignedLines`.
 *
 * The model, as in lib/grading's fitBand: with m = J+1 for R(J) and m = −J for P(J),
 *   ν̃(m) = ν̃₀ + (B′+B″)m + (B′−B″)m² [− 4Dm³].
 *
 * Model choice, as the grading engine makes it (lib/grading fitBandModels): the band is fitted
 * with and without the −4Dm³ centrifugal term, and the cubic model is kept when the partial
 * F-test finds the m³ term significant (p < CENTRIFUGAL_TEST_LEVEL); on weighted lines the same
 * test runs on the weighted sums of squares.
 *
 * Weights: lines measured on a spectrum carry their own standard errors (from the line-shape
 * fit), and they differ tenfold between a strong central line and a weak edge line. An
 * unweighted fit would let the edge lines' scatter through while estimating the errors from
 * the central lines' — standard errors several times too small for αₑ and D. So when every
 * line has a standard error the fit is weighted by 1/σ² (the same linear least squares, on
 * rows divided by σ, through lib/grading's leastSquares), and the covariance is scaled by the
 * reduced χ² when that exceeds 1 (the Birge ratio: the σ's were too optimistic). Without
 * standard errors (a student's list) the fit is lib/grading's own fitBand.
 */
import {
  bondLengthFromB,
  CENTRIFUGAL_TEST_LEVEL,
  fitBandModels,
  leastSquares,
  parseSpecies,
  partialFTest,
  type BandFit,
  type Estimate,
  type Species,
} from '@/lib/grading';

/** Fewest lines for the cubic model to leave a degree of freedom for the test (as in lib/grading). */
export const MIN_LINES_FOR_CENTRIFUGAL = 5;

export interface FitLine {
  branch: 'P' | 'R';
  J: number;
  wavenumber: number;
  /** Standard error of the position, cm⁻¹ (all lines or none). */
  stdError?: number;
}

export interface ChosenBandFit {
  model: 'quadratic' | 'cubic';
  /** Why this model, in words. */
  modelNote: string;
  weighted: boolean;
  /** [ν̃₀, B′+B″, B′−B″, (−4D)] and their covariance. */
  coefficients: number[];
  covariance: number[][];
  nu0: Estimate;
  B0: Estimate;
  /** B of the upper level of the fitted band. */
  Bupper: Estimate;
  D?: Estimate;
  /** Bond lengths r from B₀ and from Bₑ = (3B₀ − B₁)/2 as for a fundamental, Å (the caller reinterprets for an overtone). */
  r0?: Estimate;
  residuals: { branch: 'P' | 'R'; J: number; m: number; residual: number }[];
  /** Unweighted root-mean-square residual, cm⁻¹. */
  rms: number;
  /** Reduced χ² of a weighted fit. */
  reducedChiSquare?: number;
  degreesOfFreedom: number;
  lineCount: number;
  /** rms of the model not chosen, for comparison (cm⁻¹). */
  otherModelRms?: number;
  /** The model not chosen: its coefficients and covariance (a student may defensibly have used it). */
  otherModel?: { model: 'quadratic' | 'cubic'; coefficients: number[]; covariance: number[][] };
}

export type BandFitResult = ChosenBandFit | { ok: false; message: string };

const m = (l: FitLine) => (l.branch === 'R' ? l.J + 1 : -l.J);

function estimate(value: number, variance: number): Estimate {
  return { value, stdError: Math.sqrt(Math.max(0, variance)) };
}

interface RawFit {
  beta: number[];
  cov: number[][];
  residuals: number[];
  rms: number;
  chi2?: number;
  dof: number;
}

/** Weighted polynomial fit in m with powers 0…p−1 (m scaled to |m| ≤ 1 for conditioning). */
function weightedFit(lines: readonly FitLine[], p: number, floor: number): RawFit | undefined {
  const n = lines.length;
  if (n < p) return undefined;
  let scale = 0;
  for (const l of lines) scale = Math.max(scale, Math.abs(m(l)));
  const X = new Float64Array(n * p);
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const w = 1 / Math.hypot(lines[i].stdError ?? 1, floor);
    const t = m(lines[i]) / scale;
    let pow = 1;
    for (let k = 0; k < p; k++) {
      X[i * p + k] = w * pow;
      pow *= t;
    }
    y[i] = w * lines[i].wavenumber;
  }
  const sol = leastSquares(X, n, p, y);
  if (!sol) return undefined;
  const f = Array.from({ length: p }, (_, k) => scale ** -k);
  const beta = sol.beta.map((b, k) => b * f[k]);
  const chi2 = sol.degreesOfFreedom > 0 ? sol.residualSumOfSquares / sol.degreesOfFreedom : 1;
  const birge = Math.max(1, chi2);
  const cov = sol.unscaledCovariance.map((row, i) => row.map((v, k) => v * f[i] * f[k] * birge));
  const residuals = lines.map((l) => {
    const mi = m(l);
    let calc = 0;
    for (let k = p - 1; k >= 0; k--) calc = calc * mi + beta[k];
    return l.wavenumber - calc;
  });
  const rms = Math.sqrt(residuals.reduce((s, r) => s + r * r, 0) / n);
  return { beta, cov, residuals, rms, chi2, dof: sol.degreesOfFreedom };
}

/** An engine fit as the numbers this module reports. */
function fromEngine(f: BandFit): RawFit {
  return { beta: f.coefficients, cov: f.covariance, residuals: f.residuals.map((x) => x.residual), rms: f.rms, dof: f.degreesOfFreedom };
}

function report(
  lines: readonly FitLine[],
  raw: RawFit,
  species: Species | undefined,
  weighted: boolean,
): Omit<ChosenBandFit, 'modelNote' | 'otherModelRms' | 'otherModel'> {
  const [a, b, c] = raw.beta;
  const V = raw.cov;
  const cubic = raw.beta.length === 4;
  const B0 = estimate((b - c) / 2, (V[1][1] + V[2][2] - 2 * V[1][2]) / 4);
  let r0: Estimate | undefined;
  if (species && B0.value > 0) {
    const value = bondLengthFromB(B0.value * 100, species.reducedMassKg) * 1e10;
    r0 = { value, stdError: (value * B0.stdError) / (2 * B0.value) };
  }
  return {
    model: cubic ? 'cubic' : 'quadratic',
    weighted,
    coefficients: raw.beta,
    covariance: V,
    nu0: estimate(a, V[0][0]),
    B0,
    Bupper: estimate((b + c) / 2, (V[1][1] + V[2][2] + 2 * V[1][2]) / 4),
    D: cubic ? estimate(-raw.beta[3] / 4, V[3][3] / 16) : undefined,
    r0,
    residuals: lines.map((l, i) => ({ branch: l.branch, J: l.J, m: m(l), residual: raw.residuals[i] })),
    rms: raw.rms,
    reducedChiSquare: raw.chi2,
    degreesOfFreedom: raw.dof,
    lineCount: lines.length,
  };
}

/**
 * Fits assigned lines (weighted when every line has a standard error) and chooses the model.
 * `floor` is added in quadrature to every line's standard error (a systematic floor of the
 * positions, cm⁻¹), so no line weighs without limit.
 */
export function fitAssignedLines(lines: readonly FitLine[], speciesIn: Species | string, options: { floor?: number } = {}): BandFitResult {
  const species = typeof speciesIn === 'string' ? (parseSpecies(speciesIn) as { ok: boolean; species?: Species }).species : speciesIn;
  const weighted = lines.length > 0 && lines.every((l) => typeof l.stdError === 'number' && l.stdError > 0 && Number.isFinite(l.stdError));
  if (!weighted) return unweighted(lines, species);
  const floor = options.floor ?? 0;
  const quadratic = lines.length >= 3 ? weightedFit(lines, 3, floor) : undefined;
  const cubic = lines.length >= MIN_LINES_FOR_CENTRIFUGAL ? weightedFit(lines, 4, floor) : undefined;
  if (!quadratic && !cubic)
    return { ok: false, message: `${lines.length} lines cannot be fitted (at least 3 are needed, in both branches).` };
  if (cubic && quadratic) {
    // The weighted sums of squares are χ² × degrees of freedom.
    const test = partialFTest((quadratic.chi2 ?? 0) * quadratic.dof, (cubic.chi2 ?? 0) * cubic.dof, 1, cubic.dof);
    const useCubic = test !== undefined && test.p < CENTRIFUGAL_TEST_LEVEL;
    const chosen = useCubic ? cubic : quadratic;
    const other = useCubic ? quadratic : cubic;
    return {
      ...report(lines, chosen, species, true),
      modelNote: modelNote(useCubic, test?.p),
      otherModelRms: other.rms,
      otherModel: { model: useCubic ? 'quadratic' : 'cubic', coefficients: other.beta, covariance: other.cov },
    };
  }
  const only = (cubic ?? quadratic)!;
  return { ...report(lines, only, species, true), modelNote: `without the centrifugal term: ${lines.length} lines are too few to test it` };
}

/** A student's list (no standard errors per line): the grading engine's own fits and choice. */
function unweighted(lines: readonly FitLine[], species: Species | undefined): BandFitResult {
  const models = fitBandModels(
    lines.map((l) => ({ branch: l.branch, J: l.J, wavenumber: l.wavenumber })),
    { species },
  );
  if (!models.ok) return { ok: false, message: models.problems.map((p) => p.message).join(' ') };
  const { fit, alternative, choice } = models;
  const cubic = fit.model === 'cubic';
  return {
    ...report(lines, fromEngine(fit), species, false),
    modelNote:
      choice.reason === 'too-few-lines'
        ? `without the centrifugal term: ${lines.length} lines are too few to test it`
        : modelNote(cubic, choice.fTest?.p),
    otherModelRms: alternative?.rms,
    otherModel: alternative
      ? { model: alternative.model, coefficients: alternative.coefficients, covariance: alternative.covariance }
      : undefined,
  };
}

function modelNote(cubic: boolean, p: number | undefined): string {
  const test = p === undefined ? '' : ` (F-test p ${p < 1e-4 ? '< 0.0001' : `= ${p.toPrecision(2)}`})`;
  return cubic
    ? `with the centrifugal term −4Dm³: the lines need it${test}`
    : `without the centrifugal term: the lines do not need it${test}`;
}
