/**
 * Proposes a branch and J for each peak of a plain peak list, so a student or TA can check
 * an assignment.
 *
 * How: the band gap (the P(1)–R(0) spacing, about twice the line spacing) is found near the
 * reference band centre; its two edges are P(1) and R(0). From there the reference B₀ and B₁
 * predict every line; each peak takes the nearest running number m, the predictions are
 * refitted to the assigned peaks, and the assignment is repeated. With chlorine or bromine the
 * weaker partner isotopologue (H³⁷Cl beside H³⁵Cl) makes close doublets; the member on the
 * expected side of the doublet is kept and the other reported as the partner's.
 */
import { fitBand, MAX_LINES, type Branch } from './fit';
import { bandConstants } from './simulate';
import { defaultPartner } from './referenceValues';
import { parseSpecies, type Species } from './species';

export interface PeakAssignment {
  wavenumber: number;
  branch: Branch;
  J: number;
  m: number;
  /** 1 = on the predicted position, 0 = half a line spacing away. */
  confidence: number;
  /** observed − predicted, cm⁻¹. */
  residual: number;
}

export interface AssignmentResult {
  ok: boolean;
  assignments: PeakAssignment[];
  unassigned: { wavenumber: number; reason: string; likelyIsotopologue?: string }[];
  /** Band centre of the final model, cm⁻¹. */
  bandCentreEstimate?: number;
  problems: { field: string; message: string }[];
}

function median(xs: number[]): number {
  if (xs.length === 0) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  const mid = s.length >> 1;
  return s.length % 2 ? s[mid] : (s[mid - 1] + s[mid]) / 2;
}

export function assignPeaks(peaks: unknown, speciesInput: string | Species): AssignmentResult {
  const fail = (message: string, field = 'peaks'): AssignmentResult => ({ ok: false, assignments: [], unassigned: [], problems: [{ field, message }] });
  if (!Array.isArray(peaks)) return fail('The peaks must be a list of wavenumbers in cm⁻¹.');
  if (peaks.length > MAX_LINES) return fail(`${peaks.length} peaks is more than a band has (limit ${MAX_LINES}).`);
  const bad = peaks.findIndex((p) => typeof p !== 'number' || !Number.isFinite(p) || p <= 0);
  if (bad >= 0) return fail(`Peak ${bad + 1} is not a positive wavenumber.`, `peaks[${bad}]`);
  const species = typeof speciesInput === 'string' ? (() => { const p = parseSpecies(speciesInput); return p.ok ? p.species : undefined; })() : speciesInput;
  if (!species) return fail('The species is not known.', 'species');
  const sorted = [...new Set(peaks as number[])].sort((a, b) => a - b);
  if (sorted.length < 3) return fail('At least three peaks are needed to find the band.');

  const ref = bandConstants(species);
  const spacingsAll = sorted.slice(1).map((p, i) => p - sorted[i]);
  const B = ref ? ref.B0 : median(spacingsAll) / 2;
  const unassigned: AssignmentResult['unassigned'] = [];

  // Isotopic doublets: keep the member on this species' side.
  const partner = defaultPartner(species);
  const heavyPartner = partner && partner.atoms.some((a, i) => a.symbol !== 'H' && a.massNumber !== species.atoms[i].massNumber) ? partner : undefined;
  const lighter = heavyPartner ? species.reducedMassKg < heavyPartner.reducedMassKg : true;
  const reps: number[] = [];
  // Doublets are as far apart as the isotope shift (≈ ν̃₀|1 − √(μ/μ′)|, 2 cm⁻¹ for HCl, 0.4 cm⁻¹ for HBr);
  // merging only that close keeps converging high-J lines apart.
  const splitting = heavyPartner && ref ? ref.nu0 * Math.abs(1 - Math.sqrt(species.reducedMassKg / heavyPartner.reducedMassKg)) : 0;
  const clusterGap = heavyPartner ? Math.min(0.35 * 2 * B, 3 * splitting) : 0.1 * 2 * B;
  for (let i = 0; i < sorted.length; ) {
    let j = i;
    while (j + 1 < sorted.length && sorted[j + 1] - sorted[j] < clusterGap) j++;
    const group = sorted.slice(i, j + 1);
    const keep = group.length === 1 ? group[0] : lighter ? group[group.length - 1] : group[0];
    reps.push(keep);
    for (const g of group) {
      if (g === keep) continue;
      unassigned.push(heavyPartner ? { wavenumber: g, reason: `close doublet partner of ${keep.toFixed(2)} cm⁻¹`, likelyIsotopologue: heavyPartner.formula } : { wavenumber: g, reason: `too close to the peak at ${keep.toFixed(2)} cm⁻¹ to be a separate line` });
    }
    i = j + 1;
  }
  if (reps.length < 3) return fail('After merging close doublets fewer than three peaks are left.');

  // The band gap: a spacing about twice its neighbours', nearest the reference band centre.
  const s = reps.slice(1).map((p, i) => p - reps[i]);
  let gapIndex = -1;
  let bestScore = Infinity;
  for (let i = 0; i < s.length; i++) {
    const neighbours = [s[i - 1], s[i + 1]].filter((x): x is number => x !== undefined);
    const local = neighbours.length ? median(neighbours) : median(s);
    if (!(s[i] > 1.5 * local) || s[i] < 2.5 * B) continue;
    const mid = (reps[i] + reps[i + 1]) / 2;
    const score = ref ? Math.abs(mid - ref.nu0) : -s[i] / local;
    if (ref && Math.abs(mid - ref.nu0) > 8 * B) continue;
    if (score < bestScore) {
      bestScore = score;
      gapIndex = i;
    }
  }
  let B0 = ref?.B0 ?? B;
  let B1 = ref?.B1 ?? B;
  let a: number;
  if (gapIndex >= 0) a = (reps[gapIndex] + 2 * B0 + (reps[gapIndex + 1] - 2 * B1)) / 2;
  else if (ref) a = ref.nu0;
  else return fail('No band gap was found and the species has no reference band centre.');
  let coef = [a, B1 + B0, B1 - B0, -4 * (ref?.D ?? 0)];
  const predict = (m: number) => coef[0] + coef[1] * m + coef[2] * m * m + coef[3] * m * m * m;

  let chosen = new Map<number, number>(); // m → peak
  for (let iter = 0; iter < 4; iter++) {
    const byM = new Map<number, { peak: number; resid: number }>();
    for (const p of reps) {
      // Start from the root of the quadratic nearest the linear guess, then look at neighbours.
      const lin = (p - coef[0]) / coef[1];
      let guess = lin;
      if (coef[2] !== 0) {
        const disc = coef[1] * coef[1] - 4 * coef[2] * (coef[0] - p);
        if (disc >= 0) {
          const r1 = (-coef[1] + Math.sqrt(disc)) / (2 * coef[2]);
          const r2 = (-coef[1] - Math.sqrt(disc)) / (2 * coef[2]);
          guess = Math.abs(r1 - lin) < Math.abs(r2 - lin) ? r1 : r2;
        }
      }
      let m0 = Math.round(guess);
      let best = { m: 0, r: Infinity };
      for (let m = m0 - 4; m <= m0 + 4; m++) {
        if (m === 0) continue;
        const r = p - predict(m);
        if (Math.abs(r) < Math.abs(best.r)) best = { m, r };
      }
      m0 = best.m;
      const prev = byM.get(m0);
      if (!prev || Math.abs(best.r) < Math.abs(prev.resid)) byM.set(m0, { peak: p, resid: best.r });
    }
    chosen = new Map([...byM].map(([m, v]) => [m, v.peak]));
    const lines = [...chosen].map(([m, wn]) => ({ branch: (m > 0 ? 'R' : 'P') as Branch, J: m > 0 ? m - 1 : -m, wavenumber: wn }));
    const spacing = (m: number) => Math.abs(coef[1] + 2 * coef[2] * m);
    const good = lines.filter((l) => Math.abs(l.wavenumber - predict(l.branch === 'R' ? l.J + 1 : -l.J)) < 0.3 * spacing(l.branch === 'R' ? l.J + 1 : -l.J));
    const f = fitBand(good, { centrifugal: good.length >= 12 });
    if (!f.ok) break;
    coef = [f.coefficients[0], f.coefficients[1], f.coefficients[2], f.coefficients[3] ?? coef[3]];
    B0 = f.B0.value;
    B1 = f.B1.value;
  }

  const assignments: PeakAssignment[] = [];
  const used = new Set<number>();
  for (const [m, wn] of chosen) {
    const resid = wn - predict(m);
    const spacing = Math.abs(coef[1] + 2 * coef[2] * m) || 2 * B;
    if (Math.abs(resid) > 0.3 * spacing) continue;
    used.add(wn);
    assignments.push({
      wavenumber: wn,
      branch: m > 0 ? 'R' : 'P',
      J: m > 0 ? m - 1 : -m,
      m,
      confidence: Math.round(Math.max(0, 1 - Math.abs(resid) / (0.5 * spacing)) * 100) / 100,
      residual: resid,
    });
  }
  for (const p of reps) if (!used.has(p)) unassigned.push({ wavenumber: p, reason: 'no line of this band is predicted here' });
  assignments.sort((x, y) => x.wavenumber - y.wavenumber);
  unassigned.sort((x, y) => x.wavenumber - y.wavenumber);
  void B1;
  return { ok: assignments.length > 0, assignments, unassigned, bandCentreEstimate: coef[0], problems: [] };
}
