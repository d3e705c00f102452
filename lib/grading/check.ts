/**
 * checkSubmission: recompute every reported quantity from the student's own data
 * (consistency) and compare it with the accepted value (accuracy), judge each against its
 * tolerance band, name the slip when a number is outside, and note presentation issues.
 * Synchronous, pure, JSON in and out; bad input comes back in `problems`, never thrown.
 *
 * The steps, in the order checkSubmission takes them:
 *   1. read what the student typed (readTyped): value, unit, stated uncertainty, and how far
 *      the rounding of the typed digits can move the number;
 *   2. fit their line list with and without the centrifugal term and let the data choose
 *      (analyseLines, with fitBandModels), undoing P lines numbered one too high;
 *   3. for each reported quantity, every value that follows from their own data by a defensible
 *      method (recompute, in own-data.ts) and the accepted value like for like (acceptedValue);
 *   4. judge (judgeQuantity): consistency with the band its kind calls for, accuracy with the
 *      instructor's band; name the slips that reproduce a number outside its band; advise.
 */
import { anharmonicFromOvertone, type AnharmonicAnalysis } from './anharmonic';
import { adviceNotes, methodNote, presentationNotes, type Note } from './advice';
import {
  fitBandConstants,
  fitBandModels,
  MAX_LINES,
  type BandFit,
  type BandModels,
  type FitFailure,
  type Line,
  type ModelChoice,
} from './fit';
import { formatNumber, withUnit } from './format';
import { forceConstantFromBand } from './harmonic';
import { recompute, type ConsistencyKind, type OwnData, type RecomputeMethod, type Recomputed, type TypedInput } from './own-data';
import { QUANTITIES, QUANTITY_KEYS, isQuantityKey, type QuantityKey } from './quantities';
import { referenceValues, defaultPartner, harmonicIsotopeReference, morseEstimates, type ReferenceValue } from './referenceValues';
import { bandConstants } from './simulate';
import { diagnose, type FittedConstants, type SlipInputs } from './slips';
import { parseSpecies, type Species, type SpeciesInput } from './species';
import { FITTED_CONSISTENCY_SIGMA, FLOATING_POINT_ALLOWANCE, judge, type Judgement, type Tolerance, type Verdict } from './tolerance';
import { parseTypedNumber, roundingHalfWidth, type TypedNumber } from './uncertainty';
import { fromSI, lookupUnit, toSI, uncertaintyToSI, type Dimension } from './units';

/** A number as the student typed it. A string value keeps the digits for the significant-figure check. */
export interface Num {
  value: number | string;
  unit: string;
  uncertainty?: number;
}

export interface SubmissionInput {
  species: SpeciesInput;
  measured?: {
    bandCentre?: Num;
    overtone?: Num;
    /** Assigned lines, wavenumbers in cm⁻¹. */
    lines?: { branch: 'P' | 'R'; J: number; wavenumber: number }[];
    /** The other isotopologue measured in the same cell (for isotopeShift / isotopeRatio). */
    partner?: { species: string; bandCentre?: Num };
  };
  reported: Partial<Record<QuantityKey, Num>>;
  /** The instructor's accepted values; by default the literature values. */
  reference?: Partial<Record<QuantityKey, Num>>;
  /** Accuracy bands, per quantity. */
  tolerances: Partial<Record<QuantityKey, Tolerance>>;
  /** Consistency bands that replace the defaults by kind (to the digits typed; three standard errors of a fit). */
  consistencyTolerances?: Partial<Record<QuantityKey, Tolerance>>;
  /** Which quantities must carry an uncertainty: all measured quantities by default (true), none (false), or per key. */
  requireUncertainty?: boolean | Partial<Record<QuantityKey, boolean>>;
  /**
   * The centrifugal term −4Dm³: true fits it, false never does; by default the data decide
   * (an F-test), and a reported D asks for it.
   */
  centrifugal?: boolean;
}

export interface QuantityCheck {
  key: QuantityKey;
  basis: 'consistency' | 'accuracy';
  reportedSI: number;
  expectedSI: number;
  unitSI: string;
  deviation: number;
  relativeDeviation: number;
  verdict: Verdict;
  diagnoses: { code: string; message: string }[];
  notes: Note[];
  /** What the student typed, number and unit. */
  reportedText: string;
  /** Shown in the quantity's display unit. */
  reportedDisplay: string;
  expectedDisplay: string;
  displayUnit: string;
  /** Where the expected value comes from. */
  expectedSource: string;
  /** Combined standard uncertainty used for sigma bands, SI (0 when unknown). */
  combinedUncertaintySI: number;
  /** Half-width of the full-marks band actually applied, SI (0 when none). */
  halfWidthSI: number;
  /** Consistency only: how the value was recomputed, and by which method when several are defensible. */
  kind?: ConsistencyKind;
  method?: RecomputeMethod;
}

/** Something about the submission as a whole that the student and the marker should read. */
export interface Notice {
  code: string;
  message: string;
}

/** Which fit model the check used and why; the other model's constants for comparison (cm⁻¹). */
export interface FitChoiceSummary extends ModelChoice {
  rms: number;
  alternative?: { model: 'quadratic' | 'cubic'; rms: number; nu0: number; B0: number; B1: number; Be: number; alphaE: number; D?: number };
  /** Set when the P lines were found numbered one too high and were renumbered for the check. */
  renumbered?: { pBranchShift: number; rmsAsNumbered: number };
}

export interface SubmissionResult {
  quantities: QuantityCheck[];
  derived: {
    species?: Species;
    reducedMassKg: number;
    reducedMassU: number;
    /** Band centre used for the harmonic analysis, cm⁻¹. */
    bandCentre?: number;
    /** k from that band centre, N m⁻¹. */
    forceConstant?: number;
    /** The fit of the model the data support (the one judged against first). */
    fit?: BandFit;
    fitChoice?: FitChoiceSummary;
    anharmonic?: AnharmonicAnalysis;
  };
  /** For the student and the marker: fit warnings, the model the lines need, renumbered lines. */
  notices: Notice[];
  problems: { field: string; message: string }[];
}

/** A typed number read for one quantity. */
interface ParsedNum {
  typed: TypedNumber;
  valueSI: number;
  unitSI: string;
  /** Stated standard uncertainty, SI. */
  sigmaSI?: number;
  /** Half a unit in the last typed digit, SI (trailing zeros read with the stated uncertainty). */
  roundingSI: number;
  unitOk: boolean;
  unitText: string;
  text: string;
}

export type ParseQuantityResult =
  { ok: true; valueSI: number; unitSI: string; uncertaintySI?: number; typed: TypedNumber; unit: string } | { ok: false; message: string };

type Problems = { field: string; message: string }[];

/** Reads a typed quantity into SI for a dimension. */
export function parseQuantity(num: unknown, dimension: Dimension): ParseQuantityResult {
  if (num === null || typeof num !== 'object') return { ok: false, message: 'Expected { value, unit }.' };
  const n = num as { value?: unknown; unit?: unknown; uncertainty?: unknown };
  const typed = parseTypedNumber(n.value);
  if (!typed.ok) return { ok: false, message: typed.message };
  const unit = typeof n.unit === 'string' ? n.unit : '';
  const si = toSI(typed.value, unit, dimension);
  if (!si.ok) return { ok: false, message: si.message };
  let sigma: number | undefined;
  const stated = statedUncertainty(n.uncertainty, typed);
  if (stated !== undefined) sigma = uncertaintyToSI(stated, typed.value, si.unit);
  return { ok: true, valueSI: si.valueSI, unitSI: si.unitSI, uncertaintySI: sigma, typed, unit };
}

function statedUncertainty(raw: unknown, typed: TypedNumber): number | undefined {
  return typeof raw === 'number' && Number.isFinite(raw) && raw >= 0 ? raw : typed.uncertainty;
}

function displayValue(valueSI: number, key: QuantityKey, sig = 6): string {
  const info = QUANTITIES[key];
  const r = fromSI(valueSI, info.displayUnit, info.dimension);
  return r.ok ? withUnit(formatNumber(r.value, sig), r.unit) : withUnit(formatNumber(valueSI, sig), info.siUnit);
}

/** Quantities that come from the measurement and should carry an uncertainty by default. */
const MEASURED_KEYS: ReadonlySet<QuantityKey> = new Set(QUANTITY_KEYS.filter((k) => k !== 'reducedMass' && k !== 'isotopeRatio'));

export function checkSubmission(input: SubmissionInput): SubmissionResult {
  try {
    return checkSubmissionUnsafe(input);
  } catch (err) {
    // A bug must not take down a marking batch; report it as a problem with this submission.
    return {
      quantities: [],
      derived: { reducedMassKg: 0, reducedMassU: 0 },
      notices: [],
      problems: [
        {
          field: '',
          message: `The submission could not be checked (internal error: ${err instanceof Error ? err.message : String(err)}).`,
        },
      ],
    };
  }
}

const asObject = <T>(x: unknown): T => (x && typeof x === 'object' ? x : {}) as T;

function checkSubmissionUnsafe(input: SubmissionInput): SubmissionResult {
  const problems: Problems = [];
  const notices: Notice[] = [];
  if (input === null || typeof input !== 'object') {
    return {
      quantities: [],
      derived: { reducedMassKg: 0, reducedMassU: 0 },
      notices,
      problems: [{ field: '', message: 'The submission is empty.' }],
    };
  }
  const sp = parseSpecies(input.species);
  if (!sp.ok) problems.push({ field: 'species', message: sp.message });
  const species = sp.ok ? sp.species : undefined;
  const measured = asObject<NonNullable<SubmissionInput['measured']>>(input.measured);
  const reported = asObject<Record<string, unknown>>(input.reported);
  const tolerances = asObject<Partial<Record<QuantityKey, Tolerance>>>(input.tolerances);
  const consistencyTolerances = asObject<Partial<Record<QuantityKey, Tolerance>>>(input.consistencyTolerances);
  const referenceIn = asObject<Record<string, unknown>>(input.reference);

  for (const k of Object.keys(reported))
    if (!isQuantityKey(k)) problems.push({ field: `reported.${k}`, message: `"${k}" is not a quantity Oscillab knows.` });

  // 1. What the student typed.
  const mBand = readMeasured('measured.bandCentre', measured.bandCentre, problems);
  const mOvertone = readMeasured('measured.overtone', measured.overtone, problems);
  const rep: Partial<Record<QuantityKey, ParsedNum>> = {};
  for (const key of QUANTITY_KEYS) {
    const raw = reported[key];
    if (raw !== undefined) {
      const p = readTyped(`reported.${key}`, raw, key, problems);
      if (p) rep[key] = p;
    }
  }
  const usable = (p: ParsedNum | undefined): TypedInput | undefined =>
    p && p.unitOk ? { valueSI: p.valueSI, roundingSI: p.roundingSI, sigmaSI: p.sigmaSI } : undefined;

  // 2. The line list.
  const centrifugal = input.centrifugal ?? (reported.D !== undefined ? true : undefined);
  const lines = measured.lines !== undefined && species ? analyseLines(measured.lines, species, centrifugal, problems, notices) : undefined;
  if (measured.lines !== undefined && !species)
    problems.push({ field: 'measured.lines', message: 'The lines cannot be fitted without a known species.' });

  // Band centre for the harmonic analysis: measured, else as reported, else from the fit.
  const bandTyped = mBand ?? usable(rep.bandCentre);
  const nu0SI = bandTyped?.valueSI ?? (lines ? lines.models.fit.nu0.value * 100 : undefined);
  const nu0Sigma = bandTyped ? (bandTyped.sigmaSI ?? 0) : lines ? lines.models.fit.nu0.stdError * 100 : 0;
  let anharmonic: AnharmonicAnalysis | undefined;
  if (nu0SI !== undefined && mOvertone) {
    const a = anharmonicFromOvertone(nu0SI / 100, mOvertone.valueSI / 100, {
      reducedMassKg: species?.reducedMassKg,
      sigmaFundamental: nu0Sigma / 100,
      sigmaOvertone: (mOvertone.sigmaSI ?? 0) / 100,
    });
    if (a.ok) {
      const { ok: _ok, ...rest } = a;
      anharmonic = rest;
    } else problems.push({ field: 'measured.overtone', message: a.message });
  }

  const partnerIn = measured.partner && typeof measured.partner === 'object' ? measured.partner : undefined;
  const partnerSp = partnerIn ? parseSpecies(partnerIn.species) : undefined;
  if (partnerSp && !partnerSp.ok) problems.push({ field: 'measured.partner.species', message: partnerSp.message });
  const partner = partnerSp?.ok ? partnerSp.species : species ? defaultPartner(species) : undefined;
  const mPartnerBand = partnerIn ? readMeasured('measured.partner.bandCentre', partnerIn.bandCentre, problems) : undefined;

  // 3. The student's own data, the literature, and the slip models on each.
  const reportedInputs: Partial<Record<QuantityKey, TypedInput>> = {};
  for (const key of QUANTITY_KEYS) {
    const u = usable(rep[key]);
    if (u) reportedInputs[key] = u;
  }
  const repBand = usable(rep.bandCentre);
  const own: OwnData | undefined = species
    ? {
        species,
        partner,
        bandCentre: bandTyped,
        reportedBandCentre: mBand && repBand && repBand.valueSI !== mBand.valueSI ? repBand : undefined,
        overtone: mOvertone,
        partnerBandCentre: mPartnerBand,
        reported: reportedInputs,
        fit: lines?.models.fit,
        alternativeFit: lines?.models.alternative,
        anharmonic,
      }
    : undefined;
  const lit = species ? referenceValues(species, partner) : {};
  const slipStarts = species
    ? slipInputs(species, partner, lit, { nu0SI, anharmonic, reported: reportedInputs, lines, partnerBand: mPartnerBand })
    : undefined;

  // 4. Judge each reported quantity.
  const quantities: QuantityCheck[] = [];
  const matchedMethods: Partial<Record<QuantityKey, RecomputeMethod>> = {};
  for (const key of QUANTITY_KEYS) {
    const p = rep[key];
    if (!p) continue;
    const candidates = own ? recompute(key, own) : [];
    const entries = judgeQuantity({
      key,
      p,
      candidates,
      consistencyTolerance: consistencyTolerances[key],
      accuracyTolerance: tolerances[key],
      accepted: (method) => acceptedValue(key, referenceIn[key], lit, species, partner, method, problems),
      uncertaintyRequired:
        uncertaintyRequired(input.requireUncertainty, key) ||
        tolerances[key]?.sigma !== undefined ||
        tolerances[key]?.partial?.sigma !== undefined,
      studentInputs: slipStarts?.student,
      referenceInputs: slipStarts?.reference,
      species,
    });
    const method = entries.find((e) => e.basis === 'consistency' && e.verdict === 'within')?.method;
    if (method) matchedMethods[key] = method;
    quantities.push(...entries);
  }
  if (lines) notices.push(...modelNotices(lines, matchedMethods));

  return {
    quantities,
    derived: {
      species,
      reducedMassKg: species?.reducedMassKg ?? 0,
      reducedMassU: species?.reducedMassU ?? 0,
      bandCentre: nu0SI !== undefined ? nu0SI / 100 : undefined,
      forceConstant: nu0SI !== undefined && species ? forceConstantFromBand(nu0SI, species.reducedMassKg) : undefined,
      fit: lines?.models.fit,
      fitChoice: lines ? fitChoiceSummary(lines) : undefined,
      anharmonic,
    },
    notices,
    problems,
  };
}

/** Whether a quantity must carry an uncertainty: every measured one by default, none, or as listed. */
function uncertaintyRequired(r: SubmissionInput['requireUncertainty'], key: QuantityKey): boolean {
  if (r === undefined || r === true) return MEASURED_KEYS.has(key);
  if (r === false) return false;
  return r[key] === true;
}

/**
 * What the slip models start from: the student's own numbers (from their analysis, else as they
 * reported them) and the literature's.
 */
function slipInputs(
  species: Species,
  partner: Species | undefined,
  lit: Partial<Record<QuantityKey, ReferenceValue>>,
  own: {
    nu0SI: number | undefined;
    anharmonic: AnharmonicAnalysis | undefined;
    reported: Partial<Record<QuantityKey, TypedInput>>;
    lines: LineAnalysis | undefined;
    partnerBand: TypedInput | undefined;
  },
): { student: SlipInputs; reference: SlipInputs } {
  const { anharmonic, reported, lines } = own;
  const studentOmegaE = anharmonic ? anharmonic.omegaE * 100 : reported.omegaE?.valueSI;
  const studentOmegaExe = anharmonic ? anharmonic.omegaExe * 100 : reported.omegaExe?.valueSI;
  return {
    student: {
      species,
      nu0: own.nu0SI,
      omegaE: studentOmegaE ?? lit.omegaE?.valueSI,
      omegaExe: studentOmegaExe,
      B0: lines ? lines.models.fit.B0.value * 100 : reported.B0?.valueSI,
      B1: lines ? lines.models.fit.B1.value * 100 : reported.B1?.valueSI,
      Be: reported.Be?.valueSI ?? (lines ? lines.models.fit.Be.value * 100 : undefined),
      misnumberedFit: lines?.misnumberedFit,
      asLabelledFit: lines?.asLabelled,
      partnerMu: partner?.reducedMassKg,
      partnerNu0: own.partnerBand?.valueSI,
    },
    reference: {
      species,
      nu0: lit.bandCentre?.valueSI,
      omegaE: lit.omegaE?.valueSI,
      omegaExe: lit.omegaExe?.valueSI,
      B0: lit.B0?.valueSI,
      B1: lit.B1?.valueSI,
      partnerMu: partner?.reducedMassKg,
    },
  };
}

// ---------------------------------------------------------------------------------------
// 1. Reading what the student typed

/** SI per unit of the typed number (to turn the typed rounding into SI). */
function siPerTyped(typed: TypedNumber, valueSI: number, unitText: string, dim: Dimension): number {
  const def = lookupUnit(unitText, dim);
  if (!def) return 0;
  return def.kind === 'linear' ? Math.abs(def.factor) : Math.abs(valueSI / typed.value);
}

function readMeasured(field: string, num: unknown, problems: Problems): TypedInput | undefined {
  if (num === undefined) return undefined;
  const r = parseQuantity(num, 'wavenumber');
  if (!r.ok) {
    problems.push({ field, message: r.message });
    return undefined;
  }
  if (!(r.valueSI > 0)) {
    problems.push({ field, message: 'A measured wavenumber must be positive.' });
    return undefined;
  }
  const stated = r.uncertaintySI !== undefined ? r.uncertaintySI / siPerTyped(r.typed, r.valueSI, r.unit, 'wavenumber') : undefined;
  return {
    valueSI: r.valueSI,
    roundingSI: roundingHalfWidth(r.typed, stated) * siPerTyped(r.typed, r.valueSI, r.unit, 'wavenumber'),
    sigmaSI: r.uncertaintySI,
  };
}

function readTyped(field: string, raw: unknown, key: QuantityKey, problems: Problems): ParsedNum | undefined {
  const info = QUANTITIES[key];
  if (raw === null || typeof raw !== 'object') {
    problems.push({ field, message: 'Expected { value, unit }.' });
    return undefined;
  }
  const n = raw as { value?: unknown; unit?: unknown; uncertainty?: unknown };
  const typed = parseTypedNumber(n.value);
  if (!typed.ok) {
    problems.push({ field: `${field}.value`, message: typed.message });
    return undefined;
  }
  const unitText = typeof n.unit === 'string' ? n.unit : '';
  const text = withUnit(typed.text, unitText.trim());
  const stated = statedUncertainty(n.uncertainty, typed);
  if (n.uncertainty !== undefined && (typeof n.uncertainty !== 'number' || !Number.isFinite(n.uncertainty) || n.uncertainty < 0)) {
    problems.push({ field: `${field}.uncertainty`, message: 'The uncertainty must be a non-negative number.' });
  }
  const si = toSI(typed.value, unitText, info.dimension);
  const positive = key !== 'alphaE' && key !== 'isotopeShift' && key !== 'D';
  if (positive && typed.value <= 0)
    problems.push({
      field: `${field}.value`,
      message: `${info.label} must be positive${key === 'reducedMass' ? ' (a mass cannot be negative or zero)' : ''}.`,
    });
  if (si.ok) {
    const perTyped = siPerTyped(typed, si.valueSI, unitText, info.dimension);
    return {
      typed,
      valueSI: si.valueSI,
      unitSI: si.unitSI,
      sigmaSI: stated === undefined ? undefined : uncertaintyToSI(stated, typed.value, si.unit),
      roundingSI: roundingHalfWidth(typed, stated) * perTyped,
      unitOk: true,
      unitText,
      text,
    };
  }
  // A missing unit is the student's slip, marked as such; an unreadable one is also a problem to fix.
  if (unitText.trim() !== '') problems.push({ field: `${field}.unit`, message: si.message });
  const fallback = toSI(typed.value, info.displayUnit, info.dimension);
  const valueSI = fallback.ok ? fallback.valueSI : typed.value;
  return { typed, valueSI, unitSI: info.siUnit, sigmaSI: undefined, roundingSI: 0, unitOk: false, unitText, text };
}

// ---------------------------------------------------------------------------------------
// 2. The line list

interface LineAnalysis {
  models: BandModels;
  /** The fit with the R branch numbered m = J, for the slip model (SI), computed when asked. */
  misnumberedFit: () => FittedConstants | undefined;
  /** The constants of the lines as the student numbered them, when the check renumbered the P branch (SI). */
  asLabelled?: FittedConstants;
  renumbered?: FitChoiceSummary['renumbered'];
}

/** Lines further than this fraction of the band centre from it are not lines of this band. */
const BAND_WINDOW = 0.25;

function analyseLines(
  raw: unknown,
  species: Species,
  centrifugal: boolean | undefined,
  problems: Problems,
  notices: Notice[],
): LineAnalysis | undefined {
  if (Array.isArray(raw) && raw.length > MAX_LINES) {
    problems.push({
      field: 'measured.lines',
      message: `The line list has ${raw.length} lines; the limit is ${MAX_LINES}. Paste the assigned lines only.`,
    });
    return undefined;
  }
  const report = (f: FitFailure) => {
    for (const p of f.problems) problems.push({ field: p.field.startsWith('lines') ? `measured.${p.field}` : p.field, message: p.message });
  };
  const refit = (pBranchShift?: number) =>
    centrifugal === false
      ? quadraticOnly(raw, species, pBranchShift)
      : fitBandModels(raw, { species, centrifugal: centrifugal === true, pBranchShift });
  let models = refit();
  if (!models.ok) {
    report(models);
    return undefined;
  }
  if (!linesBelongToBand(models.fit, species, problems, notices)) return undefined;

  // P lines numbered one too high (the band gap misread): renumbered, the fit collapses to the noise.
  let asLabelled: FittedConstants | undefined;
  let renumbered: LineAnalysis['renumbered'];
  const minP = Math.min(...models.fit.residuals.filter((r) => r.branch === 'P').map((r) => r.J));
  if (models.fit.warnings.some((w) => w.code === 'large-residuals') && minP >= 2) {
    const shifted = refit(-1);
    if (shifted.ok && shifted.fit.rms < 0.1 * models.fit.rms && !shifted.fit.warnings.some((w) => w.code === 'large-residuals')) {
      asLabelled = constantsSI(models.fit);
      renumbered = { pBranchShift: -1, rmsAsNumbered: models.fit.rms };
      notices.push({
        code: 'p-branch-numbered-from-j-plus-1',
        message: `Your P lines seem to be numbered one J too high: as numbered, the fit leaves residuals of ${formatNumber(models.fit.rms, 2)} cm⁻¹ (rms); read as P(J − 1) they fit to ${formatNumber(shifted.fit.rms, 2)} cm⁻¹. The check below uses the renumbered lines; the first line below the band gap is P(1).`,
      });
      models = shifted;
    }
  }
  for (const w of models.fit.warnings) notices.push({ code: w.code, message: w.message });

  const lines = measuredLines(raw);
  let memo: FittedConstants | undefined | null = null;
  const misnumberedFit = () => {
    if (memo !== null) return memo;
    // Only the constants are compared, so refit without residuals and combination differences.
    const g = fitBandConstants(lines, {
      centrifugal: models.fit.model === 'cubic',
      rBranchIndex: 'J',
      pBranchShift: renumbered?.pBranchShift,
    });
    memo = g.ok
      ? {
          nu0: g.nu0.value * 100,
          B0: g.B0.value * 100,
          B1: g.B1.value * 100,
          Be: g.Be.value * 100,
          alphaE: g.alphaE.value * 100,
          D: g.D ? g.D.value * 100 : undefined,
        }
      : undefined;
    return memo;
  };
  return { models, misnumberedFit, asLabelled, renumbered };
}

function measuredLines(raw: unknown): Line[] {
  return raw as Line[];
}

/** The quadratic model only (the caller said the centrifugal term is not wanted). */
function quadraticOnly(raw: unknown, species: Species, pBranchShift?: number): BandModels | FitFailure {
  const f = fitBandModels(raw, { species, pBranchShift });
  if (!f.ok) return f;
  const quadratic = f.fit.model === 'quadratic' ? f.fit : f.alternative;
  return quadratic ? { ok: true, fit: quadratic, choice: { model: 'quadratic', reason: 'requested' } } : f;
}

function constantsSI(f: BandFit): FittedConstants {
  return {
    nu0: f.nu0.value * 100,
    B0: f.B0.value * 100,
    B1: f.B1.value * 100,
    Be: f.Be.value * 100,
    alphaE: f.alphaE.value * 100,
    D: f.D ? f.D.value * 100 : undefined,
  };
}

/**
 * Are these lines of this species' fundamental at all? Wavelengths pasted as wavenumbers (µm or
 * nm) or lines of another band are refused with the reason; a few stray lines are only noted.
 */
function linesBelongToBand(fit: BandFit, species: Species, problems: Problems, notices: Notice[]): boolean {
  const ref = bandConstants(species);
  if (!ref) return true;
  const centre = ref.nu0;
  const near = (x: number) => Math.abs(x - centre) <= BAND_WINDOW * centre;
  const positions = fit.residuals.map((r) => r.observed);
  const far = positions.filter((x) => !near(x));
  if (far.length * 2 <= positions.length) {
    if (far.length > 0) {
      notices.push({
        code: 'lines-far-from-band',
        message: `${far.length === 1 ? 'One line lies' : `${far.length} lines lie`} far from the ${species.display} band (around ${Math.round(centre)} cm⁻¹): ${far
          .slice(0, 5)
          .map((x) => `${formatNumber(x, 6)} cm⁻¹`)
          .join(', ')}. Check that ${far.length === 1 ? 'it belongs' : 'they belong'} to this band.`,
      });
    }
    return true;
  }
  const asMicrometres = positions.filter((x) => near(1e4 / x)).length * 2 > positions.length;
  const asNanometres = positions.filter((x) => near(1e7 / x)).length * 2 > positions.length;
  const message = asMicrometres
    ? `These look like wavelengths in µm, not wavenumbers: convert them to cm⁻¹ (ν̃/cm⁻¹ = 10⁴/(λ/µm)) or give the unit in the column header.`
    : asNanometres
      ? `These look like wavelengths in nm, not wavenumbers: convert them to cm⁻¹ (ν̃/cm⁻¹ = 10⁷/(λ/nm)) or give the unit in the column header.`
      : `Most line positions are far from the ${species.display} band (around ${Math.round(centre)} cm⁻¹); check that the lines are wavenumbers in cm⁻¹ of this band.`;
  problems.push({ field: 'measured.lines', message });
  return false;
}

function fitChoiceSummary(lines: LineAnalysis): FitChoiceSummary {
  const { fit, alternative, choice } = lines.models;
  return {
    ...choice,
    rms: fit.rms,
    alternative: alternative
      ? {
          model: alternative.model,
          rms: alternative.rms,
          nu0: alternative.nu0.value,
          B0: alternative.B0.value,
          B1: alternative.B1.value,
          Be: alternative.Be.value,
          alphaE: alternative.alphaE.value,
          D: alternative.D?.value,
        }
      : undefined,
    renumbered: lines.renumbered,
  };
}

const ROTATIONAL_KEYS: readonly QuantityKey[] = ['B0', 'B1', 'Be', 'alphaE', 're', 'r0'];

/** Which model the student's rotational constants follow, against which model the lines need. */
function modelNotices(lines: LineAnalysis, matched: Partial<Record<QuantityKey, RecomputeMethod>>): Notice[] {
  const { fit, alternative, choice } = lines.models;
  const used = ROTATIONAL_KEYS.map((k) => matched[k]).filter((m) => m === 'fit-with-centrifugal' || m === 'fit-without-centrifugal');
  if (used.length === 0 || !alternative) return [];
  const p = choice.fTest ? `F-test p ${choice.fTest.p < 1e-4 ? '< 0.0001' : `= ${formatNumber(choice.fTest.p, 2)}`}` : '';
  if (choice.reason === 'significant' && used.includes('fit-without-centrifugal') && !used.includes('fit-with-centrifugal')) {
    return [
      {
        code: 'centrifugal-term-needed',
        message: `Your rotational constants follow a fit without the centrifugal term −4Dm³, but your lines need it (${p}): without it the residuals form an arc (rms ${formatNumber(alternative.rms, 2)} cm⁻¹ against ${formatNumber(fit.rms, 2)} cm⁻¹ with it) and B₀ moves by ${formatNumber((100 * (alternative.B0.value - fit.B0.value)) / fit.B0.value, 2)} %.`,
      },
    ];
  }
  if (choice.reason === 'not-significant' && used.includes('fit-with-centrifugal') && !used.includes('fit-without-centrifugal')) {
    return [
      {
        code: 'centrifugal-term-not-determined',
        message: `Your rotational constants follow a fit with the centrifugal term; your lines do not determine D (${p}), so the simpler fit without it is as good here.`,
      },
    ];
  }
  return [];
}

// ---------------------------------------------------------------------------------------
// 3. The accepted value, like for like

interface Expected {
  valueSI: number;
  sigmaSI: number;
  source: string;
  /** Shown beside the verdict: another value worth comparing with (the model's estimate, the observed ratio). */
  aside?: Note;
}

function acceptedValue(
  key: QuantityKey,
  given: unknown,
  lit: Partial<Record<QuantityKey, ReferenceValue>>,
  species: Species | undefined,
  partner: Species | undefined,
  consistencyMethod: RecomputeMethod | undefined,
  problems: Problems,
): Expected | undefined {
  if (given !== undefined) {
    const r = parseQuantity(given, QUANTITIES[key].dimension);
    if (!r.ok) {
      problems.push({ field: `reference.${key}`, message: r.message });
      return undefined;
    }
    return { valueSI: r.valueSI, sigmaSI: r.uncertaintySI ?? 0, source: "the instructor's accepted value" };
  }
  const l = lit[key];
  if ((key === 'isotopeShift' || key === 'isotopeRatio') && species && partner && consistencyMethod === 'harmonic-prediction') {
    // A harmonic prediction is judged against the harmonic expectation; the observed value is shown beside it.
    const harmonic = harmonicIsotopeReference(species, partner)[key];
    if (harmonic) {
      return {
        valueSI: harmonic.valueSI,
        sigmaSI: 0,
        source: harmonic.source,
        aside: l
          ? {
              code: 'observed-value',
              message: `The observed value, from both measured band centres, is ${l.display} (${l.source}); it differs from the harmonic prediction by the anharmonicity.`,
            }
          : undefined,
      };
    }
  }
  if (!l) return undefined;
  if ((key === 'dissociationEnergy' || key === 'dissociationEnergy0') && species) {
    const morse = morseEstimates(species);
    const estimate = morse ? (key === 'dissociationEnergy' ? morse.De : morse.D0) : undefined;
    if (estimate && estimate.valueSI !== l.valueSI) {
      return {
        valueSI: l.valueSI,
        sigmaSI: 0,
        source: l.source,
        aside: {
          code: 'model-estimate',
          message: `The Morse model's estimate from the accepted ωₑ and ωₑxₑ is ${estimate.display}; the linear (Birge–Sponer) extrapolation behind it overestimates, because the real levels close up faster near dissociation. The accepted value is the measured one.`,
        },
      };
    }
  }
  return { valueSI: l.valueSI, sigmaSI: 0, source: l.source };
}

// ---------------------------------------------------------------------------------------
// 4. Judging one quantity

interface QuantityToJudge {
  key: QuantityKey;
  p: ParsedNum;
  /** Values from the student's own data, the preferred first. */
  candidates: Recomputed[];
  consistencyTolerance?: Tolerance;
  accuracyTolerance?: Tolerance;
  /** The accepted value, given which own-data method the number followed. */
  accepted: (method: RecomputeMethod | undefined) => Expected | undefined;
  uncertaintyRequired: boolean;
  studentInputs?: SlipInputs;
  referenceInputs?: SlipInputs;
  species?: Species;
}

const VERDICT_RANK: Record<Verdict, number> = { within: 0, partial: 1, outside: 2, 'not-checked': 3 };

/** The consistency band for one recomputed value: the instructor's, else the default of its kind. */
function consistencyJudgement(p: ParsedNum, cand: Recomputed, override: Tolerance | undefined, dimension: Dimension): Judgement {
  const floatingPoint = FLOATING_POINT_ALLOWANCE * Math.abs(cand.valueSI);
  const rounding = p.roundingSI + cand.inputRoundingSI + floatingPoint;
  if (override)
    return judge(p.valueSI, cand.valueSI, override, {
      uncertaintySI: Math.hypot(p.sigmaSI ?? 0, cand.sigmaSI),
      dimension,
      roundingSI: rounding,
    });
  if (cand.kind === 'fitted' && cand.sigmaSI > 0)
    return judge(
      p.valueSI,
      cand.valueSI,
      { sigma: FITTED_CONSISTENCY_SIGMA },
      { uncertaintySI: cand.sigmaSI, dimension, roundingSI: rounding },
    );
  // Arithmetic: to the digits typed, and never wider than an uncertainty the student stated.
  const stated = p.sigmaSI !== undefined && p.sigmaSI > 0 ? p.sigmaSI : Infinity;
  return judge(p.valueSI, cand.valueSI, { absolute: 0 }, { dimension, roundingSI: Math.max(floatingPoint, Math.min(rounding, stated)) });
}

function judgeQuantity(q: QuantityToJudge): QuantityCheck[] {
  const { key, p } = q;
  const info = QUANTITIES[key];
  const entries: QuantityCheck[] = [];

  // Consistency: the best verdict over the defensible methods; the preferred one when none passes.
  let best: { cand: Recomputed; j: Judgement } | undefined;
  for (const cand of q.candidates) {
    const j = consistencyJudgement(p, cand, q.consistencyTolerance, info.dimension);
    if (!best || VERDICT_RANK[j.verdict] < VERDICT_RANK[best.j.verdict]) best = { cand, j };
  }
  let consistency: QuantityCheck | undefined;
  if (best) {
    const { cand, j } = best;
    consistency = entry(q, 'consistency', { valueSI: cand.valueSI, sigmaSI: cand.sigmaSI, source: cand.source }, j, cand.sigmaSI);
    consistency.kind = cand.kind;
    consistency.method = cand.method;
    if (consistency.verdict === 'within') {
      const note = methodNote(key, cand, q.candidates[0]);
      if (note) consistency.notes.push(note);
    }
    if (consistency.verdict === 'outside' || consistency.verdict === 'partial') {
      // The slip's value moves with the inputs' rounding as the right value does: both relative.
      const window = relative(p.roundingSI, p.valueSI) + relative(cand.inputRoundingSI, cand.valueSI);
      consistency.diagnoses = slipsFor(q, cand.valueSI, j.halfWidth, window, q.studentInputs);
    }
    entries.push(consistency);
  }

  // Accuracy: against the accepted value, like for like with the method the number followed
  // (without a verdict to go by, an isotope value is a prediction unless the partner was measured).
  const isotope = key === 'isotopeShift' || key === 'isotopeRatio';
  const followed =
    consistency?.verdict === 'within'
      ? consistency.method
      : isotope && !q.candidates.some((c) => c.method === 'your-band-positions')
        ? 'harmonic-prediction'
        : undefined;
  const acc = q.accepted(followed);
  if (acc) {
    const sigma = Math.hypot(p.sigmaSI ?? 0, acc.sigmaSI);
    const j = judge(p.valueSI, acc.valueSI, q.accuracyTolerance, { uncertaintySI: sigma, dimension: info.dimension });
    const a = entry(q, 'accuracy', acc, j, sigma);
    if (acc.aside) a.notes.push(acc.aside);
    // Name slips on accuracy only when there is nothing of the student's own to recompute from.
    if (!consistency && (a.verdict === 'outside' || a.verdict === 'partial')) {
      const window = relative(p.roundingSI, p.valueSI);
      a.diagnoses = slipsFor(q, acc.valueSI, j.halfWidth, window, q.referenceInputs);
    }
    if (consistency) a.notes.push(...adviceNotes(key, consistency.verdict, a.verdict, followed));
    entries.push(a);
  }

  if (entries.length === 0) {
    const none = entry(q, 'accuracy', undefined, undefined, 0);
    none.notes.push({
      code: 'not-checked',
      message: q.species
        ? 'There is no data to recompute this quantity from and no accepted value for this species.'
        : 'The species is not known, so this quantity cannot be checked.',
    });
    entries.push(none);
  }
  // Notes about the number as written belong to the quantity, so they are given once.
  entries[0].notes.unshift(...presentationNotes(key, p.typed, p.valueSI, p.sigmaSI, p.unitOk, best?.cand, q.uncertaintyRequired));
  if (!p.unitOk) {
    entries[0].notes.push({
      code: 'unit-not-understood',
      message:
        p.unitText.trim() === ''
          ? `No unit given; the number was read in ${info.displayUnit || 'no unit'}.`
          : `The unit "${p.unitText}" does not fit this quantity; the number was read in ${info.displayUnit}.`,
    });
  }
  return entries;
}

function relative(width: number, value: number): number {
  return value !== 0 && Number.isFinite(width) ? Math.abs(width / value) : 0;
}

function slipsFor(
  q: QuantityToJudge,
  expectedSI: number,
  halfWidthSI: number,
  window: number,
  inputs: SlipInputs | undefined,
): { code: string; message: string }[] {
  return diagnose({
    key: q.key,
    reportedSI: q.p.valueSI,
    reportedValue: q.p.typed.value,
    reportedUnit: q.p.unitText,
    expectedSI,
    bandHalfWidthSI: halfWidthSI,
    window,
    inputs,
  });
}

/** One verdict entry; a missing unit makes it outside whatever the number. */
function entry(
  q: QuantityToJudge,
  basis: 'consistency' | 'accuracy',
  exp: Expected | undefined,
  j: Judgement | undefined,
  sigma: number,
): QuantityCheck {
  const { key, p } = q;
  const info = QUANTITIES[key];
  const notes: Note[] = [];
  let verdict: Verdict = j ? j.verdict : 'not-checked';
  if (j && j.verdict === 'not-checked' && j.reason) notes.push({ code: 'not-checked', message: j.reason });
  if (!p.unitOk && exp) verdict = 'outside';
  return {
    key,
    basis,
    reportedSI: p.valueSI,
    expectedSI: exp ? exp.valueSI : 0,
    unitSI: info.siUnit,
    deviation: j ? j.deviation : 0,
    relativeDeviation: j ? j.relativeDeviation : 0,
    verdict,
    diagnoses: [],
    notes,
    reportedText: p.text,
    reportedDisplay: p.unitOk
      ? displayValue(p.valueSI, key, p.typed.precisionKnown ? Math.max(3, p.typed.sigFigs) : 6)
      : withUnit(String(p.typed.text), p.unitText),
    expectedDisplay: exp ? displayValue(exp.valueSI, key, 6) : '—',
    displayUnit: info.displayUnit,
    expectedSource: exp ? exp.source : '',
    combinedUncertaintySI: sigma,
    halfWidthSI: j ? j.halfWidth : 0,
  };
}
