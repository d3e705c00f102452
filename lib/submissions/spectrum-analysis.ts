/**
 * Oscillab's own analysis of a student's spectrum, in the product:
 *
 * - which spectra a practical takes (`samplesOf`): one spectrum holding every molecule, or one
 *   per sample, each with the bands the instructor expects in it;
 * - the analysis of an uploaded spectrum (`analyseUpload`), made once when it is uploaded and
 *   kept, compact, in the upload's row (`StoredAnalysis`);
 * - the student's lines counted against it per isotopologue and band, with a plain sentence when
 *   a band lies outside the uploaded range (`matchByBand`);
 * - the lines it assigned, for the form's "take the lines from my spectrum" (`linesForSpecies`);
 * - the third comparison, "from your spectrum": each reported number against the same number
 *   computed from Oscillab's analysis of the student's own spectrum (`compareWithAnalysis`),
 *   with its own verdicts.
 *
 * The numbers come from lib/spectrum's analyseSpectrum and lib/grading; nothing is computed here
 * but the bookkeeping.
 */
import {
  forceConstantFromBand,
  isQuantityKey,
  judge,
  parseSpecies,
  parseTypedNumber,
  QUANTITIES,
  speciesDisplay,
  toSI,
  type Estimate,
  type QuantityKey,
  type Tolerance,
  type Verdict,
} from '@/lib/grading';
import { analyseSpectrum, BAND_LABEL, type BandKind, type Spectrum, type SpectrumAnalysis } from '@/lib/spectrum';
import type { SpectrumSampleSetting } from '@/models/practical';
import { log } from '@/lib/log';

/** Quantities that need the first overtone: a practical asking for them expects the 2←0 band. */
export const OVERTONE_QUANTITIES = new Set([
  'omegaE',
  'omegaExe',
  'forceConstantE',
  'zeroPointEnergy',
  'dissociationEnergy',
  'dissociationEnergy0',
]);

export type SpectrumSample = SpectrumSampleSetting;

/** "H35Cl" → "HCl", "D35Cl" → "DCl", "12C16O" → "CO": the molecule whose isotopologues the cell holds. */
export function moleculeOf(formula: string): string {
  const p = parseSpecies(formula);
  if (!p.ok) return formula;
  return p.species.atoms.map((a) => (a.symbol === 'H' ? (a.massNumber === 2 ? 'D' : a.massNumber === 3 ? 'T' : 'H') : a.symbol)).join('');
}

const KEY_RE = /^[a-z0-9-]{1,40}$/;

/**
 * The spectra a practical takes. Without a setting: one spectrum ("cell") holding every molecule
 * of the practical, with the fundamental, and the overtone when a quantity needs it.
 */
export function samplesOf(
  practical: { species: string[]; spectrumSamples?: SpectrumSampleSetting[] | null },
  overtone: boolean,
): SpectrumSample[] {
  const set = Array.isArray(practical.spectrumSamples)
    ? practical.spectrumSamples.filter((s) => s && KEY_RE.test(s.key) && s.molecules?.length)
    : [];
  if (set.length) return set;
  const molecules = [...new Set(practical.species.map(moleculeOf))];
  return [{ key: 'cell', label: 'Spectrum', molecules, bands: overtone ? ['fundamental', 'overtone'] : ['fundamental'] }];
}

// ------------------------------------------------------------------------------------------
// The stored analysis

export interface StoredBand {
  isotopologue: string;
  display: string;
  band: BandKind;
  label: string;
  status: SpectrumAnalysis['bands'][number]['status'];
  predictedOrigin: number;
  predictedRange: [number, number];
  /** Assigned lines: branch, J, wavenumber (cm⁻¹), peak absorbance. */
  lines: { branch: 'P' | 'R'; J: number; wavenumber: number; intensity: number }[];
  fit: {
    model: 'quadratic' | 'cubic';
    nu0: Estimate;
    B0: Estimate;
    Bupper: Estimate;
    Be: Estimate;
    alphaE: Estimate;
    D?: Estimate;
    re?: Estimate;
    r0?: Estimate;
    rms: number;
    lineCount: number;
    /** The other fit model's constants (with or without D). */
    alternative?: { model: 'quadratic' | 'cubic'; nu0: Estimate; B0: Estimate; Bupper: Estimate; Be: Estimate; alphaE: Estimate };
  } | null;
  warnings: string[];
}

/**
 * Raised whenever the analysis changes what it finds, so analyses kept with uploads are made again
 * the next time they are needed.
 */
export const ANALYSIS_VERSION = 2;

export type StoredAnalysis =
  | {
      version: typeof ANALYSIS_VERSION;
      ok: true;
      uploadId: number;
      sample: string;
      molecules: string[];
      bands: BandKind[];
      range: { from: number; to: number };
      lineShape: { fwhm: number; resolution?: number };
      results: StoredBand[];
      /** Every line the analysis found or assigned, cm⁻¹ (what a student's line is matched against). */
      found: number[];
      unassigned: { wavenumber: number; intensity: number }[];
      calibration: { detected: boolean; message: string; offset: Estimate; scale: Estimate | null } | null;
      vibration: {
        isotopologue: string;
        omegaE: Estimate;
        omegaExe: Estimate;
        forceConstantE?: Estimate;
        zeroPointEnergy: Estimate;
        morseDe: Estimate;
        morseD0: Estimate;
      }[];
      problems: string[];
    }
  | {
      version: typeof ANALYSIS_VERSION;
      ok: false;
      uploadId: number;
      sample: string;
      molecules: string[];
      bands: BandKind[];
      message: string;
    };

const round = (v: number, digits = 6) => Math.round(v * 10 ** digits) / 10 ** digits;

export function storeAnalysis(a: SpectrumAnalysis, uploadId: number, sample: SpectrumSample): StoredAnalysis {
  const found = new Set<number>();
  for (const b of a.bands) {
    for (const l of b.lines) found.add(round(l.wavenumber, 4));
    for (const e of b.excluded) found.add(round(e.wavenumber, 4));
  }
  for (const u of a.unassigned) found.add(round(u.wavenumber, 4));
  return {
    version: ANALYSIS_VERSION,
    ok: true,
    uploadId,
    sample: sample.key,
    molecules: sample.molecules,
    bands: sample.bands,
    range: { from: a.range.from, to: a.range.to },
    lineShape: {
      fwhm: round(a.lineShape.fwhm, 4),
      resolution: a.lineShape.resolution === undefined ? undefined : round(a.lineShape.resolution, 3),
    },
    results: a.bands.map((b) => ({
      isotopologue: b.isotopologue,
      display: b.display,
      band: b.band,
      label: b.label,
      status: b.status,
      predictedOrigin: round(b.predictedOrigin, 3),
      predictedRange: [round(b.predictedRange[0], 2), round(b.predictedRange[1], 2)],
      lines: b.lines.map((l) => ({ branch: l.branch, J: l.J, wavenumber: round(l.wavenumber, 5), intensity: round(l.intensity, 5) })),
      fit: b.fit
        ? {
            model: b.fit.model,
            nu0: b.fit.nu0,
            B0: b.fit.B0,
            Bupper: b.fit.Bupper,
            Be: b.fit.Be,
            alphaE: b.fit.alphaE,
            D: b.fit.D,
            re: b.fit.re,
            r0: b.fit.r0,
            rms: b.fit.rms,
            lineCount: b.fit.lineCount,
            alternative: b.fit.alternative
              ? {
                  model: b.fit.alternative.model,
                  nu0: b.fit.alternative.nu0,
                  B0: b.fit.alternative.B0,
                  Bupper: b.fit.alternative.Bupper,
                  Be: b.fit.alternative.Be,
                  alphaE: b.fit.alternative.alphaE,
                }
              : undefined,
          }
        : null,
      warnings: b.warnings,
    })),
    found: [...found].sort((x, y) => x - y),
    unassigned: a.unassigned.slice(0, 40).map((u) => ({ wavenumber: round(u.wavenumber, 4), intensity: round(u.intensity, 5) })),
    calibration: a.calibration
      ? { detected: a.calibration.detected, message: a.calibration.message, offset: a.calibration.offset, scale: a.calibration.scale }
      : null,
    vibration: a.vibration.isotopologues.map((v) => ({
      isotopologue: v.isotopologue,
      omegaE: v.asRecorded.omegaE,
      omegaExe: v.asRecorded.omegaExe,
      forceConstantE: v.asRecorded.forceConstantE,
      zeroPointEnergy: v.asRecorded.zeroPointEnergy,
      morseDe: v.asRecorded.morseDe,
      morseD0: v.asRecorded.morseD0,
    })),
    problems: a.problems,
  };
}

/** Analyses a parsed spectrum for one sample of a practical. */
export function analyseForSample(spectrum: Spectrum, uploadId: number, sample: SpectrumSample): StoredAnalysis {
  try {
    return storeAnalysis(analyseSpectrum(spectrum, { species: sample.molecules, bands: sample.bands }), uploadId, sample);
  } catch (e) {
    // analyseSpectrum does not throw for any spectrum parse accepts; if it ever does, say so rather than fail the upload.
    log().error({ err: e, uploadId, sample: sample.key }, 'spectrum analysis failed');
    return {
      version: ANALYSIS_VERSION,
      ok: false,
      uploadId,
      sample: sample.key,
      molecules: sample.molecules,
      bands: sample.bands,
      message: 'Oscillab could not analyse this spectrum.',
    };
  }
}

/** A stored analysis is current when it was made for this sample's molecules and bands. */
export function isCurrent(stored: unknown, uploadId: number, sample: SpectrumSample): stored is StoredAnalysis {
  if (!stored || typeof stored !== 'object') return false;
  const s = stored as Partial<StoredAnalysis>;
  return (
    s.version === ANALYSIS_VERSION &&
    s.uploadId === uploadId &&
    s.sample === sample.key &&
    JSON.stringify(s.molecules) === JSON.stringify(sample.molecules) &&
    JSON.stringify(s.bands) === JSON.stringify(sample.bands)
  );
}

// ------------------------------------------------------------------------------------------
// The student's lines against the analysis, per isotopologue and band

export interface BandMatch {
  species: string;
  display: string;
  band: BandKind | null;
  label: string;
  reported: number;
  matched: number;
  /** The band lies outside every uploaded spectrum of the practical. */
  outsideRange: boolean;
  /** No spectrum of the practical holds this isotopologue's molecule. */
  noSpectrum: boolean;
  message: string;
}

type ReportedLine = { species: string; branch: 'P' | 'R' | null; J: number | null; wavenumber: number };

function nearestDistance(sorted: number[], w: number): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (sorted[mid] < w) lo = mid + 1;
    else hi = mid;
  }
  let d = Infinity;
  if (lo < sorted.length) d = sorted[lo] - w;
  if (lo > 0) d = Math.min(d, w - sorted[lo - 1]);
  return d;
}

const fmt0 = (v: number) => Math.round(v).toString();

/**
 * Counts a student's lines per isotopologue and band: each line is put with the band of its
 * isotopologue whose predicted range it lies in (or nearest), and matched to a line the
 * analysis found within max(0.3 cm⁻¹, 0.6 FWHM). A band no uploaded spectrum covers is said so.
 */
export function matchByBand(lines: ReportedLine[], analyses: StoredAnalysis[]): BandMatch[] {
  const ok = analyses.filter((a): a is Extract<StoredAnalysis, { ok: true }> => a.ok);
  const out: BandMatch[] = [];
  const species = [...new Set(lines.map((l) => l.species))];
  for (const sp of species) {
    const mine = lines.filter((l) => l.species === sp);
    const holders = ok.filter((a) => a.results.some((r) => r.isotopologue === sp));
    const display = speciesDisplay(sp);
    if (holders.length === 0) {
      out.push({
        species: sp,
        display,
        band: null,
        label: display,
        reported: mine.length,
        matched: 0,
        outsideRange: false,
        noSpectrum: true,
        message: `${display}: no uploaded spectrum is for this molecule, so your ${mine.length} line${mine.length === 1 ? '' : 's'} could not be checked.`,
      });
      continue;
    }
    const candidates = holders.flatMap((a) => a.results.filter((r) => r.isotopologue === sp).map((r) => ({ a, r })));
    const groups = new Map<string, { a: (typeof candidates)[number]['a'][]; r: StoredBand; lines: ReportedLine[] }>();
    for (const l of mine) {
      // The band whose range holds the line, else the nearest by origin.
      const inside = candidates.filter(({ r }) => l.wavenumber >= r.predictedRange[0] - 30 && l.wavenumber <= r.predictedRange[1] + 30);
      const pick = (inside.length ? inside : candidates).reduce((b, c) =>
        Math.abs(c.r.predictedOrigin - l.wavenumber) < Math.abs(b.r.predictedOrigin - l.wavenumber) ? c : b,
      );
      const key = pick.r.band;
      const g = groups.get(key) ?? { a: [], r: pick.r, lines: [] };
      g.lines.push(l);
      if (!g.a.includes(pick.a)) g.a.push(pick.a);
      groups.set(key, g);
    }
    for (const [, g] of groups) {
      const label = `${display} ${BAND_LABEL[g.r.band]}`;
      const covering = holders.filter((a) => a.range.from <= g.r.predictedRange[1] && a.range.to >= g.r.predictedRange[0]);
      if (covering.length === 0) {
        const ranges = holders.map((a) => `${fmt0(a.range.from)}–${fmt0(a.range.to)} cm⁻¹`).join(' and ');
        out.push({
          species: sp,
          display,
          band: g.r.band,
          label,
          reported: g.lines.length,
          matched: 0,
          outsideRange: true,
          noSpectrum: false,
          message: `${label}: your ${g.lines.length} line${g.lines.length === 1 ? ' lies' : 's lie'} near ${fmt0(g.r.predictedOrigin)} cm⁻¹, outside the spectrum you uploaded (${ranges}); upload the spectrum that holds this band.`,
        });
        continue;
      }
      const found = covering.flatMap((a) => a.found).sort((x, y) => x - y);
      const tol = Math.max(0.3, 0.6 * Math.max(...covering.map((a) => a.lineShape.fwhm)));
      const matched = g.lines.filter((l) => nearestDistance(found, l.wavenumber) <= tol).length;
      out.push({
        species: sp,
        display,
        band: g.r.band,
        label,
        reported: g.lines.length,
        matched,
        outsideRange: false,
        noSpectrum: false,
        message: `${label}: ${matched} of ${g.lines.length} of your lines match a peak of your spectrum (within ±${tol.toFixed(2)} cm⁻¹).`,
      });
    }
  }
  return out;
}

/** What each uploaded spectrum shows, band by band, in one sentence each (for the form). */
export function bandsFound(analyses: StoredAnalysis[]): string[] {
  const out: string[] = [];
  for (const a of analyses) {
    if (!a.ok) {
      out.push(a.message);
      continue;
    }
    for (const r of a.results) {
      if (r.status === 'fitted') out.push(`${r.label}: ${r.lines.length} lines found and assigned.`);
      else if (r.status === 'outside-range')
        out.push(`${r.label}: outside the uploaded range (${fmt0(a.range.from)}–${fmt0(a.range.to)} cm⁻¹).`);
      else if (r.status === 'unresolved') out.push(`${r.label}: not separated from its isotope partner at this resolution.`);
      else out.push(`${r.label}: ${r.lines.length ? `only ${r.lines.length} line${r.lines.length === 1 ? '' : 's'} found` : 'not found'}.`);
    }
  }
  return out;
}

/** The fundamental's assigned lines per isotopologue of the practical (the line list of the form is the fundamental's). */
/** GET /api/submissions/[id]/spectrum-lines's answer: per isotopologue the lines found, as line-list text too. */
export type SpectrumLinesAnswer = {
  species: Record<string, { display: string; count: number; text: string; lines: { branch: 'P' | 'R'; J: number; wavenumber: number }[] }>;
  bands: string[];
  problems: string[];
};

export function linesForSpecies(
  analyses: StoredAnalysis[],
  species: string[],
): Record<string, { branch: 'P' | 'R'; J: number; wavenumber: number }[]> {
  const out: Record<string, { branch: 'P' | 'R'; J: number; wavenumber: number }[]> = {};
  for (const sp of species) {
    const band = analyses
      .flatMap((a) => (a.ok ? a.results : []))
      .find((r) => r.isotopologue === sp && r.band === 'fundamental' && r.lines.length > 0);
    out[sp] = band
      ? band.lines
          .map((l) => ({ branch: l.branch, J: l.J, wavenumber: Number(l.wavenumber.toFixed(3)) }))
          .sort((a, b) => a.wavenumber - b.wavenumber)
      : [];
  }
  return out;
}

// ------------------------------------------------------------------------------------------
// The third comparison: the student's numbers against their own spectrum, read by Oscillab

export interface FromSpectrumRow {
  /** A quantity key, or "overtone" for the first overtone's band origin. */
  key: QuantityKey | 'overtone';
  species: string;
  /** The student's value and the analysis' value, SI, and the analysis' standard error. */
  reportedSI: number;
  spectrumSI: number;
  spectrumErrorSI: number;
  deviation: number;
  relativeDeviation: number;
  verdict: Verdict;
  /** The tolerance used, in words. */
  basis: string;
}

export const FROM_SPECTRUM_LEGEND =
  'From your spectrum: Oscillab read the spectrum you uploaded itself — found the lines, assigned them and fitted each band — and compares each of your numbers with the same number from that reading. It catches misread or misnumbered lines that your own line list would hide. These verdicts are advice; they do not change your marks.';

type AnalysisValue = { value: number; stdError: number; unit: string };

/**
 * The analysis' value of a quantity for an isotopologue, in its display unit (cm⁻¹, Å, N m⁻¹):
 * one per fit model when the band was fitted both with and without D (a student may defensibly
 * have used either), else one.
 */
function analysisValues(key: QuantityKey, species: string, analyses: StoredAnalysis[]): AnalysisValue[] {
  const results = analyses.flatMap((a) => (a.ok ? a.results : []));
  const fit = results.find((r) => r.isotopologue === species && r.band === 'fundamental' && r.fit)?.fit;
  const vib = analyses.flatMap((a) => (a.ok ? a.vibration : [])).find((v) => v.isotopologue === species);
  const cm = (e: Estimate | undefined): AnalysisValue[] => (e ? [{ value: e.value, stdError: e.stdError, unit: 'cm-1' }] : []);
  const models = fit ? [fit, ...(fit.alternative ? [{ ...fit.alternative, re: undefined, r0: undefined, D: undefined }] : [])] : [];
  const both = (pick: (m: (typeof models)[number]) => Estimate | undefined, unit = 'cm-1'): AnalysisValue[] =>
    models
      .map(pick)
      .filter((e): e is Estimate => e !== undefined)
      .map((e) => ({ value: e.value, stdError: e.stdError, unit }));
  const p = parseSpecies(species);
  switch (key) {
    case 'bandCentre':
      return both((m) => m.nu0);
    case 'B0':
      return both((m) => m.B0);
    case 'B1':
      return both((m) => m.Bupper);
    case 'Be':
      return both((m) => m.Be);
    case 'alphaE':
      return both((m) => m.alphaE);
    case 'D':
      return cm(fit?.D);
    case 're':
    case 'r0': {
      // r ∝ B^−½ (the same reduced mass): from the chosen model's r and each model's B.
      const r = key === 're' ? fit?.re : fit?.r0;
      if (!r || !fit) return [];
      const Bof = (m: (typeof models)[number]) => (key === 're' ? m.Be : m.B0);
      const B = Bof(fit);
      return models.map((m) => {
        const value = r.value * Math.sqrt(B.value / Bof(m).value);
        return { value, stdError: (value * Bof(m).stdError) / (2 * Bof(m).value), unit: 'Å' };
      });
    }
    case 'forceConstant':
      if (!p.ok) return [];
      return both((m) => m.nu0).map((nu) => {
        const k = forceConstantFromBand(nu.value * 100, p.species.reducedMassKg);
        return { value: k, stdError: (2 * k * nu.stdError) / nu.value, unit: 'N m-1' };
      });
    case 'omegaE':
      return cm(vib?.omegaE);
    case 'omegaExe':
      return cm(vib?.omegaExe);
    case 'forceConstantE':
      return vib?.forceConstantE ? [{ ...vib.forceConstantE, unit: 'N m-1' }] : [];
    case 'zeroPointEnergy':
      return cm(vib?.zeroPointEnergy);
    case 'dissociationEnergy':
      return cm(vib?.morseDe);
    case 'dissociationEnergy0':
      return cm(vib?.morseD0);
    default:
      return [];
  }
}

/** The overtone band origin is reported under the key "overtone", not a quantity key. */
function overtoneValues(species: string, analyses: StoredAnalysis[]): AnalysisValue[] {
  const fit = analyses
    .flatMap((a) => (a.ok ? a.results : []))
    .find((r) => r.isotopologue === species && r.band === 'overtone' && r.fit)?.fit;
  if (!fit) return [];
  return [fit.nu0, ...(fit.alternative ? [fit.alternative.nu0] : [])].map((e) => ({ value: e.value, stdError: e.stdError, unit: 'cm-1' }));
}

/**
 * Without an accuracy band from the instructor: within three combined standard uncertainties or
 * (positions) 0.5 cm⁻¹ / (other numbers) 0.25 %, partly within six or 2 cm⁻¹ / 1 %. Reading a
 * peak table by eye moves numbers by less than that; a line numbered one J off moves ν̃₀ by a whole
 * line spacing and B by several per cent.
 */
function defaultTolerance(key: QuantityKey | 'overtone'): Tolerance {
  const position = key === 'bandCentre' || key === 'overtone' || key === 'omegaE';
  return position
    ? { sigma: 3, absolute: 0.5, unit: 'cm-1', partial: { sigma: 6, absolute: 2 } }
    : { sigma: 3, relative: 0.0025, partial: { sigma: 6, relative: 0.01 } };
}

export interface ReportedForComparison {
  key: string;
  species: string;
  valueText: string;
  unit: string;
  uncertaintyText: string | null;
  /** The instructor's accuracy band for this quantity and cohort, when there is one. */
  accuracy?: Tolerance;
}

/**
 * Each reported number against the analysis of the student's own spectrum. The tolerance is the
 * instructor's accuracy band for the quantity (what counts as close on their instrument); without
 * one, `defaultTolerance`. Standard uncertainties combine the analysis' standard error and the
 * student's stated uncertainty; the rounding of the digits typed is allowed on top. A band fitted
 * both with and without D gives two values; the number is judged against the nearer (a student may
 * defensibly have used either model).
 */
export function compareWithAnalysis(reported: ReportedForComparison[], analyses: StoredAnalysis[]): FromSpectrumRow[] {
  const out: FromSpectrumRow[] = [];
  const RANK: Record<Verdict, number> = { within: 0, partial: 1, outside: 2, 'not-checked': 3 };
  for (const r of reported) {
    const isOvertone = r.key === 'overtone';
    if (!isOvertone && !isQuantityKey(r.key)) continue;
    const key = (isOvertone ? 'bandCentre' : r.key) as QuantityKey;
    const candidates = isOvertone ? overtoneValues(r.species, analyses) : analysisValues(key, r.species, analyses);
    if (candidates.length === 0) continue;
    const dim = QUANTITIES[key].dimension;
    const typed = parseTypedNumber(r.valueText);
    if (!typed.ok) continue;
    const unit = r.unit || candidates[0].unit;
    const rep = toSI(typed.value, unit, dim);
    if (!rep.ok) continue;
    const zero = toSI(0, unit, dim);
    const amount = (v: number) => {
      const x = toSI(v, unit, dim);
      return x.ok && zero.ok ? Math.abs(x.valueSI - zero.valueSI) : 0;
    };
    const stated = r.uncertaintyText ? Number(r.uncertaintyText.replace(/^±\s*/, '').replace(',', '.')) : NaN;
    const statedSI = Number.isFinite(stated) && stated > 0 ? amount(stated) : typed.uncertainty ? amount(typed.uncertainty) : 0;
    const roundingSI = typed.precisionKnown ? amount(typed.roundingHalfWidth) : 0;
    const tolerance = r.accuracy ?? defaultTolerance(isOvertone ? 'overtone' : key);
    let best: FromSpectrumRow | undefined;
    for (const a of candidates) {
      const spec = toSI(a.value, a.unit, dim);
      const specErr = toSI(a.stdError, a.unit, dim);
      if (!spec.ok || !specErr.ok) continue;
      const combined = Math.hypot(Math.abs(specErr.valueSI), statedSI);
      const j = judge(rep.valueSI, spec.valueSI, tolerance, {
        uncertaintySI: combined > 0 ? combined : undefined,
        dimension: dim,
        roundingSI,
      });
      const row: FromSpectrumRow = {
        key: isOvertone ? 'overtone' : key,
        species: r.species,
        reportedSI: rep.valueSI,
        spectrumSI: spec.valueSI,
        spectrumErrorSI: Math.abs(specErr.valueSI),
        deviation: j.deviation,
        relativeDeviation: j.relativeDeviation,
        verdict: j.verdict,
        basis: r.accuracy ? "the practical's accuracy band" : position(key, isOvertone),
      };
      if (
        !best ||
        RANK[row.verdict] < RANK[best.verdict] ||
        (RANK[row.verdict] === RANK[best.verdict] && Math.abs(row.deviation) < Math.abs(best.deviation))
      )
        best = row;
    }
    if (best) out.push(best);
  }
  return out;
}

function position(key: QuantityKey, overtone: boolean): string {
  return overtone || key === 'bandCentre' || key === 'omegaE'
    ? 'three combined standard uncertainties or 0.5 cm⁻¹ (partly: six, or 2 cm⁻¹)'
    : 'three combined standard uncertainties or 0.25 % (partly: six, or 1 %)';
}
