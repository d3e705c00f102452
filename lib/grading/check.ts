/**
 * checkSubmission: recompute every reported quantity from the student's own data
 * (consistency) and compare it with the accepted value (accuracy), judge each against its
 * tolerance band, name the slip when a number is outside, and note presentation issues.
 * Synchronous, pure, JSON in and out; bad input comes back in `problems`, never thrown.
 */
import { c, h } from './constants';
import { anharmonicFromOvertone, type AnharmonicAnalysis } from './anharmonic';
import { fitBand, fitBandConstants, MAX_LINES, type BandFit, type Line } from './fit';
import { formatNumber, withUnit } from './format';
import { forceConstantFromBand, bondLengthFromB } from './harmonic';
import { QUANTITIES, QUANTITY_KEYS, isQuantityKey, type QuantityKey } from './quantities';
import { referenceValues, defaultPartner } from './referenceValues';
import { diagnose, MIN_SLIP_WINDOW, type SlipInputs } from './slips';
import { parseSpecies, type Species, type SpeciesInput } from './species';
import { DEFAULT_CONSISTENCY_TOLERANCE, judge, type Tolerance, type Verdict } from './tolerance';
import { parseTypedNumber, precisionAgainstUncertainty, type TypedNumber } from './uncertainty';
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
  /** Consistency bands; default ±0.3 % (rounding only), widened by the rounding of the typed number. */
  consistencyTolerances?: Partial<Record<QuantityKey, Tolerance>>;
  /** Which quantities must carry an uncertainty: all measured quantities by default (true), none (false), or per key. */
  requireUncertainty?: boolean | Partial<Record<QuantityKey, boolean>>;
  /** Fit the centrifugal term; by default only when the student reports D. */
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
  notes: { code: string; message: string }[];
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
    fit?: BandFit;
    anharmonic?: AnharmonicAnalysis;
  };
  problems: { field: string; message: string }[];
}

interface ParsedNum {
  typed: TypedNumber;
  valueSI: number;
  unitSI: string;
  /** Standard uncertainty, SI (stated, or 0). */
  sigmaSI?: number;
  unitOk: boolean;
  unitText: string;
  text: string;
}

export type ParseQuantityResult =
  | { ok: true; valueSI: number; unitSI: string; uncertaintySI?: number; typed: TypedNumber; unit: string }
  | { ok: false; message: string };

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
  const stated = typeof n.uncertainty === 'number' && Number.isFinite(n.uncertainty) && n.uncertainty >= 0 ? n.uncertainty : typed.uncertainty;
  if (stated !== undefined) sigma = uncertaintyToSI(stated, typed.value, si.unit);
  return { ok: true, valueSI: si.valueSI, unitSI: si.unitSI, uncertaintySI: sigma, typed, unit };
}

const ENERGY_PER_WAVENUMBER = h * c; // J per m⁻¹

function displayValue(valueSI: number, key: QuantityKey, sig = 6): string {
  const info = QUANTITIES[key];
  const r = fromSI(valueSI, info.displayUnit, info.dimension);
  return r.ok ? withUnit(formatNumber(r.value, sig), r.unit) : withUnit(formatNumber(valueSI, sig), info.siUnit);
}

/** Quantities that come from the measurement and should carry an uncertainty by default. */
const MEASURED_KEYS: ReadonlySet<QuantityKey> = new Set(QUANTITY_KEYS.filter((k) => k !== 'reducedMass' && k !== 'isotopeRatio'));

interface Expected {
  valueSI: number;
  sigmaSI: number;
  source: string;
}

export function checkSubmission(input: SubmissionInput): SubmissionResult {
  try {
    return checkSubmissionUnsafe(input);
  } catch (err) {
    // A bug must not take down a marking batch; report it as a problem with this submission.
    return {
      quantities: [],
      derived: { reducedMassKg: 0, reducedMassU: 0 },
      problems: [{ field: '', message: `The submission could not be checked (internal error: ${err instanceof Error ? err.message : String(err)}).` }],
    };
  }
}

function checkSubmissionUnsafe(input: SubmissionInput): SubmissionResult {
  const problems: { field: string; message: string }[] = [];
  const quantities: QuantityCheck[] = [];
  if (input === null || typeof input !== 'object') {
    return { quantities, derived: { reducedMassKg: 0, reducedMassU: 0 }, problems: [{ field: '', message: 'The submission is empty.' }] };
  }
  const sp = parseSpecies(input.species);
  if (!sp.ok) problems.push({ field: 'species', message: sp.message });
  const species = sp.ok ? sp.species : undefined;
  const measured = input.measured && typeof input.measured === 'object' ? input.measured : {};
  const reported = (input.reported && typeof input.reported === 'object' ? input.reported : {}) as Record<string, unknown>;
  const tolerances = (input.tolerances && typeof input.tolerances === 'object' ? input.tolerances : {}) as Partial<Record<QuantityKey, Tolerance>>;
  const consistencyTolerances = (input.consistencyTolerances && typeof input.consistencyTolerances === 'object' ? input.consistencyTolerances : {}) as Partial<Record<QuantityKey, Tolerance>>;
  const referenceIn = (input.reference && typeof input.reference === 'object' ? input.reference : {}) as Record<string, unknown>;

  for (const k of Object.keys(reported)) if (!isQuantityKey(k)) problems.push({ field: `reported.${k}`, message: `"${k}" is not a quantity Oscillab knows.` });

  // --- The student's measurements --------------------------------------------------------
  type OkQuantity = Extract<ParseQuantityResult, { ok: true }>;
  const readMeasured = (field: string, num: unknown, dim: Dimension): OkQuantity | undefined => {
    if (num === undefined) return undefined;
    const r = parseQuantity(num, dim);
    if (!r.ok) {
      problems.push({ field, message: r.message });
      return undefined;
    }
    if (!(r.valueSI > 0)) {
      problems.push({ field, message: 'A measured wavenumber must be positive.' });
      return undefined;
    }
    return r;
  };
  const mBand = readMeasured('measured.bandCentre', measured.bandCentre, 'wavenumber');
  const mOvertone = readMeasured('measured.overtone', measured.overtone, 'wavenumber');

  // Reported values, parsed once.
  const rep: Partial<Record<QuantityKey, ParsedNum>> = {};
  for (const key of QUANTITY_KEYS) {
    const raw = reported[key];
    if (raw === undefined) continue;
    const p = parseReported(`reported.${key}`, raw, key, problems);
    if (p) rep[key] = p;
  }
  const reportedSI = (key: QuantityKey) => (rep[key] && rep[key]!.unitOk ? rep[key]!.valueSI : undefined);

  let fit: BandFit | undefined;
  let misnumbered: SlipInputs['misnumberedFit'];
  const centrifugal = input.centrifugal ?? reported.D !== undefined;
  if (measured.lines !== undefined) {
    if (Array.isArray(measured.lines) && measured.lines.length > MAX_LINES) {
      problems.push({ field: 'measured.lines', message: `The line list has ${measured.lines.length} lines; the limit is ${MAX_LINES}. Paste the assigned lines only.` });
    } else {
      const f = fitBand(measured.lines, { centrifugal, species });
      if (f.ok) {
        fit = f;
        const lines = measured.lines as Line[];
        let memo: ReturnType<NonNullable<SlipInputs['misnumberedFit']>> | null = null;
        misnumbered = () => {
          if (memo !== null) return memo;
          // Only the constants are compared, so refit without residuals and combination differences.
          const g = fitBandConstants(lines, { centrifugal, rBranchIndex: 'J' });
          memo = g.ok ? { nu0: g.nu0.value * 100, B0: g.B0.value * 100, B1: g.B1.value * 100, Be: g.Be.value * 100, alphaE: g.alphaE.value * 100, D: g.D ? g.D.value * 100 : undefined } : undefined;
          return memo;
        };
      } else for (const p of f.problems) problems.push({ field: p.field.startsWith('lines') ? `measured.${p.field}` : p.field, message: p.message });
    }
  }

  // Band centre for the harmonic analysis: measured, else as reported, else from the fit.
  let nu0: { valueSI: number; sigmaSI: number; source: string } | undefined;
  if (mBand) nu0 = { valueSI: mBand.valueSI, sigmaSI: mBand.uncertaintySI ?? 0, source: 'your measured band centre' };
  else if (reportedSI('bandCentre') !== undefined) nu0 = { valueSI: reportedSI('bandCentre')!, sigmaSI: rep.bandCentre!.sigmaSI ?? 0, source: 'your band centre' };
  else if (fit) nu0 = { valueSI: fit.nu0.value * 100, sigmaSI: fit.nu0.stdError * 100, source: 'the band centre from your line fit' };

  let anharmonic: AnharmonicAnalysis | undefined;
  if (nu0 && mOvertone) {
    const a = anharmonicFromOvertone(nu0.valueSI / 100, mOvertone.valueSI / 100, {
      reducedMassKg: species?.reducedMassKg,
      sigmaFundamental: nu0.sigmaSI / 100,
      sigmaOvertone: (mOvertone.uncertaintySI ?? 0) / 100,
    });
    if (a.ok) {
      const { ok: _ok, ...rest } = a;
      anharmonic = rest;
    } else problems.push({ field: 'measured.overtone', message: a.message });
  }
  const omegaE = anharmonic ? { v: anharmonic.omegaE * 100, s: anharmonic.uncertainty.omegaE * 100, src: 'ωₑ from your fundamental and overtone' } : reportedSI('omegaE') !== undefined ? { v: reportedSI('omegaE')!, s: rep.omegaE!.sigmaSI ?? 0, src: 'your ωₑ' } : undefined;
  const omegaExe = anharmonic ? { v: anharmonic.omegaExe * 100, s: anharmonic.uncertainty.omegaExe * 100 } : reportedSI('omegaExe') !== undefined ? { v: reportedSI('omegaExe')!, s: rep.omegaExe!.sigmaSI ?? 0 } : undefined;

  // --- Consistency: what the student's own data give ----------------------------------
  const fitEst = (k: 'nu0' | 'B0' | 'B1' | 'Be' | 'alphaE' | 'D'): Expected | undefined => {
    const e = fit?.[k];
    return e ? { valueSI: e.value * 100, sigmaSI: e.stdError * 100, source: 'recomputed from your line list (least-squares fit)' } : undefined;
  };
  const studentB0 = fit ? fit.B0.value * 100 : reportedSI('B0');
  const studentB1 = fit ? fit.B1.value * 100 : reportedSI('B1');
  const studentBe = fit ? { v: fit.Be.value * 100, s: fit.Be.stdError * 100, src: 'your fitted Bₑ' } : reportedSI('Be') !== undefined ? { v: reportedSI('Be')!, s: rep.Be!.sigmaSI ?? 0, src: 'your Bₑ' } : undefined;
  const studentB0e = fit ? { v: fit.B0.value * 100, s: fit.B0.stdError * 100, src: 'your fitted B₀' } : studentB0 !== undefined ? { v: studentB0, s: rep.B0?.sigmaSI ?? 0, src: 'your B₀' } : undefined;
  const partnerSp = measured.partner && typeof measured.partner === 'object' ? parseSpecies(measured.partner.species) : undefined;
  if (partnerSp && !partnerSp.ok) problems.push({ field: 'measured.partner.species', message: partnerSp.message });
  const partner = partnerSp?.ok ? partnerSp.species : species ? defaultPartner(species) : undefined;
  const mPartnerBand = measured.partner ? readMeasured('measured.partner.bandCentre', measured.partner.bandCentre, 'wavenumber') : undefined;

  const consistency = (key: QuantityKey): Expected | undefined => {
    if (!species) return undefined;
    const mu = species.reducedMassKg;
    switch (key) {
      case 'bandCentre':
        if (fit) return fitEst('nu0');
        return undefined;
      case 'reducedMass':
        return { valueSI: mu, sigmaSI: 0, source: `μ from the isotopic masses of ${species.display}` };
      case 'forceConstant':
        if (!nu0) return undefined;
        return { valueSI: forceConstantFromBand(nu0.valueSI, mu), sigmaSI: (2 * nu0.sigmaSI / nu0.valueSI) * forceConstantFromBand(nu0.valueSI, mu), source: `k = 4π²c²ν̃₀²μ from ${nu0.source}` };
      case 'forceConstantE':
        if (!omegaE) return undefined;
        return { valueSI: forceConstantFromBand(omegaE.v, mu), sigmaSI: (2 * omegaE.s / omegaE.v) * forceConstantFromBand(omegaE.v, mu), source: `kₑ = 4π²c²ωₑ²μ from ${omegaE.src}` };
      case 'B0':
      case 'B1':
      case 'Be':
      case 'alphaE':
      case 'D':
        return fitEst(key);
      case 're':
        if (!studentBe || !(studentBe.v > 0)) return undefined;
        {
          const r = bondLengthFromB(studentBe.v, mu);
          return { valueSI: r, sigmaSI: (r * studentBe.s) / (2 * studentBe.v), source: `rₑ = √(h/(8π²cμBₑ)) from ${studentBe.src}` };
        }
      case 'r0':
        if (!studentB0e || !(studentB0e.v > 0)) return undefined;
        {
          const r = bondLengthFromB(studentB0e.v, mu);
          return { valueSI: r, sigmaSI: (r * studentB0e.s) / (2 * studentB0e.v), source: `r₀ = √(h/(8π²cμB₀)) from ${studentB0e.src}` };
        }
      case 'omegaE':
        return anharmonic ? { valueSI: anharmonic.omegaE * 100, sigmaSI: anharmonic.uncertainty.omegaE * 100, source: 'ωₑ = 3ν̃₁←₀ − ν̃₂←₀ from your band positions' } : undefined;
      case 'omegaExe':
        return anharmonic ? { valueSI: anharmonic.omegaExe * 100, sigmaSI: anharmonic.uncertainty.omegaExe * 100, source: 'ωₑxₑ = (2ν̃₁←₀ − ν̃₂←₀)/2 from your band positions' } : undefined;
      case 'zeroPointEnergy':
      case 'dissociationEnergy':
      case 'dissociationEnergy0': {
        if (!omegaE || !omegaExe || !(omegaExe.v > 0)) return undefined;
        const we = omegaE.v;
        const wx = omegaExe.v;
        const zpe = we / 2 - wx / 4;
        const De = (we * we) / (4 * wx);
        const v = key === 'zeroPointEnergy' ? zpe : key === 'dissociationEnergy' ? De : De - zpe;
        const sig = anharmonic ? (key === 'zeroPointEnergy' ? anharmonic.uncertainty.zeroPointEnergy : key === 'dissociationEnergy' ? anharmonic.uncertainty.dissociationEnergyE : anharmonic.uncertainty.dissociationEnergy0) * 100 : 0;
        return { valueSI: v * ENERGY_PER_WAVENUMBER, sigmaSI: sig * ENERGY_PER_WAVENUMBER, source: key === 'zeroPointEnergy' ? 'G(0) = ωₑ/2 − ωₑxₑ/4 from your ωₑ and ωₑxₑ' : key === 'dissociationEnergy' ? 'Dₑ = ωₑ²/(4ωₑxₑ) from your ωₑ and ωₑxₑ' : 'D₀ = Dₑ − G(0) from your ωₑ and ωₑxₑ' };
      }
      case 'isotopeShift':
      case 'isotopeRatio': {
        if (!nu0 || !partner) return undefined;
        const other = mPartnerBand ? mPartnerBand.valueSI : nu0.valueSI * Math.sqrt(mu / partner.reducedMassKg);
        const src = mPartnerBand ? `your band centres of ${species.display} and ${partner.display}` : `the harmonic prediction ν̃₀√(μ/μ′) for ${partner.display} from your band centre`;
        return key === 'isotopeShift' ? { valueSI: other - nu0.valueSI, sigmaSI: 0, source: src } : { valueSI: other / nu0.valueSI, sigmaSI: 0, source: src };
      }
    }
  };

  // --- Accuracy: the accepted value -----------------------------------------------------
  const lit = species ? referenceValues(species, partner) : {};
  const accuracy = (key: QuantityKey): Expected | undefined => {
    const given = referenceIn[key];
    if (given !== undefined) {
      const r = parseQuantity(given, QUANTITIES[key].dimension);
      if (!r.ok) {
        problems.push({ field: `reference.${key}`, message: r.message });
        return undefined;
      }
      return { valueSI: r.valueSI, sigmaSI: r.uncertaintySI ?? 0, source: "the instructor's accepted value" };
    }
    const l = lit[key];
    return l ? { valueSI: l.valueSI, sigmaSI: 0, source: l.source } : undefined;
  };

  // Inputs for the slip models on each basis.
  const studentInputs: SlipInputs | undefined = species
    ? { species, nu0: nu0?.valueSI, omegaE: omegaE?.v ?? lit.omegaE?.valueSI, omegaExe: omegaExe?.v, B0: studentB0, B1: studentB1, misnumberedFit: misnumbered }
    : undefined;
  const referenceInputs: SlipInputs | undefined = species
    ? { species, nu0: lit.bandCentre?.valueSI, omegaE: lit.omegaE?.valueSI, omegaExe: lit.omegaExe?.valueSI, B0: lit.B0?.valueSI, B1: lit.B1?.valueSI }
    : undefined;

  const required = (key: QuantityKey) => {
    const r = input.requireUncertainty;
    if (r === undefined || r === true) return MEASURED_KEYS.has(key);
    if (r === false) return false;
    return r[key] === true;
  };

  // --- Judge each reported quantity ------------------------------------------------------
  for (const key of QUANTITY_KEYS) {
    const p = rep[key];
    if (!p) continue;
    const info = QUANTITIES[key];
    const cons = consistency(key);
    const acc = accuracy(key);
    const notes = presentationNotes(key, p, cons, required(key) || tolerances[key]?.sigma !== undefined || tolerances[key]?.partial?.sigma !== undefined);
    const entries: QuantityCheck[] = [];
    if (cons) entries.push(checkAgainst(key, p, notes, 'consistency', cons, consistencyTolerances[key] ?? DEFAULT_CONSISTENCY_TOLERANCE, studentInputs, true));
    if (acc) {
      // Diagnose on accuracy only when there is no own-data check to diagnose against.
      const a = checkAgainst(key, p, notes, 'accuracy', acc, tolerances[key], cons ? undefined : referenceInputs, !cons);
      if (cons && entries[0]) {
        const cv = entries[0].verdict;
        if (cv === 'within' && a.verdict === 'outside') a.notes.push({ code: 'consistent-not-accurate', message: 'Your calculation is right for your own data, but the result is far from the accepted value: look at the measurement (calibration, line assignment, resolution).' });
        if (cv === 'outside' && (a.verdict === 'within' || a.verdict === 'partial')) a.notes.push({ code: 'accurate-not-consistent', message: 'The number is close to the accepted value but does not follow from your own data: check your working.' });
      }
      entries.push(a);
    }
    if (entries.length === 0) {
      entries.push({
        key,
        basis: 'accuracy',
        reportedSI: p.valueSI,
        expectedSI: 0,
        unitSI: info.siUnit,
        deviation: 0,
        relativeDeviation: 0,
        verdict: 'not-checked',
        diagnoses: [],
        notes: [...notes, { code: 'not-checked', message: species ? 'There is no data to recompute this quantity from and no accepted value for this species.' : 'The species is not known, so this quantity cannot be checked.' }],
        reportedText: p.text,
        reportedDisplay: p.unitOk ? displayValue(p.valueSI, key, Math.max(3, p.typed.sigFigs)) : withUnit(p.typed.text, p.unitText),
        expectedDisplay: '—',
        displayUnit: info.displayUnit,
        expectedSource: '',
        combinedUncertaintySI: 0,
      });
    }
    quantities.push(...entries);
  }

  return {
    quantities,
    derived: {
      species,
      reducedMassKg: species?.reducedMassKg ?? 0,
      reducedMassU: species?.reducedMassU ?? 0,
      bandCentre: nu0 ? nu0.valueSI / 100 : undefined,
      forceConstant: nu0 && species ? forceConstantFromBand(nu0.valueSI, species.reducedMassKg) : undefined,
      fit,
      anharmonic,
    },
    problems,
  };
}

/**
 * One verdict: the reported quantity `key` (parsed as `p`) against one expected value, on one
 * basis, with the slips named when it misses the full-marks band (partial credit or outside)
 * and `diagnoseIfOutside` is set: a number that earns only partial credit deserves the reason too.
 */
function checkAgainst(
  key: QuantityKey,
  p: ParsedNum,
  notes: { code: string; message: string }[],
  basis: 'consistency' | 'accuracy',
  exp: Expected,
  tol: Tolerance | undefined,
  inputs: SlipInputs | undefined,
  diagnoseIfOutside: boolean,
): QuantityCheck {
  const info = QUANTITIES[key];
  const sigma = Math.hypot(p.sigmaSI ?? 0, exp.sigmaSI);
  const j = judge(p.valueSI, exp.valueSI, tol, { uncertaintySI: sigma, dimension: info.dimension, roundingSI: basis === 'consistency' ? p.typed.roundingHalfWidth * siPerTyped(p, info.dimension) : 0 });
  let verdict = j.verdict;
  const entryNotes = [...notes];
  if (!p.unitOk) {
    verdict = 'outside';
    entryNotes.push({ code: 'unit-not-understood', message: p.unitText.trim() === '' ? `No unit given; the number was read in ${info.displayUnit || 'no unit'}.` : `The unit "${p.unitText}" does not fit this quantity; the number was read in ${info.displayUnit}.` });
  }
  if (j.verdict === 'not-checked' && j.reason) entryNotes.push({ code: 'not-checked', message: j.reason });
  let diagnoses: { code: string; message: string }[] = [];
  if ((verdict === 'outside' || verdict === 'partial') && diagnoseIfOutside) {
    const rel = p.typed.precisionKnown && p.typed.value !== 0 ? p.typed.roundingHalfWidth / Math.abs(p.typed.value) : 0;
    diagnoses = diagnose({
      key,
      reportedSI: p.valueSI,
      reportedValue: p.typed.value,
      reportedUnit: p.unitText,
      expectedSI: exp.valueSI,
      bandHalfWidthSI: Math.max(j.halfWidth, MIN_SLIP_WINDOW * Math.abs(exp.valueSI)),
      window: Math.max(MIN_SLIP_WINDOW, rel),
      inputs,
    });
  }
  return {
    key,
    basis,
    reportedSI: p.valueSI,
    expectedSI: exp.valueSI,
    unitSI: info.siUnit,
    deviation: j.deviation,
    relativeDeviation: j.relativeDeviation,
    verdict,
    diagnoses,
    notes: entryNotes,
    reportedText: p.text,
    reportedDisplay: p.unitOk ? displayValue(p.valueSI, key, p.typed.precisionKnown ? Math.max(3, p.typed.sigFigs) : 6) : withUnit(String(p.typed.text), p.unitText),
    expectedDisplay: displayValue(exp.valueSI, key, 6),
    displayUnit: info.displayUnit,
    expectedSource: exp.source,
    combinedUncertaintySI: sigma,
  };
}

/** SI per unit of the typed number (to turn the typed rounding into SI). */
function siPerTyped(p: ParsedNum, dim: Dimension): number {
  if (!p.unitOk) return 0;
  const def = lookupUnit(p.unitText, dim);
  if (!def) return 0;
  return def.kind === 'linear' ? Math.abs(def.factor) : Math.abs(p.valueSI / p.typed.value);
}

function parseReported(field: string, raw: unknown, key: QuantityKey, problems: { field: string; message: string }[]): ParsedNum | undefined {
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
  const stated = typeof n.uncertainty === 'number' && Number.isFinite(n.uncertainty) && n.uncertainty >= 0 ? n.uncertainty : typed.uncertainty;
  if (n.uncertainty !== undefined && (typeof n.uncertainty !== 'number' || !Number.isFinite(n.uncertainty) || n.uncertainty < 0)) {
    problems.push({ field: `${field}.uncertainty`, message: 'The uncertainty must be a non-negative number.' });
  }
  const si = toSI(typed.value, unitText, info.dimension);
  const positive = key !== 'alphaE' && key !== 'isotopeShift' && key !== 'D';
  if (positive && typed.value <= 0) problems.push({ field: `${field}.value`, message: `${info.label} must be positive${key === 'reducedMass' ? ' (a mass cannot be negative or zero)' : ''}.` });
  if (si.ok) {
    return { typed, valueSI: si.valueSI, unitSI: si.unitSI, sigmaSI: stated === undefined ? undefined : uncertaintyToSI(stated, typed.value, si.unit), unitOk: true, unitText, text };
  }
  // A missing unit is the student's slip, marked as such; an unreadable one is also a problem to fix.
  if (unitText.trim() !== '') problems.push({ field: `${field}.unit`, message: si.message });
  const fallback = toSI(typed.value, info.displayUnit, info.dimension);
  const valueSI = fallback.ok ? fallback.valueSI : typed.value;
  return { typed, valueSI, unitSI: info.siUnit, sigmaSI: undefined, unitOk: false, unitText, text };
}

function presentationNotes(key: QuantityKey, p: ParsedNum, cons: Expected | undefined, uncertaintyRequired: boolean): { code: string; message: string }[] {
  const notes: { code: string; message: string }[] = [];
  const statedSI = p.sigmaSI;
  if (statedSI === undefined && uncertaintyRequired) {
    notes.push({ code: 'missing-uncertainty', message: `${QUANTITIES[key].label} is given without an uncertainty; a measured quantity needs one.` });
  }
  // Judge the digits against the stated uncertainty, else against the one the data support.
  const sigmaSI = statedSI !== undefined && statedSI > 0 ? statedSI : cons && cons.sigmaSI > 0 ? cons.sigmaSI : undefined;
  if (sigmaSI !== undefined && p.unitOk && p.valueSI !== 0 && p.typed.value !== 0) {
    const sigmaTyped = sigmaSI * Math.abs(p.typed.value / p.valueSI);
    const v = precisionAgainstUncertainty(p.typed, sigmaTyped);
    const basis = statedSI !== undefined && statedSI > 0 ? 'the stated uncertainty' : 'the uncertainty your data support';
    if (v === 'too-many-significant-figures') notes.push({ code: 'too-many-significant-figures', message: `"${p.typed.text}" has more significant figures than ${basis} (±${formatNumber(sigmaTyped, 2)}) justifies; round the value to the uncertainty's decimal place.` });
    if (v === 'too-few-significant-figures' && statedSI !== undefined) notes.push({ code: 'too-few-significant-figures', message: `"${p.typed.text}" is rounded more coarsely than its uncertainty (±${formatNumber(sigmaTyped, 2)}); quote it to the uncertainty's decimal place.` });
  }
  return notes;
}
