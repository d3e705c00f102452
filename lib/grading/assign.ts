/**
 * Proposes a branch and J for each peak of a plain peak list (wavenumbers only), so a student or
 * TA can check an assignment.
 *
 * How: the reference constants of the species predict every line of the fundamental,
 *   ν̃(m) = ν̃₀ + (B₁+B₀)m + (B₁−B₀)m² − 4Dm³,  m = J+1 for R(J), m = −J for P(J);
 * the calibration offset of the list (up to `maxOffset`, ±25 cm⁻¹ by default) is found by trying
 * every offset that puts some peak on some predicted line, and keeping the one under which most
 * peaks fall on a line and fewest predicted lines inside the list's range find no peak. Lines
 * numbered one too high or too low fail that test: the band gap (no line at m = 0) and the
 * curvature of the branches (B₁ ≠ B₀) both move against them. Then the assigned lines are fitted
 * (fitBandModels), the fit predicts again, and the lines are assigned again. No line is needed at
 * any particular place: P(1) and R(0) may be missing like any other.
 *
 * Doublets of a heavier-atom isotopologue (H³⁷Cl beside H³⁵Cl, ≈ 2 cm⁻¹ apart): each predicted
 * line takes the peak nearest to it; a peak the partner's prediction (same offset) explains better
 * is left unassigned and named as the partner's. A lone peak goes to this species when this
 * species' prediction explains it (the more abundant one, in natural abundance).
 */
import { fitBandModels, MAX_LINES, type Branch } from './fit';
import { bandConstants, type BandConstants } from './simulate';
import { defaultPartner } from './referenceValues';
import { parseSpecies, type Species } from './species';

export interface PeakAssignment {
  wavenumber: number;
  branch: Branch;
  J: number;
  m: number;
  /** 1 = on the predicted position, 0 = at the edge of the acceptance window. */
  confidence: number;
  /** observed − predicted, cm⁻¹. */
  residual: number;
}

export interface AssignmentResult {
  ok: boolean;
  assignments: PeakAssignment[];
  unassigned: { wavenumber: number; reason: string; likelyIsotopologue?: string }[];
  /** Band centre of the final model, cm⁻¹ (as measured: the calibration offset is included). */
  bandCentreEstimate?: number;
  /** The calibration offset found against the reference constants, cm⁻¹ (reported, not corrected). */
  offset?: number;
  problems: { field: string; message: string }[];
}

export interface AssignOptions {
  /** Largest calibration offset to look for, cm⁻¹ (default 25). */
  maxOffset?: number;
}

/** Coefficients of ν̃(m) = c₀ + c₁m + c₂m² + c₃m³. */
type Polynomial = [number, number, number, number];

const polynomialOf = (k: BandConstants): Polynomial => [k.nu0, k.B1 + k.B0, k.B1 - k.B0, -4 * k.D];
const positionAt = (c: Polynomial, m: number) => c[0] + c[1] * m + c[2] * m * m + c[3] * m * m * m;
const spacingAt = (c: Polynomial, m: number) => Math.abs(c[1] + 2 * c[2] * m + 3 * c[3] * m * m);
const lineOf = (m: number): { branch: Branch; J: number } => (m > 0 ? { branch: 'R', J: m - 1 } : { branch: 'P', J: -m });

interface Predicted {
  m: number;
  position: number;
}

/** The predicted lines from m = −mMax … mMax (no m = 0), in order of position. */
function predictLines(c: Polynomial, mMax: number): Predicted[] {
  const out: Predicted[] = [];
  for (let m = -mMax; m <= mMax; m++) if (m !== 0) out.push({ m, position: positionAt(c, m) });
  return out.sort((a, b) => a.position - b.position);
}

/** Index of the predicted line nearest to x (lines sorted by position). */
function nearest(lines: Predicted[], x: number): number {
  let lo = 0;
  let hi = lines.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (lines[mid].position < x) lo = mid;
    else hi = mid;
  }
  return Math.abs(lines[lo].position - x) <= Math.abs(lines[hi].position - x) ? lo : hi;
}

interface Match {
  m: number;
  peak: number;
  residual: number;
}

/** Each predicted line takes the nearest peak within its window (a fraction of the local line spacing). */
function match(peaks: number[], lines: Predicted[], c: Polynomial, offset: number, window: (m: number) => number): Map<number, Match> {
  const byM = new Map<number, Match>();
  for (const p of peaks) {
    const i = nearest(lines, p - offset);
    const { m, position } = lines[i];
    const residual = p - offset - position;
    if (Math.abs(residual) > window(m)) continue;
    const prev = byM.get(m);
    if (!prev || Math.abs(residual) < Math.abs(prev.residual)) byM.set(m, { m, peak: p, residual });
  }
  return byM;
}

/** How well an offset explains the list: peaks on lines, less half a point per predicted line in range without a peak. */
function score(byM: Map<number, Match>, lines: Predicted[], offset: number, lo: number, hi: number): { score: number; sumSquares: number } {
  let missing = 0;
  for (const l of lines) {
    const x = l.position + offset;
    if (x > lo && x < hi && !byM.has(l.m)) missing++;
  }
  let sumSquares = 0;
  for (const v of byM.values()) sumSquares += v.residual * v.residual;
  return { score: byM.size - 0.5 * missing, sumSquares };
}

const failed = (message: string, field = 'peaks'): AssignmentResult => ({
  ok: false,
  assignments: [],
  unassigned: [],
  problems: [{ field, message }],
});

/** The peaks (sorted, without repeats) and the species with its reference constants, or why they cannot be used. */
function readInput(
  peaks: unknown,
  speciesInput: string | Species,
): { ok: true; sorted: number[]; species: Species; ref: BandConstants } | { ok: false; result: AssignmentResult } {
  const fail = (message: string, field?: string) => ({ ok: false as const, result: failed(message, field) });
  if (!Array.isArray(peaks)) return fail('The peaks must be a list of wavenumbers in cm⁻¹.');
  if (peaks.length > MAX_LINES) return fail(`${peaks.length} peaks is more than a band has (limit ${MAX_LINES}).`);
  const bad = peaks.findIndex((p) => typeof p !== 'number' || !Number.isFinite(p) || p <= 0);
  if (bad >= 0) return fail(`Peak ${bad + 1} is not a positive wavenumber.`, `peaks[${bad}]`);
  const species =
    typeof speciesInput === 'string'
      ? (() => {
          const p = parseSpecies(speciesInput);
          return p.ok ? p.species : undefined;
        })()
      : speciesInput;
  if (!species) return fail('The species is not known.', 'species');
  const sorted = [...new Set(peaks as number[])].sort((a, b) => a - b);
  if (sorted.length < 3) return fail('At least three peaks are needed to find the band.');
  const ref = bandConstants(species);
  if (!ref)
    return fail(
      `Oscillab has no reference constants for ${species.display}, so it cannot propose an assignment; assign the lines by hand.`,
      'species',
    );
  return { ok: true, sorted, species, ref };
}

export function assignPeaks(peaks: unknown, speciesInput: string | Species, options: AssignOptions = {}): AssignmentResult {
  const input = readInput(peaks, speciesInput);
  if (!input.ok) return input.result;
  const { sorted, species, ref } = input;

  const maxOffset = Math.max(0, Math.min(100, options.maxOffset ?? 25));
  const lo = sorted[0];
  const hi = sorted[sorted.length - 1];
  let c = polynomialOf(ref);
  // Enough lines to cover the list on both sides, whatever the offset.
  // (and short of the R-branch head, where the lines turn back).
  const head = c[2] < 0 ? Math.floor((0.8 * c[1]) / (-2 * c[2])) : 150;
  let mMax = 1;
  while (
    mMax < Math.min(150, head) &&
    (positionAt(c, -mMax) + maxOffset > lo - 2 * ref.B0 || positionAt(c, mMax) - maxOffset < hi + 2 * ref.B0)
  )
    mMax++;
  const lines = predictLines(c, mMax);
  const coarse = (m: number) => 0.2 * spacingAt(c, m);

  // The heavier-atom partner in natural abundance (H³⁷Cl beside H³⁵Cl): its lines, at the same
  // calibration offset, explain the other member of each doublet.
  const partner = defaultPartner(species);
  const partnerConstants =
    partner && partner.atoms.some((a, i) => a.symbol !== 'H' && a.massNumber !== species.atoms[i].massNumber)
      ? bandConstants(partner)
      : undefined;
  const partnerPolynomial = partnerConstants ? polynomialOf(partnerConstants) : undefined;
  const partnerLines = partnerPolynomial ? predictLines(partnerPolynomial, mMax) : [];
  const isotopeShift = partnerConstants ? Math.abs(partnerConstants.nu0 - ref.nu0) : 0;
  const partnerWindow = (m: number) => Math.min(0.1 * spacingAt(c, m), 0.4 * isotopeShift);
  /** Peaks the partner explains at this offset, among those this species' lines did not take. */
  const partnerMatches = (byM: Map<number, Match>, offset: number) => {
    if (!partnerPolynomial) return 0;
    const taken = new Set([...byM.values()].map((v) => v.peak));
    return match(
      sorted.filter((p) => !taken.has(p)),
      partnerLines,
      partnerPolynomial,
      offset,
      partnerWindow,
    ).size;
  };

  // Every offset that puts a peak on a line, within ±maxOffset; the best explains most of the list.
  let best: { offset: number; score: number; sumSquares: number } | undefined;
  const tried = new Set<number>();
  for (const p of sorted) {
    for (const l of lines) {
      const offset = p - l.position;
      if (Math.abs(offset) > maxOffset) continue;
      const key = Math.round(offset * 20);
      if (tried.has(key)) continue;
      tried.add(key);
      const byM = match(sorted, lines, c, offset, coarse);
      const s = score(byM, lines, offset, lo, hi);
      // The partner's lines count half: they confirm the offset, but are not this species' band.
      s.score += 0.5 * partnerMatches(byM, offset);
      if (!best || s.score > best.score || (s.score === best.score && s.sumSquares < best.sumSquares)) best = { offset, ...s };
    }
  }
  if (!best || best.score < 3) {
    return failed(
      `No ${species.display} band was found among these peaks: the reference constants put it near ${Math.round(ref.nu0)} cm⁻¹ (within ±${maxOffset} cm⁻¹ of calibration), and fewer than three peaks fall on its lines there.`,
    );
  }

  /** This species' matches, less the peaks its partner's line (at the same calibration) explains better. */
  const ownMatches = (poly: Polynomial, predicted: Predicted[], shift: number, calibration: number, window: (m: number) => number) => {
    const byM = match(sorted, predicted, poly, shift, window);
    if (!partnerPolynomial) return byM;
    for (const [m, v] of byM) {
      const j = nearest(partnerLines, v.peak - calibration);
      if (Math.abs(v.peak - calibration - partnerLines[j].position) < Math.abs(v.residual) / 2) byM.delete(m);
    }
    return byM;
  };

  // Refine: fit the assigned lines, predict again from the fit, assign again with a tighter window.
  let offset = best.offset;
  let byM = ownMatches(c, lines, offset, offset, coarse);
  let rms = Infinity;
  for (let iteration = 0; iteration < 3; iteration++) {
    const assigned = [...byM.values()].map((v) => ({ ...lineOf(v.m), wavenumber: v.peak }));
    const fitted = assigned.length >= 4 ? fitBandModels(assigned) : undefined;
    if (!fitted || !fitted.ok) break;
    const k = fitted.fit.coefficients;
    c = [k[0], k[1], k[2], k[3] ?? c[3]];
    offset = 0;
    rms = fitted.fit.rms;
    const floor = rms;
    const refined = predictLines(c, mMax);
    byM = ownMatches(
      c,
      refined,
      0,
      c[0] - ref.nu0,
      (m) => Math.max(0.05 * spacingAt(c, m), 4 * floor, 0.05) + (iteration === 0 ? 0.1 * spacingAt(c, m) : 0),
    );
  }

  // What is left: the partner isotopologue's lines (same offset), or nothing of this band.
  const calibration = c[0] + offset - ref.nu0; // the list's offset against the reference, carried to the partner
  const partnerOffset = calibration;
  const assignments: PeakAssignment[] = [];
  const used = new Set<number>();
  for (const v of byM.values()) {
    const predicted = positionAt(c, v.m) + offset;
    const residual = v.peak - predicted;
    const window = Math.max(0.05 * spacingAt(c, v.m), 4 * (Number.isFinite(rms) ? rms : 0), 0.05) + 0.1 * spacingAt(c, v.m);
    used.add(v.peak);
    assignments.push({
      wavenumber: v.peak,
      ...lineOf(v.m),
      m: v.m,
      confidence: Math.round(Math.max(0, 1 - Math.abs(residual) / window) * 100) / 100,
      residual,
    });
  }
  const unassigned = nameLeftovers(
    sorted,
    used,
    species,
    partner && partnerPolynomial ? { species: partner, lines: partnerLines, polynomial: partnerPolynomial } : undefined,
    partnerOffset,
  );
  assignments.sort((x, y) => x.wavenumber - y.wavenumber);
  const problems: AssignmentResult['problems'] = [];
  if (assignments.length < 3)
    problems.push({ field: 'peaks', message: `Only ${assignments.length} peaks could be assigned to the ${species.display} band.` });
  return { ok: assignments.length >= 3, assignments, unassigned, bandCentreEstimate: c[0] + offset, offset: calibration, problems };
}

/** The partner isotopologue, its line polynomial and its predicted lines. */
interface PartnerPrediction {
  species: Species;
  lines: Predicted[];
  polynomial: Polynomial;
}

/** Why each peak no line took is left: a line of the partner isotopologue (same calibration), or no line of this band. */
function nameLeftovers(
  sorted: number[],
  used: Set<number>,
  species: Species,
  partner: PartnerPrediction | undefined,
  partnerOffset: number,
): AssignmentResult['unassigned'] {
  const unassigned: AssignmentResult['unassigned'] = [];
  for (const p of sorted) {
    if (used.has(p)) continue;
    if (partner && partner.lines.length) {
      const j = nearest(partner.lines, p - partnerOffset);
      const m = partner.lines[j].m;
      if (Math.abs(p - partnerOffset - partner.lines[j].position) < 0.2 * spacingAt(partner.polynomial, m)) {
        const l = lineOf(m);
        unassigned.push({
          wavenumber: p,
          reason: `the ${partner.species.display} line ${l.branch}(${l.J}) of the same band`,
          likelyIsotopologue: partner.species.formula,
        });
        continue;
      }
    }
    unassigned.push({ wavenumber: p, reason: `no line of the ${species.display} fundamental is predicted here` });
  }
  return unassigned;
}
