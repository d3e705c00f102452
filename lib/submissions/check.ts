/**
 * checkStoredSubmission: run the grading engine on a stored submission and store what it found.
 *
 * Reads the submission, its practical, the quantity definitions, the tolerance bands that apply
 * to its cohort, the submitted values and the line assignments; calls `checkSubmission` once per
 * isotopologue of the practical; compares the reported lines with the peaks of the uploaded
 * spectrum; then replaces, for this submission only:
 *   - check_results  (one row per quantity, species and basis),
 *   - slip_findings  (one row per named slip: key = quantity key, code = slip code),
 *   - submissions.checkSummary (the whole engine output per species + spectrum comparison),
 *   - the flags (flagOutside, flagSlip, flagLate, flagDuplicate, flagSpectrumMismatch) and the
 *     marking queue's summary (verdict counts, slip codes),
 *   - proposed marks: one row per quantity item (itemKey `${key}:${species}`) and one per rubric
 *     item (`rubric:${key}`, proposed null), keeping any `awarded` and `comment` a marker set.
 *
 * How one quantity's marks are proposed: the item's marks are shared equally between the bases
 * that received a verdict (consistency and accuracy: half each when both were checked, the
 * shares from BASIS_SHARE in lib/instructor/bands.ts); each share is marksFor(verdict) — full
 * within the inner band, half within the outer band, none outside. A quantity the student did not
 * report is proposed 0 (the marking screen says why); one that was reported but has no checked
 * basis (no band applies) is proposed null: the marker decides.
 * The kept statistics (lib/statistics/keep.ts) follow these writes through the model hooks and
 * are brought up to date before the transaction commits, so a re-check keeps them right.
 *
 * proposedTotal is the sum of the proposed quantity marks (rubric items excluded), before any
 * late penalty; submissions.latePenalty holds the percentage to deduct from the total.
 */
import crypto from 'node:crypto';
import { Op, type Transaction } from 'sequelize';
import { sequelize } from '@/lib/db';
import { models } from '@/models';
import {
  checkSubmission,
  isQuantityKey,
  QUANTITIES,
  SI_UNIT,
  SLIPS,
  speciesDisplay,
  marksFor,
  type Num,
  type QuantityKey,
  type SubmissionResult,
  type Tolerance,
} from '@/lib/grading';
import { pickBands, toleranceFor, BASIS_SHARE, type ResolvedBand } from '@/lib/instructor/bands';
import { compareLinesToPeaks, pickPeaks } from '@/lib/spectrum';
import type { LinePeakComparison } from '@/lib/spectrum/peaks';
import { loadSpectrum } from './load-spectrum';
import { spectraOfSubmission } from './spectra';

export { loadSpectrum } from './load-spectrum';
import {
  compareWithAnalysis,
  FROM_SPECTRUM_LEGEND,
  matchByBand,
  type BandMatch,
  type FromSpectrumRow,
  type StoredAnalysis,
} from './spectrum-analysis';
import { log } from '@/lib/log';
import type { Practical } from '@/models/practical';
import type { QuantityDefinition } from '@/models/quantity-definition';
import type { Submission } from '@/models/submission';
import type { SubmittedValue } from '@/models/submitted-value';
import type { Upload } from '@/models/upload';

type LineComparisonSummary = LinePeakComparison['summary'];

/** The peak comparison's own summary counts, plus which lines and peaks failed to match. */
export interface SpectrumCheckSummary extends LineComparisonSummary {
  uploadId: number;
  ok: boolean;
  message?: string;
  unmatchedLines: { species: string; branch: 'P' | 'R' | null; J: number | null; wavenumber: number; nearest: number | null }[];
  missingPeaks: number[];
}

/** Oscillab's analyses of the submission's spectra, and the student's lines counted against them per band. */
export interface SpectraCheckSummary {
  samples: { key: string; label: string; uploadId: number | null; originalName: string | null; analysis: StoredAnalysis | null }[];
  perBand: BandMatch[];
}

export interface CheckSummary {
  version: 1;
  checkedAt: string;
  species: Record<string, SubmissionResult>;
  spectrum: SpectrumCheckSummary | null;
  spectra?: SpectraCheckSummary;
  /** The third comparison, when the practical has it switched on. */
  fromSpectrum?: { legend: string; rows: FromSpectrumRow[] } | null;
  duplicate: { lineList: boolean; spectrum: boolean; otherSubmissionIds: number[] };
}

/** Wavenumbers exactly as stored, so a copied list matches "to the last decimal". */
export function lineListHash(lines: { species: string; branch: string | null; J: number | null; wavenumber: number }[]): string | null {
  if (lines.length < 3) return null;
  const rows = lines.map((l) => `${l.species}|${l.branch ?? ''}|${l.J ?? ''}|${String(l.wavenumber)}`).sort();
  return crypto.createHash('sha256').update(rows.join('\n')).digest('hex');
}

/** Typed uncertainty text → number for the engine; blank or unreadable → undefined (the engine notes it). */
export function uncertaintyNumber(textValue: string | null | undefined): number | undefined {
  if (!textValue || !textValue.trim()) return undefined;
  const n = Number(textValue.trim().replace(/^±\s*/, '').replace(',', '.'));
  return Number.isFinite(n) && n >= 0 ? n : undefined;
}

export const SPECTRUM_MISMATCH_SHARE = 0.1;

export async function checkStoredSubmission(submissionId: number, options: { transaction?: Transaction } = {}): Promise<CheckSummary> {
  if (options.transaction) return run(submissionId, options.transaction);
  return sequelize().transaction((t) => run(submissionId, t));
}

async function flagDuplicates(ids: number[]): Promise<void> {
  const { Submission } = models();
  for (let attempt = 1; ; attempt++) {
    try {
      await Submission.update({ flagDuplicate: true }, { where: { id: ids.sort((a, b) => a - b), flagDuplicate: false } });
      return;
    } catch (error) {
      if (attempt >= 3) {
        log().error({ err: error, submissionIds: ids }, 'could not flag duplicate submissions');
        return;
      }
    }
  }
}

/** A reported value as stored (submitted_values) or as in a draft: the text the student typed. */
export type TypedValue = { key: string; species: string; valueText: string; unit: string; uncertaintyText: string | null };
/** A line of the student's list, as stored (line_assignments) or as in a draft. */
export type TypedLine = { species: string; branch: 'P' | 'R' | null; J: number | null; wavenumber: number };
type QuantityDefinitionLike = {
  id: number;
  key: string;
  species: string;
  referenceKind: string;
  referenceValueSI: number | null;
  uncertaintyRequired: boolean;
};

/**
 * The grading engine over one submission's values and lines: checkSubmission once per
 * isotopologue of the practical. Reads and writes nothing, so the stored check and the student's
 * "check without submitting" give the same answers for the same numbers.
 */
export function runChecks(
  practical: { species: unknown },
  qdefs: QuantityDefinitionLike[],
  bands: ReturnType<typeof pickBands>,
  values: TypedValue[],
  lines: TypedLine[],
): Record<string, SubmissionResult> {
  const valueOf = (key: string, species: string) => values.find((v) => v.key === key && v.species === species);
  const asNum = (v: { valueText: string; unit: string; uncertaintyText: string | null }): Num => {
    const n: Num = { value: v.valueText, unit: v.unit };
    const u = uncertaintyNumber(v.uncertaintyText);
    if (u !== undefined) n.uncertainty = u;
    return n;
  };

  const speciesList: string[] = Array.isArray(practical.species) ? practical.species : [];
  const results: Record<string, SubmissionResult> = {};
  for (const sp of speciesList) {
    const defs = qdefs.filter((q) => q.species === sp && isQuantityKey(q.key));
    const reported: Partial<Record<QuantityKey, Num>> = {};
    const reference: Partial<Record<QuantityKey, Num>> = {};
    const tolerances: Partial<Record<QuantityKey, Tolerance>> = {};
    const consistencyTolerances: Partial<Record<QuantityKey, Tolerance>> = {};
    const requireUncertainty: Partial<Record<QuantityKey, boolean>> = {};
    for (const q of defs) {
      const key = q.key as QuantityKey;
      const v = valueOf(key, sp);
      if (v && v.valueText.trim() !== '') reported[key] = asNum(v);
      if (q.referenceKind === 'department' && q.referenceValueSI !== null && Number.isFinite(q.referenceValueSI)) {
        reference[key] = { value: q.referenceValueSI, unit: SI_UNIT[QUANTITIES[key].dimension] };
      }
      const b = bands.get(q.id) ?? {};
      if (b.accuracy) tolerances[key] = toleranceFor(b.accuracy);
      if (b.consistency) consistencyTolerances[key] = toleranceFor(b.consistency);
      requireUncertainty[key] = q.uncertaintyRequired;
    }
    const band = valueOf('bandCentre', sp);
    const overtone = valueOf('overtone', sp);
    const spLines = lines
      .filter((l) => l.species === sp && l.branch && l.J !== null)
      .map((l) => ({ branch: l.branch as 'P' | 'R', J: l.J as number, wavenumber: l.wavenumber }));
    const partnerName = speciesList.find((o) => o !== sp);
    const partnerBand = partnerName ? valueOf('bandCentre', partnerName) : undefined;
    results[sp] = checkSubmission({
      species: sp,
      measured: {
        ...(band && band.valueText.trim() ? { bandCentre: asNum(band) } : {}),
        ...(overtone && overtone.valueText.trim() ? { overtone: asNum(overtone) } : {}),
        ...(spLines.length ? { lines: spLines } : {}),
        ...(partnerName && partnerBand && partnerBand.valueText.trim()
          ? { partner: { species: partnerName, bandCentre: asNum(partnerBand) } }
          : {}),
      },
      reported,
      reference,
      tolerances,
      consistencyTolerances,
      requireUncertainty,
    });
  }
  return results;
}

/** The bands that apply to a cohort, per quantity definition and basis. */
export async function bandsForCohort(qdefIds: number[], cohortId: number, transaction?: Transaction) {
  const bandRows = qdefIds.length
    ? await models().ToleranceBand.findAll({
        where: { quantityDefinitionId: qdefIds, [Op.or]: [{ cohortId: null }, { cohortId }] },
        transaction,
      })
    : [];
  return pickBands(
    bandRows.map((r) => r.get({ plain: true }) as ResolvedBand),
    cohortId,
  );
}

async function run(submissionId: number, transaction: Transaction): Promise<CheckSummary> {
  const { Submission, Practical, QuantityDefinition, SubmittedValue, LineAssignment, Upload } = models();
  const submission = await Submission.findByPk(submissionId, { transaction });
  if (!submission) throw new Error(`Submission ${submissionId} does not exist`);
  const practical = await Practical.findByPk(submission.practicalId, { transaction });
  if (!practical) throw new Error(`Practical ${submission.practicalId} does not exist`);
  const qdefs = await QuantityDefinition.findAll({
    where: { practicalId: practical.id },
    order: [
      ['position', 'ASC'],
      ['id', 'ASC'],
    ],
    transaction,
  });
  const bands = await bandsForCohort(
    qdefs.map((q) => q.id),
    submission.cohortId,
    transaction,
  );
  const values = await SubmittedValue.findAll({ where: { submissionId }, transaction });
  const lines = await LineAssignment.findAll({ where: { submissionId }, order: [['id', 'ASC']], transaction });
  const speciesList: string[] = Array.isArray(practical.species) ? practical.species : [];
  const results = runChecks(practical, qdefs, bands, values, lines);

  // --- The student's lines against the peaks of their own spectrum ----------------------
  const spectrumUpload = await Upload.findOne({ where: { submissionId, kind: 'spectrum' }, order: [['id', 'DESC']], transaction });
  let spectrum: SpectrumCheckSummary | null = null;
  if (spectrumUpload) spectrum = compareWithSpectrum(spectrumUpload, lines);

  // --- Oscillab's own analysis of each spectrum: lines per band, and the third comparison ---
  const spectraRows = await spectraOfSubmission(submission, practical, { transaction });
  const analyses = spectraRows.map((r) => r.analysis).filter((a): a is StoredAnalysis => a !== null);
  const spectra: SpectraCheckSummary = {
    samples: spectraRows.map((r) => ({
      key: r.sample.key,
      label: r.sample.label,
      uploadId: r.upload?.id ?? null,
      originalName: r.upload?.originalName ?? null,
      analysis: r.analysis,
    })),
    perBand: analyses.length
      ? matchByBand(
          lines.map((l) => ({ species: l.species, branch: l.branch, J: l.J, wavenumber: l.wavenumber })),
          analyses,
        )
      : [],
  };
  let fromSpectrum: CheckSummary['fromSpectrum'] = null;
  if (practical.spectrumAnalysis && analyses.length) {
    const reportedForComparison = values
      .filter((v) => v.valueText.trim() !== '' && speciesList.includes(v.species))
      .map((v) => {
        const q = qdefs.find((d) => d.key === v.key && d.species === v.species);
        const band = q ? bands.get(q.id)?.accuracy : undefined;
        return {
          key: v.key,
          species: v.species,
          valueText: v.valueText,
          unit: v.unit,
          uncertaintyText: v.uncertaintyText,
          accuracy: band ? toleranceFor(band) : undefined,
        };
      });
    fromSpectrum = { legend: FROM_SPECTRUM_LEGEND, rows: compareWithAnalysis(reportedForComparison, analyses) };
  }

  // --- Duplicate data (for staff only) ---------------------------------------------------
  const hash = lineListHash(lines);
  const { others, dupLines, dupSpectrum } = await duplicatesOf(submission, hash, spectrumUpload, transaction);
  // The other students' rows are flagged after this transaction commits, not inside it: two
  // students with the same data submitting at once would otherwise each hold their own row and
  // wait for the other's (a deadlock on PostgreSQL). The flag is advisory, for staff only.
  if (others.size) transaction.afterCommit(() => flagDuplicates([...others]));

  // --- Replace the stored results ---------------------------------------------------------
  const { checkRows, slipRows, anyOutside, anySlip } = await storeCheckResults(submissionId, results, transaction);

  // --- Proposed marks ------------------------------------------------------------------------
  const { proposedTotal, maxTotal } = await proposeMarks(submissionId, practical, speciesList, qdefs, values, results, transaction);

  // What the marking queue shows, kept on the row so the queue never reads the summary above.
  const verdicts = verdictCounts(checkRows);
  const slipCodes = [...new Set(slipRows.map((r) => r.code))].sort().join(',').slice(0, 400);

  const summary: CheckSummary = {
    version: 1,
    checkedAt: new Date().toISOString(),
    species: results,
    spectrum,
    spectra,
    fromSpectrum,
    duplicate: { lineList: dupLines, spectrum: dupSpectrum, otherSubmissionIds: [...others] },
  };
  await submission.update(
    {
      checkSummary: JSON.parse(JSON.stringify(summary)),
      lineListHash: hash,
      flagOutside: anyOutside,
      flagSlip: anySlip,
      flagLate: submission.daysLate > 0,
      flagDuplicate: others.size > 0,
      flagSpectrumMismatch: spectrumMismatch(spectrum, spectra),
      proposedTotal,
      maxTotal,
      ...verdicts,
      slipCodes,
    },
    { transaction },
  );
  return summary;
}

/** Other students' submitted attempts with the same line list (by its hash) or the same spectrum file (by its checksum). */
async function duplicatesOf(
  submission: Submission,
  hash: string | null,
  spectrumUpload: Upload | null,
  transaction: Transaction,
): Promise<{ others: Set<number>; dupLines: boolean; dupSpectrum: boolean }> {
  const { Submission, Upload } = models();
  const others = new Set<number>();
  let dupLines = false;
  let dupSpectrum = false;
  if (hash) {
    const same = await Submission.findAll({
      where: { lineListHash: hash, studentId: { [Op.ne]: submission.studentId }, attempt: { [Op.gt]: 0 } },
      attributes: ['id'],
      transaction,
    });
    for (const s of same) others.add(s.id);
    dupLines = same.length > 0;
  }
  if (spectrumUpload) {
    const same = await Upload.findAll({
      where: { sha256: spectrumUpload.sha256, kind: 'spectrum', id: { [Op.ne]: spectrumUpload.id } },
      transaction,
    });
    const subIds = same.map((u) => u.submissionId).filter((x): x is number => x !== null);
    if (subIds.length) {
      const subs = await Submission.findAll({
        where: { id: subIds, studentId: { [Op.ne]: submission.studentId }, attempt: { [Op.gt]: 0 } },
        attributes: ['id'],
        transaction,
      });
      for (const s of subs) others.add(s.id);
      dupSpectrum = subs.length > 0;
    }
  }
  return { others, dupLines, dupSpectrum };
}

/** Replaces the submission's check results and slip findings with what the engine found now. */
async function storeCheckResults(submissionId: number, results: Record<string, SubmissionResult>, transaction: Transaction) {
  const { CheckResult, SlipFinding } = models();
  await CheckResult.destroy({ where: { submissionId }, transaction });
  await SlipFinding.destroy({ where: { submissionId }, transaction });
  const checkRows = [];
  const slipRows: { submissionId: number; key: string; code: string }[] = [];
  let anyOutside = false;
  let anySlip = false;
  for (const [sp, r] of Object.entries(results)) {
    const seen = new Set<string>();
    for (const q of r.quantities) {
      const codes = q.diagnoses.map((d) => d.code);
      if (q.verdict === 'outside') anyOutside = true;
      checkRows.push({
        submissionId,
        key: q.key,
        species: sp,
        basis: q.basis,
        reportedSI: finite(q.reportedSI),
        expectedSI: finite(q.expectedSI),
        deviation: finite(q.deviation),
        relativeDeviation: finite(q.relativeDeviation),
        verdict: q.verdict,
        slipCodes: codes.join(',').slice(0, 400),
      });
      for (const code of codes) {
        if (!(code in SLIPS) || seen.has(`${q.key}|${code}`)) continue;
        seen.add(`${q.key}|${code}`);
        slipRows.push({ submissionId, key: q.key, code });
        anySlip = true;
      }
    }
  }
  if (checkRows.length) await CheckResult.bulkCreate(checkRows, { transaction });
  if (slipRows.length) await SlipFinding.bulkCreate(slipRows, { transaction });
  return { checkRows, slipRows, anyOutside, anySlip };
}

/**
 * Proposed marks, one row per quantity item and rubric item: rows a marker has not touched are
 * updated or removed, an awarded mark or comment is kept. Returns the proposed and the greatest total.
 */
async function proposeMarks(
  submissionId: number,
  practical: Practical,
  speciesList: string[],
  qdefs: QuantityDefinition[],
  values: SubmittedValue[],
  results: Record<string, SubmissionResult>,
  transaction: Transaction,
): Promise<{ proposedTotal: number | null; maxTotal: number }> {
  const { Mark } = models();
  const items: { itemKey: string; label: string; maxMarks: number; proposed: number | null }[] = [];
  for (const q of qdefs) {
    if (!isQuantityKey(q.key) || !speciesList.includes(q.species)) continue;
    const checks = (results[q.species]?.quantities ?? []).filter((c) => c.key === q.key && c.verdict !== 'not-checked');
    const reported = values.some((v) => v.key === q.key && v.species === q.species && v.valueText.trim() !== '');
    let proposed: number | null = reported ? null : 0;
    if (reported && checks.length) {
      const shareTotal = checks.reduce((s, c) => s + BASIS_SHARE[c.basis], 0);
      proposed = checks.reduce((s, c) => s + marksFor(c.verdict, q.marks) * (BASIS_SHARE[c.basis] / shareTotal), 0);
      proposed = Math.round(proposed * 100) / 100;
    }
    items.push({
      itemKey: `${q.key}:${q.species}`,
      label: `${QUANTITIES[q.key].label}, ${speciesDisplay(q.species)}`,
      maxMarks: q.marks,
      proposed,
    });
  }
  for (const r of Array.isArray(practical.rubric) ? practical.rubric : []) {
    items.push({ itemKey: `rubric:${r.key}`, label: r.title, maxMarks: r.marks, proposed: null });
  }
  const existing = await Mark.findAll({ where: { submissionId }, transaction });
  const wanted = new Set(items.map((i) => i.itemKey));
  for (const m of existing) {
    if (!wanted.has(m.itemKey) && m.awarded === null && !m.comment) await m.destroy({ transaction });
  }
  for (const item of items) {
    const row = existing.find((m) => m.itemKey === item.itemKey);
    if (row) await row.update({ label: item.label, maxMarks: item.maxMarks, proposed: item.proposed }, { transaction });
    else await Mark.create({ submissionId, ...item, awarded: null, comment: null, markerId: null }, { transaction });
  }
  const quantityItems = items.filter((i) => !i.itemKey.startsWith('rubric:'));
  const proposedTotal = quantityItems.some((i) => i.proposed !== null)
    ? Math.round(quantityItems.reduce((s, i) => s + (i.proposed ?? 0), 0) * 100) / 100
    : null;
  const maxTotal = items.reduce((s, i) => s + i.maxMarks, 0);
  return { proposedTotal, maxTotal };
}

/** The check rows counted by verdict. */
function verdictCounts(checkRows: { verdict: string }[]) {
  const verdicts = { verdictsWithin: 0, verdictsPartial: 0, verdictsOutside: 0, verdictsNotChecked: 0 };
  for (const row of checkRows) {
    if (row.verdict === 'within') verdicts.verdictsWithin++;
    else if (row.verdict === 'partial') verdicts.verdictsPartial++;
    else if (row.verdict === 'outside') verdicts.verdictsOutside++;
    else verdicts.verdictsNotChecked++;
  }
  return verdicts;
}

/**
 * A spectrum mismatch is flagged for a marker when the student's lines of a band the spectrum
 * covers do not match it (more than one line and more than a tenth unmatched). Lines of a band the
 * uploaded spectrum does not cover are not a mismatch (the form tells the student so plainly).
 */
function spectrumMismatch(spectrum: SpectrumCheckSummary | null, spectra: SpectraCheckSummary): boolean {
  const covered = spectra.perBand.filter((b) => !b.outsideRange && !b.noSpectrum);
  if (covered.length) return covered.some((b) => b.reported - b.matched > Math.max(1, SPECTRUM_MISMATCH_SHARE * b.reported));
  if (spectra.perBand.length) return false;
  return spectrum ? !spectrum.ok || spectrum.unmatched > Math.max(1, SPECTRUM_MISMATCH_SHARE * spectrum.reported) : false;
}

function finite(x: number): number | null {
  return typeof x === 'number' && Number.isFinite(x) ? x : null;
}

/** Reads the stored spectrum file and matches every reported line (all isotopologues together) to a peak. */
export function compareWithSpectrum(
  upload: { id: number; storedName: string; originalName: string },
  lines: { species: string; branch: 'P' | 'R' | null; J: number | null; wavenumber: number }[],
): SpectrumCheckSummary {
  const empty = {
    uploadId: upload.id,
    reported: lines.length,
    matched: 0,
    unmatched: 0,
    strongPeaks: 0,
    missing: 0,
    tolerance: 0,
    unmatchedLines: [],
    missingPeaks: [],
  };
  const loaded = loadSpectrum(upload);
  if (!loaded.ok) return { ...empty, ok: false, message: loaded.message };
  const peaks = pickPeaks(loaded.spectrum);
  const cmp = compareLinesToPeaks(
    lines.map((l) => ({ species: l.species, wavenumber: l.wavenumber, branch: l.branch ?? undefined, J: l.J ?? undefined })),
    peaks,
  );
  return {
    uploadId: upload.id,
    ok: true,
    ...cmp.summary,
    unmatchedLines: cmp.lines
      .filter((c) => !c.matched)
      .map((c) => ({
        species: c.line.species,
        branch: c.line.branch ?? null,
        J: c.line.J ?? null,
        wavenumber: c.line.wavenumber,
        nearest: c.nearest ? c.nearest.wavenumber : null,
      })),
    missingPeaks: cmp.missing.map((p) => Math.round(p.wavenumber * 1000) / 1000).slice(0, 100),
  };
}
