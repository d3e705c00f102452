/**
 * Line positions from the line shape, not from the highest sample.
 *
 * The instrument line shape: a Fourier-transform spectrometer records every line convolved
 * with the transform of its apodization window A(δ) (δ the optical path difference, up to
 * L = 1/resolution). Writing the window as a short cosine series,
 *   A(δ) = Σₖ aₖ cos(kπδ/L),  k = 0…3
 * (boxcar: a₀ = 1; Happ–Genzel: 0.54, 0.46; three-term Blackman–Harris; the triangle to a
 * few per cent), and the line before the instrument as a Lorentzian of FWHM Γ (pressure
 * broadening), the recorded shape in absorption depth 1 − T is
 *   P(x) = Σₖ aₖ ½[B(x − k/2L) + B(x + k/2L)],
 *   B(x) = ∫₀ᴸ e^(−πΓδ) cos(2πxδ) dδ = [πΓ + e^(−πΓL)(2πx sin 2πxL − πΓ cos 2πxL)] / ((πΓ)² + (2πx)²).
 * It carries the side lobes of the apodized window, which a bell-shaped model would leave
 * in the residuals — beside a strong line they pull a weak neighbour (the H³⁷Cl line 2 cm⁻¹
 * from its H³⁵Cl partner) by a few thousandths of a cm⁻¹.
 *
 * L, Γ and the aₖ are measured on the spectrum's own clean lines (detect.ts); the shape is
 * then tabulated once and a few neighbouring lines are fitted together with it (heights,
 * centres, a common width scale for saturated lines, a straight local baseline) by
 * Levenberg–Marquardt least squares, whose covariance gives each centre a standard error.
 */

export interface InstrumentShape {
  /** Largest optical path difference, cm (1/resolution). */
  L: number;
  /** FWHM of the line before the instrument, cm⁻¹. */
  gamma: number;
  /** Cosine-series coefficients of the apodization window (a₀ … a₃). */
  a: number[];
}

/** B(x) of the file comment (an unnormalised transform of the Lorentzian cut off at L). */
function windowedLorentzian(x: number, L: number, gamma: number): number {
  const g = Math.PI * Math.max(gamma, 1e-6);
  const E = Math.exp(-g * L);
  const w = 2 * Math.PI * x;
  if (Math.abs(w * L) < 1e-6) return (1 - E) / g;
  return (g + E * (w * Math.sin(w * L) - g * Math.cos(w * L))) / (g * g + w * w);
}

/** The k-th cosine term's line shape, ½[B(x − k/2L) + B(x + k/2L)]. */
export function instrumentTerm(x: number, k: number, L: number, gamma: number): number {
  if (k === 0) return windowedLorentzian(x, L, gamma);
  const s = k / (2 * L);
  return 0.5 * (windowedLorentzian(x - s, L, gamma) + windowedLorentzian(x + s, L, gamma));
}

export function instrumentProfile(x: number, shape: InstrumentShape): number {
  let v = 0;
  for (let k = 0; k < shape.a.length; k++) if (shape.a[k] !== 0) v += shape.a[k] * instrumentTerm(x, k, shape.L, shape.gamma);
  return v;
}

import { fft as fftInPlace } from './fft';

/**
 * A line shape of unit height tabulated for fast evaluation: values and slopes on a fine grid
 * (256 points per line width, linear interpolation: within 2·10⁻⁵ of the peak), a
 * Lorentzian-like fall-off (∝ 1/d²) beyond the table.
 */
export class ProfileTable {
  readonly fwhm: number;
  private readonly inv: number;
  private readonly n: number;
  private readonly v: Float64Array;
  private readonly s: Float64Array;
  private readonly tail: number;

  constructor(f: (d: number) => number, approxFwhm: number, options: { reachFwhm?: number; pointsPerFwhm?: number } = {}) {
    const perFwhm = options.pointsPerFwhm ?? 256;
    const h = approxFwhm / perFwhm;
    this.inv = 1 / h;
    const reach = (options.reachFwhm ?? 8) * approxFwhm;
    this.n = Math.ceil(reach / h) + 2;
    const peak = f(0);
    const raw = new Float64Array(this.n + 2);
    for (let i = 0; i < this.n + 2; i++) raw[i] = f(i * h) / peak;
    this.v = raw.subarray(0, this.n);
    this.s = new Float64Array(this.n);
    for (let i = 1; i < this.n; i++) this.s[i] = (raw[i + 1] - raw[i - 1]) / (2 * h);
    this.s[0] = 0;
    this.tail = this.v[this.n - 1] * ((this.n - 1) * h) ** 2;
    // Full width at half maximum, from the table.
    let i = 0;
    while (i < this.n - 1 && this.v[i + 1] > 0.5) i++;
    const frac = (this.v[i] - 0.5) / Math.max(1e-12, this.v[i] - this.v[i + 1]);
    this.fwhm = 2 * (i + frac) * h;
  }

  /** Value at offset d (symmetric). */
  value(d: number): number {
    const a = d < 0 ? -d : d;
    const t = a * this.inv;
    const i = t | 0;
    if (i >= this.n - 1) return this.tail / (a * a);
    const u = t - i;
    return this.v[i] + u * (this.v[i + 1] - this.v[i]);
  }

  /** d(value)/dd. */
  slope(d: number): number {
    const a = d < 0 ? -d : d;
    const t = a * this.inv;
    const i = t | 0;
    const sign = d < 0 ? -1 : 1;
    if (i >= this.n - 1) return (sign * -2 * this.tail) / (a * a * a);
    const u = t - i;
    return sign * (this.s[i] + u * (this.s[i + 1] - this.s[i]));
  }

  /** Value and slope at once into out[at], out[at + 1]. */
  both(d: number, out: Float64Array, at: number): void {
    const a = d < 0 ? -d : d;
    const t = a * this.inv;
    const i = t | 0;
    const sign = d < 0 ? -1 : 1;
    if (i >= this.n - 1) {
      out[at] = this.tail / (a * a);
      out[at + 1] = (sign * -2 * this.tail) / (a * a * a);
      return;
    }
    const u = t - i;
    out[at] = this.v[i] + u * (this.v[i + 1] - this.v[i]);
    out[at + 1] = sign * (this.s[i] + u * (this.s[i + 1] - this.s[i]));
  }
}

/** Pseudo-Voigt of unit height (Lorentzian share eta), used before the instrument's shape is known. */
export function pseudoVoigt(d: number, fwhm: number, eta: number): number {
  const u = (d * d) / (fwhm * fwhm);
  return eta / (1 + 4 * u) + (1 - eta) * Math.exp(-4 * Math.LN2 * u);
}

export function pseudoVoigtTable(fwhm: number, eta = 0.5): ProfileTable {
  return new ProfileTable((d) => pseudoVoigt(d, fwhm, eta), fwhm);
}

/**
 * A family of line shapes of unit height with one shape parameter u per line: how a line of
 * this spectrum looks at offset d. `fitCluster` fits u for strong lines.
 */
export interface LineProfile {
  readonly fwhm: number;
  /** Range and usual value of u. */
  readonly uMin: number;
  readonly uMax: number;
  readonly uStart: number;
  value(d: number, u: number): number;
  /** ∂value/∂d */
  slope(d: number, u: number): number;
  /** ∂value/∂u */
  dShape(d: number, u: number): number;
  /** value and ∂/∂d into out[0], out[1], and ∂/∂u into out[2] when `withShape`. */
  evaluate(d: number, u: number, out: Float64Array, withShape: boolean): void;
}

/** One tabulated shape, broadened by e^u (a stand-in when the instrument's shape is not known). */
export class ScaledProfile implements LineProfile {
  readonly uMin = Math.log(0.5);
  readonly uMax = Math.log(4);
  readonly uStart = 0;
  constructor(private readonly table: ProfileTable) {}
  get fwhm(): number {
    return this.table.fwhm;
  }
  value(d: number, u: number): number {
    return this.table.value(d * Math.exp(-u));
  }
  slope(d: number, u: number): number {
    const e = Math.exp(-u);
    return this.table.slope(d * e) * e;
  }
  dShape(d: number, u: number): number {
    const e = Math.exp(-u);
    return -this.table.slope(d * e) * d * e;
  }
  evaluate(d: number, u: number, out: Float64Array, _withShape: boolean): void {
    const e = u === 0 ? 1 : Math.exp(-u);
    this.table.both(d * e, out, 0);
    out[2] = -out[1] * d * e;
    out[1] *= e;
  }
}

/**
 * The recorded shapes of lines of every strength: the instrument line shape convolved with
 * the absorbed share 1 − 10^(−S·ℓ(x)) of a Lorentzian ℓ (peak 1, FWHM Γ) of peak absorbance S.
 * A weak line (S ≪ 1) has the instrument's shape; a saturated one is flat-topped with strong
 * Lorentzian wings, which no single broadened shape reproduces. Computed by Fourier transform
 * on a fine grid for S = 2^u, u = −5 … 6 in steps of ½, and interpolated linearly in u.
 */
/** Spacing of the tabulated saturations in u = log₂ S. */
const SATURATION_STEP = 0.5;

export class SaturationProfiles implements LineProfile {
  readonly uMin = -5;
  readonly uMax = 6;
  readonly uStart = -5;
  readonly fwhm: number;
  private readonly tables: ProfileTable[] = [];

  constructor(shape: InstrumentShape, approxFwhm: number) {
    const gamma = Math.max(shape.gamma, 1e-3);
    const h = Math.min(gamma / 8, approxFwhm / 40);
    const span = Math.max(60 * approxFwhm, 40, 200 * gamma);
    const n = nextPow2(Math.ceil(span / h));
    // The window A(δ) on the transform grid (δ_j = j/(n h)).
    const window = new Float64Array(n);
    for (let j = 0; j < n; j++) {
      const delta = (j <= n / 2 ? j : n - j) / (n * h);
      if (delta > shape.L) continue;
      let w = 0;
      for (let k = 0; k < shape.a.length; k++) w += shape.a[k] * Math.cos((k * Math.PI * delta) / shape.L);
      window[j] = w;
    }
    const half = gamma / 2;
    for (let u = this.uMin; u <= this.uMax + 1e-9; u += SATURATION_STEP) {
      const S = 2 ** u;
      const re = new Float64Array(n);
      const im = new Float64Array(n);
      for (let i = 0; i < n; i++) {
        const x = (i <= n / 2 ? i : i - n) * h;
        const l = 1 / (1 + (x / half) ** 2);
        re[i] = 1 - 10 ** (-S * l);
      }
      fftInPlace(re, im, false);
      for (let j = 0; j < n; j++) {
        re[j] *= window[j];
        im[j] *= window[j];
      }
      fftInPlace(re, im, true);
      const recorded = (x: number) => {
        const t = Math.abs(x) / h;
        const i = Math.floor(t);
        const f = t - i;
        return i + 1 < n / 2 ? re[i] * (1 - f) + re[i + 1] * f : 0;
      };
      this.tables.push(new ProfileTable(recorded, approxFwhm));
    }
    this.fwhm = this.tables[0].fwhm;
  }

  private j = 0;
  private f = 0;
  /** Sets this.j and this.f: the table below u and the share of the next. */
  private locate(u: number): void {
    const t = (Math.min(this.uMax, Math.max(this.uMin, u)) - this.uMin) / SATURATION_STEP;
    const j = Math.min(this.tables.length - 2, Math.floor(t));
    this.j = j;
    this.f = t - j;
  }

  value(d: number, u: number): number {
    this.locate(u);
    const f = this.f;
    const v0 = this.tables[this.j].value(d);
    return f === 0 ? v0 : (1 - f) * v0 + f * this.tables[this.j + 1].value(d);
  }

  slope(d: number, u: number): number {
    this.locate(u);
    const f = this.f;
    return (1 - f) * this.tables[this.j].slope(d) + f * this.tables[this.j + 1].slope(d);
  }

  dShape(d: number, u: number): number {
    this.locate(u);
    return (this.tables[this.j + 1].value(d) - this.tables[this.j].value(d)) / SATURATION_STEP;
  }

  private readonly scratch = new Float64Array(4);
  evaluate(d: number, u: number, out: Float64Array, withShape: boolean): void {
    this.locate(u);
    const f = this.f;
    if (f === 0 && !withShape) {
      this.tables[this.j].both(d, out, 0);
      return;
    }
    const w = this.scratch;
    this.tables[this.j].both(d, w, 0);
    this.tables[this.j + 1].both(d, w, 2);
    out[0] = (1 - f) * w[0] + f * w[2];
    out[1] = (1 - f) * w[1] + f * w[3];
    out[2] = (w[2] - w[0]) / SATURATION_STEP;
  }
}

function nextPow2(n: number): number {
  let p = 1;
  while (p < n) p *= 2;
  return p;
}

export interface ClusterFitInput {
  x: ArrayLike<number>;
  y: ArrayLike<number>;
  /** Index range [lo, hi] of the samples used. */
  lo: number;
  hi: number;
  centres: number[];
  /** Starting values: the data's values at the centres (baseline included). */
  heights: number[];
  profile: LineProfile;
  /**
   * Which lines get their own shape parameter (a strong line is flattened and broadened by
   * saturation, its weak neighbour is not; forcing one shape on both pulls the weak one's centre).
   */
  fitShapes?: readonly boolean[];
  /** Starting shape parameters (default profile.uStart). */
  shapes?: readonly number[];
  /** Indexes of centres kept fixed (a line predicted but not yet seen is first fitted in place). */
  fixedCentres?: readonly number[];
  /**
   * Samples within `taper[0]` of the nearest starting centre count fully, fading (cos²) to
   * nothing at `taper[1]`. A smooth window centred on the lines keeps a small difference
   * between the true line shape and the model from pulling the centre one way.
   */
  taper?: [number, number];
}

export interface ClusterFit {
  ok: boolean;
  centres: number[];
  heights: number[];
  centreErrors: number[];
  heightErrors: number[];
  shapes: number[];
  /** Root-mean-square weighted residual, in y units. */
  rms: number;
  /** Baseline at the window's middle and its slope. */
  baseline: [number, number];
}

// Scratch space for the small solves: thousands of them run per spectrum, and fresh typed
// arrays for each cost more than the arithmetic. Safe because the code is synchronous and a
// solve never calls another before it has finished with them.
let choleskyScratch = new Float64Array(64);
let forwardScratch = new Float64Array(8);

/** Solves the small symmetric positive system A x = b (Cholesky); undefined when singular. */
function solveSpd(A: Float64Array, b: Float64Array, p: number, out?: Float64Array): Float64Array | undefined {
  if (choleskyScratch.length < p * p) choleskyScratch = new Float64Array(p * p * 2);
  if (forwardScratch.length < p) forwardScratch = new Float64Array(p * 2);
  const L = choleskyScratch;
  for (let i = 0; i < p; i++) {
    for (let j = 0; j <= i; j++) {
      let s = A[i * p + j];
      for (let k = 0; k < j; k++) s -= L[i * p + k] * L[j * p + k];
      if (i === j) {
        if (!(s > 0)) return undefined;
        L[i * p + i] = Math.sqrt(s);
      } else L[i * p + j] = s / L[j * p + j];
    }
  }
  const z = forwardScratch;
  for (let i = 0; i < p; i++) {
    let s = b[i];
    for (let k = 0; k < i; k++) s -= L[i * p + k] * z[k];
    z[i] = s / L[i * p + i];
  }
  const x = out ?? new Float64Array(p);
  for (let i = p - 1; i >= 0; i--) {
    let s = z[i];
    for (let k = i + 1; k < p; k++) s -= L[k * p + i] * x[k];
    x[i] = s / L[i * p + i];
  }
  return x;
}

/** Diagonal of A⁻¹ for a small symmetric positive matrix: A = LLᵀ, (A⁻¹)ᵢᵢ = Σₖ ((L⁻¹)ₖᵢ)². */
function inverseDiagonal(A: Float64Array, p: number): Float64Array | undefined {
  const L = new Float64Array(p * p);
  for (let i = 0; i < p; i++) {
    for (let j = 0; j <= i; j++) {
      let s = A[i * p + j];
      for (let k = 0; k < j; k++) s -= L[i * p + k] * L[j * p + k];
      if (i === j) {
        if (!(s > 0)) return undefined;
        L[i * p + i] = Math.sqrt(s);
      } else L[i * p + j] = s / L[j * p + j];
    }
  }
  // M = L⁻¹ (lower triangular), column by column.
  const M = new Float64Array(p * p);
  for (let c = 0; c < p; c++) {
    M[c * p + c] = 1 / L[c * p + c];
    for (let i = c + 1; i < p; i++) {
      let s = 0;
      for (let k = c; k < i; k++) s -= L[i * p + k] * M[k * p + c];
      M[i * p + c] = s / L[i * p + i];
    }
  }
  const out = new Float64Array(p);
  for (let i = 0; i < p; i++) {
    let s = 0;
    for (let k = i; k < p; k++) s += M[k * p + i] * M[k * p + i];
    out[i] = s;
  }
  return out;
}

/**
 * The model of one cluster fit: the data window, the lines' parameter layout and the sample
 * weights. Parameters: per line centre and height, then the baseline (offset at the window
 * middle, slope), then the width scales that are fitted.
 */
class ClusterModel {
  readonly x: ArrayLike<number>;
  readonly y: ArrayLike<number>;
  readonly lo: number;
  readonly hi: number;
  readonly profile: LineProfile;
  /** Number of lines. */
  readonly k: number;
  /** Number of parameters. */
  readonly p: number;
  readonly nPts: number;
  /** The window's middle, where the baseline offset is taken. */
  readonly xm: number;
  readonly fixed: Set<number>;
  readonly fixedFlag: boolean[];
  /** Index of each line's width parameter, or −1 when its width is held. */
  readonly wIdx: number[];
  /** Each line's held (or starting) width parameter. */
  readonly held: number[];
  /** Sample weights (the taper), and their sum of squares: the effective number of samples. */
  readonly sw: Float64Array;
  readonly effective: number;
  private readonly e3 = new Float64Array(3);

  constructor(readonly input: ClusterFitInput) {
    const { x, y, lo, hi, profile } = input;
    this.x = x;
    this.y = y;
    this.lo = lo;
    this.hi = hi;
    this.profile = profile;
    this.k = input.centres.length;
    this.fixed = new Set(input.fixedCentres ?? []);
    this.fixedFlag = input.centres.map((_, i) => this.fixed.has(i));
    this.nPts = hi - lo + 1;
    this.xm = (x[lo] + x[hi]) / 2;
    this.wIdx = [];
    let p = 2 * this.k + 2;
    for (let i = 0; i < this.k; i++) this.wIdx.push(input.fitShapes?.[i] ? p++ : -1);
    this.p = p;
    this.held = input.centres.map((_, i) => input.shapes?.[i] ?? profile.uStart);
    this.sw = taperWeights(input, this.nPts);
    let effective = 0;
    for (let t = 0; t < this.nPts; t++) effective += this.sw[t] * this.sw[t];
    this.effective = effective;
  }

  /** Starting parameters: the given centres, heights above the lower window end, a flat baseline there. */
  start(): Float64Array {
    const { input, k, wIdx, held } = this;
    const par = new Float64Array(this.p);
    const yEnd = Math.min(this.y[this.lo], this.y[this.hi]);
    for (let i = 0; i < k; i++) {
      par[2 * i] = input.centres[i];
      par[2 * i + 1] = Math.max(input.heights[i] - yEnd, 1e-9);
      if (wIdx[i] >= 0) par[wIdx[i]] = held[i];
    }
    par[2 * k] = yEnd;
    par[2 * k + 1] = 0;
    return par;
  }

  /** Weighted residuals of parameters q into r (and the Jacobian into J); returns their sum of squares. */
  evaluateInto(q: Float64Array, J: Float64Array, r: Float64Array, withJacobian: boolean): number {
    const { x, y, lo, nPts, p, k, xm, wIdx, held, fixedFlag, sw, profile, e3 } = this;
    let ss = 0;
    for (let t = 0; t < nPts; t++) {
      const wt = sw[t];
      const row = t * p;
      if (wt === 0) {
        r[t] = 0;
        if (withJacobian) J.fill(0, row, row + p);
        continue;
      }
      const xi = x[lo + t];
      let model = q[2 * k] + q[2 * k + 1] * (xi - xm);
      for (let i = 0; i < k; i++) {
        const u = wIdx[i] >= 0 ? q[wIdx[i]] : held[i];
        const d = xi - q[2 * i];
        const a = q[2 * i + 1];
        if (withJacobian) {
          profile.evaluate(d, u, e3, wIdx[i] >= 0);
          model += a * e3[0];
          J[row + 2 * i] = fixedFlag[i] ? 0 : -a * e3[1] * wt;
          J[row + 2 * i + 1] = e3[0] * wt;
          if (wIdx[i] >= 0) J[row + wIdx[i]] = a * e3[2] * wt;
        } else model += a * profile.value(d, u);
      }
      if (withJacobian) {
        J[row + 2 * k] = wt;
        J[row + 2 * k + 1] = (xi - xm) * wt;
      }
      const res = (y[lo + t] - model) * wt;
      r[t] = res;
      ss += res * res;
    }
    return ss;
  }
}

/** Sample weights of the window: 1 near the starting centres, fading (cos) to 0 across the taper. */
function taperWeights(input: ClusterFitInput, nPts: number): Float64Array {
  const sw = new Float64Array(nPts).fill(1);
  if (!input.taper) return sw;
  const [inner, outer] = input.taper;
  for (let t = 0; t < nPts; t++) {
    let d = Infinity;
    for (const c of input.centres) d = Math.min(d, Math.abs(input.x[input.lo + t] - c));
    sw[t] = d <= inner ? 1 : d >= outer ? 0 : Math.cos(((d - inner) / (outer - inner)) * (Math.PI / 2));
  }
  return sw;
}

/**
 * The fit's working state: parameters, two sets of Jacobian and residuals (a trial step is
 * evaluated into the spare set, which becomes the current one when the step is taken, so an
 * accepted step is never evaluated twice), the normal equations and the sum of squares.
 */
class ClusterState {
  J: Float64Array;
  r: Float64Array;
  private Jspare: Float64Array;
  private rSpare: Float64Array;
  readonly JtJ: Float64Array;
  readonly Jtr: Float64Array;
  ss: number;

  constructor(
    readonly m: ClusterModel,
    readonly par: Float64Array,
  ) {
    const { nPts, p } = m;
    this.J = new Float64Array(nPts * p);
    this.r = new Float64Array(nPts);
    this.Jspare = new Float64Array(nPts * p);
    this.rSpare = new Float64Array(nPts);
    this.JtJ = new Float64Array(p * p);
    this.Jtr = new Float64Array(p);
    this.ss = m.evaluateInto(par, this.J, this.r, true);
  }

  /** Sum of squares at q, evaluated into the spare set. */
  evaluateSpare(q: Float64Array): number {
    return this.m.evaluateInto(q, this.Jspare, this.rSpare, true);
  }

  /** Takes q (evaluated into the spare set, with sum of squares ss) as the current parameters. */
  accept(q: Float64Array, ss: number): void {
    this.par.set(q);
    this.ss = ss;
    const tJ = this.J;
    this.J = this.Jspare;
    this.Jspare = tJ;
    const tr = this.r;
    this.r = this.rSpare;
    this.rSpare = tr;
  }

  /** JᵀJ and Jᵀr at the current parameters. */
  buildNormal(): void {
    const { JtJ, Jtr, J, r } = this;
    const { nPts, p } = this.m;
    JtJ.fill(0);
    Jtr.fill(0);
    for (let t = 0; t < nPts; t++) {
      const row = t * p;
      const rt = r[t];
      for (let i = 0; i < p; i++) {
        const ji = J[row + i];
        if (ji === 0) continue;
        Jtr[i] += ji * rt;
        for (let j = 0; j <= i; j++) JtJ[i * p + j] += ji * J[row + j];
      }
    }
    for (let i = 0; i < p; i++) {
      for (let j = 0; j < i; j++) JtJ[j * p + i] = JtJ[i * p + j];
      if (JtJ[i * p + i] === 0) JtJ[i * p + i] = 1; // a held centre: keep the system solvable
    }
  }
}

/**
 * Heights and baseline are linear: one Gauss–Newton step on them alone gives a start close to
 * the optimum, so the full search needs few iterations. Taken when it lowers the sum of squares.
 */
function linearStart(s: ClusterState): void {
  const { k, p, nPts } = s.m;
  const { J, r } = s;
  const q = 2 * k + 2;
  const M = new Float64Array(q * q);
  const v = new Float64Array(q);
  const col = (i: number) => (i < k ? 2 * i + 1 : 2 * k + (i - k));
  for (let t = 0; t < nPts; t++) {
    const row = t * p;
    for (let i = 0; i < q; i++) {
      const ji = J[row + col(i)];
      if (ji === 0) continue;
      v[i] += ji * r[t];
      for (let j = 0; j < q; j++) M[i * q + j] += ji * J[row + col(j)];
    }
  }
  for (let i = 0; i < q; i++) M[i * q + i] = M[i * q + i] * (1 + 1e-9) || 1;
  const delta = solveSpd(M, v, q);
  if (!delta) return;
  const start = s.par.slice();
  for (let i = 0; i < q; i++) start[col(i)] += delta[i];
  const ssStart = s.evaluateSpare(start);
  if (ssStart < s.ss) s.accept(start, ssStart);
}

/** Levenberg–Marquardt steps on all parameters until the fit settles (at most 12). */
function levenbergMarquardt(s: ClusterState): void {
  const { k, p, wIdx, profile } = s.m;
  const par = s.par;
  const trial = new Float64Array(p);
  const step = new Float64Array(p);
  const A = new Float64Array(p * p);
  let lambda = 1e-4;
  for (let iter = 0; iter < 12; iter++) {
    s.buildNormal();
    let improved = false;
    for (let tries = 0; tries < 8; tries++) {
      A.set(s.JtJ);
      for (let i = 0; i < p; i++) A[i * p + i] *= 1 + lambda;
      if (!solveSpd(A, s.Jtr, p, step)) {
        lambda *= 10;
        continue;
      }
      for (let i = 0; i < p; i++) trial[i] = par[i] + step[i];
      for (const w of wIdx) if (w >= 0) trial[w] = Math.min(profile.uMax, Math.max(profile.uMin, trial[w]));
      const ssTrial = s.evaluateSpare(trial);
      if (ssTrial < s.ss) {
        const relative = (s.ss - ssTrial) / Math.max(s.ss, 1e-300);
        // Settled: the centres moved by a negligible share of the width, and the fit hardly improved.
        let centreStep = 0;
        for (let i = 0; i < k; i++) centreStep = Math.max(centreStep, Math.abs(trial[2 * i] - par[2 * i]));
        s.accept(trial, ssTrial);
        lambda = Math.max(lambda / 10, 1e-9);
        improved = relative > 1e-6 && !(centreStep < 1e-5 * profile.fwhm && relative < 1e-3);
        break;
      }
      lambda *= 10;
    }
    if (!improved) break;
  }
}

/** The fitted lines with standard errors from the final normal equations; not ok when singular or a centre left the window. */
function clusterResult(s: ClusterState): ClusterFit {
  const { k, p, x, lo, hi, wIdx, held, fixed, effective } = s.m;
  const { par, ss } = s;
  s.buildNormal();
  const dof = Math.max(1, effective - p);
  const s2 = ss / dof;
  const diag = inverseDiagonal(s.JtJ, p);
  const centres: number[] = [];
  const heights: number[] = [];
  const centreErrors: number[] = [];
  const heightErrors: number[] = [];
  const shapes: number[] = [];
  let ok = diag !== undefined;
  for (let i = 0; i < k; i++) {
    centres.push(par[2 * i]);
    heights.push(par[2 * i + 1]);
    shapes.push(wIdx[i] >= 0 ? par[wIdx[i]] : held[i]);
    centreErrors.push(diag && !fixed.has(i) ? Math.sqrt(Math.max(0, diag[2 * i] * s2)) : Infinity);
    heightErrors.push(diag ? Math.sqrt(Math.max(0, diag[2 * i + 1] * s2)) : Infinity);
    if (!Number.isFinite(par[2 * i]) || par[2 * i] < x[lo] || par[2 * i] > x[hi]) ok = false;
  }
  return {
    ok,
    centres,
    heights,
    centreErrors,
    heightErrors,
    shapes,
    rms: Math.sqrt(ss / Math.max(1, effective)),
    baseline: [par[2 * k], par[2 * k + 1]],
  };
}

/**
 * Fits the lines of one cluster (ClusterModel): a linear start for heights and baseline, then
 * Levenberg–Marquardt on every parameter, then standard errors.
 */
export function fitCluster(input: ClusterFitInput): ClusterFit {
  const model = new ClusterModel(input);
  const state = new ClusterState(model, model.start());
  linearStart(state);
  levenbergMarquardt(state);
  return clusterResult(state);
}

// ------------------------------------------------------------------------------------------
// Measuring the instrument's shape on one clean line

/** Solves a small dense least-squares problem by normal equations; undefined when singular. */
function linearFit(rows: number[][], y: number[]): { beta: number[]; ss: number } | undefined {
  const p = rows[0].length;
  const A = new Float64Array(p * p);
  const b = new Float64Array(p);
  for (let t = 0; t < rows.length; t++) {
    const r = rows[t];
    for (let i = 0; i < p; i++) {
      b[i] += r[i] * y[t];
      for (let j = 0; j < p; j++) A[i * p + j] += r[i] * r[j];
    }
  }
  // Scale for conditioning.
  const d = new Float64Array(p);
  for (let i = 0; i < p; i++) d[i] = Math.sqrt(A[i * p + i]) || 1;
  for (let i = 0; i < p; i++) {
    b[i] /= d[i];
    for (let j = 0; j < p; j++) A[i * p + j] /= d[i] * d[j];
    A[i * p + i] += 1e-12;
  }
  const sol = solveSpd(A, b, p);
  if (!sol) return undefined;
  const beta = Array.from(sol, (v, i) => v / d[i]);
  let ss = 0;
  for (let t = 0; t < rows.length; t++) {
    let m = 0;
    for (let i = 0; i < p; i++) m += rows[t][i] * beta[i];
    ss += (y[t] - m) ** 2;
  }
  return { beta, ss };
}

export interface ShapeMeasurement {
  shape: InstrumentShape;
  centres: number[];
  ss: number;
}

/**
 * Fits one clean line (and any close neighbour in the window, such as an isotope partner)
 * with the instrument model. All lines share one shape; nonlinear parameters (found by a small
 * Levenberg–Marquardt search with numerical derivatives): the centres, ln L, ln Γ and each
 * neighbour's height relative to the first line; linear (solved exactly at each step, i.e.
 * variable projection): the first line's height times each window coefficient, and a straight
 * baseline.
 */
export function measureShape(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  lo: number,
  hi: number,
  start: { centres: number[]; fwhm: number },
  options: { terms?: number; fitGamma?: boolean } = {},
): ShapeMeasurement | undefined {
  const terms = options.terms ?? 4;
  const fitGamma = options.fitGamma !== false;
  const xm = (x[lo] + x[hi]) / 2;
  const nc = start.centres.length;
  const iL = nc;
  const iG = nc + 1;
  const iR = nc + 2; // ratios of lines 1 … nc−1 to line 0
  const design = (v: number[]) => {
    const L = Math.exp(v[iL]);
    const gamma = Math.exp(v[iG]);
    const rows: number[][] = [];
    const ys: number[] = [];
    for (let t = lo; t <= hi; t++) {
      const row = [1, x[t] - xm];
      for (let k = 0; k < terms; k++) {
        let sum = instrumentTerm(x[t] - v[0], k, L, gamma);
        for (let j = 1; j < nc; j++) sum += v[iR + j - 1] * instrumentTerm(x[t] - v[j], k, L, gamma);
        row.push(sum);
      }
      rows.push(row);
      ys.push(y[t]);
    }
    return { rows, ys };
  };
  const residuals = (v: number[]): { r: number[]; beta: number[] } | undefined => {
    const { rows, ys } = design(v);
    const fit = linearFit(rows, ys);
    if (!fit) return undefined;
    return { r: rows.map((row, t) => ys[t] - row.reduce((acc, c, i) => acc + c * fit.beta[i], 0)), beta: fit.beta };
  };
  const maxLogGamma = Math.log(start.fwhm);
  const clamp = (v: number[]) => {
    v[iG] = Math.min(v[iG], maxLogGamma);
    for (let j = iR; j < v.length; j++) v[j] = Math.max(0.02, Math.min(1, v[j]));
    return v;
  };
  // Start from a Happ–Genzel-like width (FWHM ≈ 0.9/L), a narrow line before the instrument, partners at a third.
  let q = [...start.centres, Math.log(0.9 / start.fwhm), Math.log(0.15 * start.fwhm), ...start.centres.slice(1).map(() => 0.33)];
  const np = q.length;
  const hStep = q.map((_, i) => (i < nc ? start.fwhm * 1e-3 : i === iL ? 1e-3 : i === iG ? 1e-2 : 1e-3));
  // A held Γ: no step, so its column of the Jacobian is zero and the damping keeps it put.
  if (!fitGamma) q[iG] = Math.log(0.05 * start.fwhm);
  let base = residuals(q);
  if (!base) return undefined;
  let f = base.r.reduce((acc, r) => acc + r * r, 0);
  let lambda = 1e-2;
  for (let iter = 0; iter < 40; iter++) {
    const cols: number[][] = [];
    for (let i = 0; i < np; i++) {
      if (i === iG && !fitGamma) {
        cols.push(base.r.map(() => 0));
        continue;
      }
      const qq = q.slice();
      qq[i] += hStep[i];
      const r = residuals(qq);
      if (!r) return undefined;
      cols.push(r.r.map((v, t) => (v - base!.r[t]) / hStep[i]));
    }
    const JtJ = new Float64Array(np * np);
    const Jtr = new Float64Array(np);
    for (let t = 0; t < base.r.length; t++) {
      for (let i = 0; i < np; i++) {
        Jtr[i] -= cols[i][t] * base.r[t];
        for (let j = 0; j < np; j++) JtJ[i * np + j] += cols[i][t] * cols[j][t];
      }
    }
    let improved = false;
    for (let tries = 0; tries < 8; tries++) {
      const A = JtJ.slice();
      for (let i = 0; i < np; i++) A[i * np + i] = A[i * np + i] * (1 + lambda) + 1e-30;
      const st = solveSpd(A, Jtr, np);
      if (!st) {
        lambda *= 10;
        continue;
      }
      const trial = clamp(
        q.map(
          (v, i) =>
            v +
            (i < nc
              ? Math.max(-start.fwhm, Math.min(start.fwhm, st[i]))
              : i === iL
                ? Math.max(-0.5, Math.min(0.5, st[i]))
                : i === iG
                  ? Math.max(-1, Math.min(1, st[i]))
                  : Math.max(-0.2, Math.min(0.2, st[i]))),
        ),
      );
      const r = residuals(trial);
      const ft = r ? r.r.reduce((acc, v) => acc + v * v, 0) : Infinity;
      if (ft < f) {
        improved = (f - ft) / f > 1e-10;
        q = trial;
        f = ft;
        base = r!;
        lambda = Math.max(1e-9, lambda / 10);
        break;
      }
      lambda *= 10;
    }
    if (!improved) break;
  }
  const L = Math.exp(q[iL]);
  const gamma = Math.exp(q[iG]);
  const coeffs = base.beta.slice(2, 2 + terms);
  const a0 = coeffs.reduce((acc, a) => acc + a, 0);
  if (!(Math.abs(a0) > 0)) return undefined;
  const shape = { L, gamma, a: coeffs.map((a) => a / a0) };
  if (!(instrumentProfile(0, shape) > 0)) return undefined;
  return { shape, centres: q.slice(0, nc), ss: f };
}
