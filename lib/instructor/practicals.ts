/**
 * Practical definitions: the practical itself, its deadlines per cohort, the quantities students
 * report (with marks and reference values) and the tolerance bands. Every function here takes
 * rows already authorised by the caller (course-manage on the practical's own course).
 */
import { Op, type Transaction } from 'sequelize';
import { sequelize } from '@/lib/db';
import { models } from '@/models';
import type { Practical } from '@/models/practical';
import type { QuantityDefinition } from '@/models/quantity-definition';
import { HttpError } from '@/lib/http-error';
import { audit } from '@/lib/audit';
import {
  QUANTITIES,
  CONSISTENCY_KIND,
  DEFAULT_CONSISTENCY_WORDS,
  FLOATING_POINT_ALLOWANCE,
  fromSI,
  judge,
  marksFor,
  parseSpecies,
  parseTypedNumber,
  referenceValues,
  roundingHalfWidth,
  toSI,
  formatUnit,
  type QuantityKey,
  type Verdict,
} from '@/lib/grading';
import type { PracticalData, copySchema, bandSchema, previewSchema, quantitySchema } from '@/lib/schemas/instructor';
import type { z } from 'zod';
import { recheckPractical } from '@/lib/submissions/recheck';
import { BASIS_SHARE, pickBands, toleranceFor, describeBand, type ResolvedBand } from './bands';
import { log } from '@/lib/log';
import type { Serialized } from '@/lib/serialized';

export async function practicalOr404(practicalId: number, transaction?: Transaction): Promise<Practical> {
  const practical = await models().Practical.findByPk(practicalId, { transaction });
  if (!practical) throw new HttpError(404, 'No such practical.');
  return practical;
}

const formulaOf = (s: string) => {
  const p = parseSpecies(s);
  return p.ok ? p.species.formula : s;
};

async function courseCohortIds(courseId: number, transaction?: Transaction): Promise<Set<number>> {
  const cohorts = await models().Cohort.findAll({ where: { courseId }, attributes: ['id'], transaction });
  return new Set(cohorts.map((c) => c.id));
}

async function assertCohortsOfCourse(courseId: number, ids: number[], transaction?: Transaction) {
  const own = await courseCohortIds(courseId, transaction);
  const foreign = ids.filter((id) => !own.has(id));
  if (foreign.length)
    throw new HttpError(400, 'A cohort given is not a cohort of this course.', { cohortId: ['Not a cohort of this course.'] });
}

function practicalFields(data: PracticalData) {
  return {
    title: data.title,
    species: [...new Set(data.species.map(formulaOf))],
    instructions: data.instructions,
    hazardNotes: data.hazardNotes,
    mode: data.mode,
    maxAttempts: data.maxAttempts,
    lateRule: data.lateRule,
    latePenaltyPerDay: data.latePenaltyPerDay,
    latePenaltyCap: data.latePenaltyCap,
    rubric: data.rubric,
  };
}

async function setDeadlines(practical: Practical, deadlines: PracticalData['deadlines'], transaction: Transaction) {
  const { PracticalCohort } = models();
  await assertCohortsOfCourse(
    practical.courseId,
    deadlines.map((d) => d.cohortId),
    transaction,
  );
  const keep = deadlines.map((d) => d.cohortId);
  await PracticalCohort.destroy({ where: { practicalId: practical.id, cohortId: { [Op.notIn]: keep.length ? keep : [0] } }, transaction });
  for (const d of deadlines) {
    const row = await PracticalCohort.findOne({ where: { practicalId: practical.id, cohortId: d.cohortId }, transaction });
    if (row) await row.update({ deadline: new Date(d.deadline) }, { transaction });
    else
      await PracticalCohort.create(
        { practicalId: practical.id, cohortId: d.cohortId, opensAt: null, deadline: new Date(d.deadline) },
        { transaction },
      );
  }
}

export async function createPractical(courseId: number, data: PracticalData, actorId: number): Promise<Practical> {
  return sequelize().transaction(async (transaction) => {
    const practical = await models().Practical.create(
      { courseId, ...practicalFields(data), copiedFromId: null, archivedAt: null },
      { transaction },
    );
    await setDeadlines(practical, data.deadlines, transaction);
    await audit(
      { actorId, action: 'practical.create', entityType: 'practical', entityId: practical.id, after: practicalFields(data) },
      transaction,
    );
    return practical;
  });
}

export async function updatePractical(practical: Practical, data: PracticalData, actorId: number): Promise<Practical> {
  return sequelize().transaction(async (transaction) => {
    const before = { ...practical.get({ plain: true }) };
    const fields = practicalFields(data);
    const { QuantityDefinition } = models();
    const orphaned = await QuantityDefinition.count({
      where: { practicalId: practical.id, species: { [Op.notIn]: fields.species } },
      transaction,
    });
    if (orphaned)
      throw new HttpError(400, 'Some quantities are defined for an isotopologue you removed; delete those quantities first.', {
        species: ['Still used by quantities.'],
      });
    await practical.update(fields, { transaction });
    await setDeadlines(practical, data.deadlines, transaction);
    await audit(
      { actorId, action: 'practical.update', entityType: 'practical', entityId: practical.id, before, after: fields },
      transaction,
    );
    return practical;
  });
}

type QuantityData = z.output<typeof quantitySchema>;

function quantityFields(practical: Practical, data: QuantityData) {
  const species = formulaOf(data.species);
  if (!practical.species.includes(species)) {
    throw new HttpError(400, `${species} is not one of this practical's isotopologues (${practical.species.join(', ')}).`, {
      species: ['Not in this practical.'],
    });
  }
  const info = QUANTITIES[data.key as QuantityKey];
  const unit = data.unit || info.displayUnit;
  if (info.dimension !== 'ratio' && !toSI(1, unit, info.dimension).ok) {
    throw new HttpError(400, `"${unit}" is not a unit for ${info.label}.`, { unit: [`Not a unit for ${info.label}.`] });
  }
  let referenceValueSI: number | null = null;
  if (data.referenceKind === 'department') {
    const si =
      info.dimension === 'ratio' ? { ok: true as const, valueSI: data.referenceValue! } : toSI(data.referenceValue!, unit, info.dimension);
    if (!si.ok) throw new HttpError(400, si.message, { referenceValue: [si.message] });
    referenceValueSI = si.valueSI;
  } else if (!referenceValues(species)[data.key as QuantityKey]) {
    throw new HttpError(400, `No literature value of ${info.label} for ${species} is known; give the department's value with a note.`, {
      referenceKind: ['No literature value.'],
    });
  }
  return {
    key: data.key,
    species,
    unit,
    marks: data.marks,
    uncertaintyRequired: data.uncertaintyRequired,
    referenceKind: data.referenceKind,
    referenceValueSI,
    referenceNote: data.referenceKind === 'department' ? (data.referenceNote ?? null) : null,
  };
}

export async function addQuantity(practical: Practical, data: QuantityData, actorId: number): Promise<QuantityDefinition> {
  const fields = quantityFields(practical, data);
  const { QuantityDefinition } = models();
  return sequelize().transaction(async (transaction) => {
    if (await QuantityDefinition.findOne({ where: { practicalId: practical.id, key: fields.key, species: fields.species }, transaction })) {
      throw new HttpError(409, `${QUANTITIES[fields.key as QuantityKey].label} for ${fields.species} is already defined.`);
    }
    const position = data.position ?? (await QuantityDefinition.count({ where: { practicalId: practical.id }, transaction }));
    const row = await QuantityDefinition.create({ practicalId: practical.id, ...fields, position }, { transaction });
    await audit({ actorId, action: 'quantity.create', entityType: 'quantity_definition', entityId: row.id, after: fields }, transaction);
    return row;
  });
}

export async function updateQuantity(practical: Practical, quantity: QuantityDefinition, data: QuantityData, actorId: number) {
  const fields = quantityFields(practical, data);
  return sequelize().transaction(async (transaction) => {
    const before = { ...quantity.get({ plain: true }) };
    await quantity.update({ ...fields, ...(data.position !== undefined ? { position: data.position } : {}) }, { transaction });
    await audit(
      { actorId, action: 'quantity.update', entityType: 'quantity_definition', entityId: quantity.id, before, after: fields },
      transaction,
    );
    return quantity;
  });
}

export async function deleteQuantity(quantity: QuantityDefinition, actorId: number) {
  await sequelize().transaction(async (transaction) => {
    await models().ToleranceBand.destroy({ where: { quantityDefinitionId: quantity.id }, transaction });
    await quantity.destroy({ transaction });
    await audit(
      {
        actorId,
        action: 'quantity.delete',
        entityType: 'quantity_definition',
        entityId: quantity.id,
        before: quantity.get({ plain: true }),
      },
      transaction,
    );
  });
}

export async function quantityOf(practical: Practical, quantityId: number, transaction?: Transaction): Promise<QuantityDefinition> {
  const q = await models().QuantityDefinition.findOne({ where: { id: quantityId, practicalId: practical.id }, transaction });
  if (!q) throw new HttpError(404, 'No such quantity in this practical.');
  return q;
}

/** Submissions whose results a band change would alter (drafts are checked afresh anyway). */
export function submittedCount(practicalId: number, transaction?: Transaction) {
  return models().Submission.count({ where: { practicalId, status: { [Op.ne]: 'draft' } }, transaction });
}

/**
 * Re-check existing submissions with the new band (lib/submissions/recheck.ts), after the band
 * change has committed. If that fails, the request stays in the audit log as pending.
 */
async function recheckAfterChange(practicalId: number, actorId: number, count: number): Promise<{ rechecked: number | null }> {
  try {
    const { rechecked } = await recheckPractical(practicalId);
    await audit({
      actorId,
      action: 'practical.recheck',
      entityType: 'practical',
      entityId: practicalId,
      after: { submissions: count, rechecked },
    });
    return { rechecked };
  } catch (error) {
    log().error({ err: error, practicalId }, 're-check after a band change failed');
    await audit({
      actorId,
      action: 'practical.recheck-pending',
      entityType: 'practical',
      entityId: practicalId,
      after: { submissions: count, error: String(error).slice(0, 300) },
    });
    return { rechecked: null };
  }
}

export class NeedsRecheckDecision extends HttpError {
  constructor(public submissions: number) {
    super(
      409,
      `${submissions} submission(s) of this practical were checked with the current band. Say whether to re-check them with the new band.`,
    );
  }
}

type BandData = z.output<typeof bandSchema>;

function bandFields(quantity: QuantityDefinition, data: BandData) {
  const info = QUANTITIES[quantity.key as QuantityKey];
  let unit: string | null = null;
  if (data.kind === 'absolute') {
    unit = data.unit!.trim();
    if (info.dimension !== 'ratio' && !toSI(1, unit, info.dimension).ok)
      throw new HttpError(400, `"${unit}" is not a unit for ${info.label}.`, { unit: ['Not a unit for this quantity.'] });
  }
  if (data.kind === 'relative' && (data.inner >= 1 || (data.outer ?? 0) >= 1)) {
    throw new HttpError(400, 'A relative band is a fraction: 0.01 means 1 %.', { inner: ['Give a fraction below 1 (0.01 = 1 %).'] });
  }
  return { kind: data.kind, inner: data.inner, outer: data.outer ?? null, unit };
}

/** Add or change a band; with submissions present the caller must decide about re-checking (409 otherwise). */
/** PUT and DELETE /api/practicals/[id]/bands's answer: the submissions affected and how many were re-checked. */
export type BandChange = Serialized<Awaited<ReturnType<typeof saveBand>> | Awaited<ReturnType<typeof deleteBand>>>;

export async function saveBand(practical: Practical, data: BandData, actorId: number) {
  const { ToleranceBand } = models();
  const result = await sequelize().transaction(async (transaction) => {
    const quantity = await quantityOf(practical, data.quantityDefinitionId, transaction);
    if (data.cohortId !== null) await assertCohortsOfCourse(practical.courseId, [data.cohortId], transaction);
    const fields = bandFields(quantity, data);
    const existing = await ToleranceBand.findOne({
      where: { quantityDefinitionId: quantity.id, basis: data.basis, cohortId: data.cohortId === null ? { [Op.is]: null } : data.cohortId },
      transaction,
    });
    const count = await submittedCount(practical.id, transaction);
    if (count > 0 && data.recheck === undefined) throw new NeedsRecheckDecision(count);
    const before = existing ? { ...existing.get({ plain: true }) } : null;
    let row;
    if (existing) row = await existing.update({ ...fields, updatedById: actorId }, { transaction });
    else
      row = await ToleranceBand.create(
        { quantityDefinitionId: quantity.id, cohortId: data.cohortId, basis: data.basis, ...fields, updatedById: actorId },
        { transaction },
      );
    await audit(
      {
        actorId,
        action: existing ? 'band.update' : 'band.create',
        entityType: 'tolerance_band',
        entityId: row.id,
        before,
        after: { ...row.get({ plain: true }), recheck: data.recheck ?? null, submissions: count },
      },
      transaction,
    );
    return { band: row, submissions: count };
  });
  const recheck =
    result.submissions > 0 && data.recheck ? await recheckAfterChange(practical.id, actorId, result.submissions) : { rechecked: null };
  return { ...result, ...recheck };
}

export async function deleteBand(practical: Practical, bandId: number, recheck: boolean | undefined, actorId: number) {
  const { ToleranceBand, QuantityDefinition } = models();
  const result = await sequelize().transaction(async (transaction) => {
    const band = await ToleranceBand.findByPk(bandId, { transaction });
    const quantity = band && (await QuantityDefinition.findByPk(band.quantityDefinitionId, { transaction }));
    if (!band || !quantity || quantity.practicalId !== practical.id) throw new HttpError(404, 'No such band in this practical.');
    const count = await submittedCount(practical.id, transaction);
    if (count > 0 && recheck === undefined) throw new NeedsRecheckDecision(count);
    await band.destroy({ transaction });
    await audit(
      {
        actorId,
        action: 'band.delete',
        entityType: 'tolerance_band',
        entityId: band.id,
        before: band.get({ plain: true }),
        after: { recheck: recheck ?? null, submissions: count },
      },
      transaction,
    );
    return { submissions: count };
  });
  const done =
    result.submissions > 0 && recheck ? await recheckAfterChange(practical.id, actorId, result.submissions) : { rechecked: null };
  return { ...result, ...done };
}

/** The reference value a quantity is judged against, SI, with where it comes from. */
export function referenceFor(
  quantity: Pick<QuantityDefinition, 'key' | 'species' | 'referenceKind' | 'referenceValueSI' | 'referenceNote' | 'unit'>,
) {
  const info = QUANTITIES[quantity.key as QuantityKey];
  const shown = (si: number) => {
    const r = info.dimension === 'ratio' ? { ok: true as const, value: si, unit: '' } : fromSI(si, quantity.unit, info.dimension);
    return r.ok ? { value: r.value, unit: formatUnit(r.unit) } : { value: si, unit: info.siUnit };
  };
  if (quantity.referenceKind === 'department' && quantity.referenceValueSI !== null) {
    return {
      kind: 'department' as const,
      valueSI: quantity.referenceValueSI,
      ...shown(quantity.referenceValueSI),
      source: quantity.referenceNote ?? 'department value',
    };
  }
  const lit = referenceValues(quantity.species)[quantity.key as QuantityKey];
  if (!lit) return null;
  return { kind: 'literature' as const, valueSI: lit.valueSI, ...shown(lit.valueSI), source: lit.source };
}

type PreviewData = z.output<typeof previewSchema>;
export type BasisPreview = {
  basis: 'consistency' | 'accuracy';
  verdict: Verdict;
  marks: number;
  maxMarks: number;
  band: string | null;
  bandFrom: 'cohort' | 'course' | null;
  deviation: number | null;
  reason?: string;
  expected: number | null;
};

/** What a typed value would get: the verdict and marks for each basis, with the bands that apply to the cohort. */
export async function previewVerdict(practical: Practical, data: PreviewData) {
  const quantity = await quantityOf(practical, data.quantityDefinitionId);
  if (data.cohortId !== null) await assertCohortsOfCourse(practical.courseId, [data.cohortId]);
  const info = QUANTITIES[quantity.key as QuantityKey];
  const toSi = (v: number) =>
    info.dimension === 'ratio' ? { ok: true as const, valueSI: v } : toSI(v, data.unit || quantity.unit, info.dimension);
  const reported = toSi(data.value);
  if (!reported.ok) throw new HttpError(400, reported.message, { unit: [reported.message] });
  const rows = (await models().ToleranceBand.findAll({ where: { quantityDefinitionId: quantity.id } })).map(
    (r) => r.get({ plain: true }) as ResolvedBand,
  );
  const bands = pickBands(rows, data.cohortId).get(quantity.id) ?? {};
  const reference = referenceFor(quantity);
  const uncertaintySI =
    data.uncertainty != null
      ? Math.abs((toSi(data.value + data.uncertainty) as { valueSI: number }).valueSI - reported.valueSI)
      : undefined;
  const shown = (si: number) => (info.dimension === 'ratio' ? si : (fromSI(si, quantity.unit, info.dimension) as { value: number }).value);

  const one = (basis: 'consistency' | 'accuracy', expectedSI: number | null): BasisPreview => {
    const band = bands[basis];
    const maxMarks = quantity.marks * BASIS_SHARE[basis];
    if (expectedSI === null) {
      return {
        basis,
        verdict: 'not-checked',
        marks: 0,
        maxMarks,
        band: band ? describeBand(band, formatUnit) : null,
        bandFrom: band ? (band.cohortId ? 'cohort' : 'course') : null,
        deviation: null,
        expected: null,
        reason:
          basis === 'consistency'
            ? 'Type the value the engine would recompute from the student’s data to see the consistency verdict.'
            : 'No reference value is known for this quantity.',
      };
    }
    const kind = CONSISTENCY_KIND[quantity.key as QuantityKey];
    if (basis === 'consistency' && !band && kind === 'fitted') {
      return {
        basis,
        verdict: 'not-checked',
        marks: 0,
        maxMarks,
        band: DEFAULT_CONSISTENCY_WORDS.fitted,
        bandFrom: null,
        deviation: null,
        expected: shown(expectedSI),
        reason: 'By default a fitted quantity is judged with the standard errors of the student’s own fit, which need their line list.',
      };
    }
    // Without a band of the instructor's, consistency is judged to the digits typed (the default for arithmetic).
    const typedDigits = parseTypedNumber(String(data.value));
    const rounding = typedDigits.ok
      ? roundingHalfWidth(typedDigits, data.uncertainty ?? undefined) * Math.abs(reported.valueSI / (data.value || 1))
      : 0;
    const j =
      basis === 'consistency' && !band
        ? judge(
            reported.valueSI,
            expectedSI,
            { absolute: 0 },
            {
              dimension: info.dimension,
              roundingSI: Math.min(rounding, uncertaintySI ?? Infinity) + FLOATING_POINT_ALLOWANCE * Math.abs(expectedSI),
            },
          )
        : judge(reported.valueSI, expectedSI, band ? toleranceFor(band) : undefined, { dimension: info.dimension, uncertaintySI });
    return {
      basis,
      verdict: j.verdict,
      marks: marksFor(j.verdict, maxMarks),
      maxMarks,
      band: band ? describeBand(band, formatUnit) : basis === 'consistency' ? DEFAULT_CONSISTENCY_WORDS.arithmetic : null,
      bandFrom: band ? (band.cohortId ? 'cohort' : 'course') : null,
      deviation: j.verdict === 'not-checked' ? null : shown(reported.valueSI) - shown(expectedSI),
      reason: j.reason,
      expected: shown(expectedSI),
    };
  };
  const recomputed = data.recomputed != null ? toSi(data.recomputed) : null;
  if (recomputed && !recomputed.ok) throw new HttpError(400, recomputed.message);
  return {
    quantity: {
      id: quantity.id,
      key: quantity.key,
      label: info.label,
      species: quantity.species,
      unit: formatUnit(quantity.unit),
      marks: quantity.marks,
    },
    reference,
    results: [one('consistency', recomputed ? recomputed.valueSI : null), one('accuracy', reference?.valueSI ?? null)],
  };
}

type CopyData = z.output<typeof copySchema>;

/** Copy a practical (quantities and bands) for a new term; cohort overrides follow the mapping or are dropped. */
export async function copyPractical(source: Practical, data: CopyData, actorId: number): Promise<Practical> {
  const { Practical: P, QuantityDefinition, ToleranceBand } = models();
  return sequelize().transaction(async (transaction) => {
    const targets = Object.values(data.cohortMap).filter((v): v is number => v !== null);
    await assertCohortsOfCourse(source.courseId, [...targets, ...data.deadlines.map((d) => d.cohortId)], transaction);
    const plain = source.get({ plain: true });
    const copy = await P.create(
      {
        courseId: source.courseId,
        title: data.title,
        species: plain.species,
        instructions: plain.instructions,
        hazardNotes: plain.hazardNotes,
        mode: plain.mode,
        maxAttempts: plain.maxAttempts,
        lateRule: plain.lateRule,
        latePenaltyPerDay: plain.latePenaltyPerDay,
        latePenaltyCap: plain.latePenaltyCap,
        rubric: plain.rubric,
        spectrumSamples: plain.spectrumSamples ?? null,
        spectrumAnalysis: plain.spectrumAnalysis ?? false,
        copiedFromId: source.id,
        archivedAt: null,
      },
      { transaction },
    );
    await setDeadlines(copy, data.deadlines, transaction);
    const quantities = await QuantityDefinition.findAll({ where: { practicalId: source.id }, transaction });
    let bandsCopied = 0;
    let overridesDropped = 0;
    for (const q of quantities) {
      const { id: _id, createdAt: _c, updatedAt: _u, ...rest } = q.get({ plain: true });
      const nq = await QuantityDefinition.create({ ...rest, practicalId: copy.id }, { transaction });
      for (const b of await ToleranceBand.findAll({ where: { quantityDefinitionId: q.id }, transaction })) {
        let cohortId: number | null = null;
        if (b.cohortId !== null) {
          const mapped = data.cohortMap[String(b.cohortId)];
          if (mapped == null) {
            overridesDropped++;
            continue;
          }
          cohortId = mapped;
        }
        // Two old cohorts mapped onto one new cohort: the first override wins.
        if (
          await ToleranceBand.findOne({
            where: { quantityDefinitionId: nq.id, basis: b.basis, cohortId: cohortId ?? { [Op.is]: null } },
            transaction,
          })
        )
          continue;
        await ToleranceBand.create(
          {
            quantityDefinitionId: nq.id,
            cohortId,
            basis: b.basis,
            kind: b.kind,
            inner: b.inner,
            outer: b.outer,
            unit: b.unit,
            updatedById: actorId,
          },
          { transaction },
        );
        bandsCopied++;
      }
    }
    await audit(
      {
        actorId,
        action: 'practical.copy',
        entityType: 'practical',
        entityId: copy.id,
        before: { from: source.id },
        after: { quantities: quantities.length, bandsCopied, overridesDropped, cohortMap: data.cohortMap },
      },
      transaction,
    );
    return copy;
  });
}

/** POST /api/courses/[id]/practicals's and POST /api/practicals/[id]/copy's answer: the new practical as stored. */
export type PracticalCreated = { practical: PracticalDetail['practical'] };
/** GET /api/practicals/[id]'s answer (PUT answers the same without `instructionsHtml`). */
export type PracticalDetail = Serialized<Awaited<ReturnType<typeof practicalDetail>>> & { instructionsHtml: string };
/** POST /api/practicals/[id]/preview's answer. */
export type VerdictPreview = Serialized<Awaited<ReturnType<typeof previewVerdict>>>;

/** Everything the practical editor shows. */
export async function practicalDetail(practical: Practical) {
  const { PracticalCohort, QuantityDefinition, ToleranceBand, Cohort } = models();
  const [deadlines, quantities, cohorts, submissions] = await Promise.all([
    PracticalCohort.findAll({ where: { practicalId: practical.id }, order: [['deadline', 'ASC']] }),
    QuantityDefinition.findAll({
      where: { practicalId: practical.id },
      order: [
        ['position', 'ASC'],
        ['id', 'ASC'],
      ],
    }),
    Cohort.findAll({
      where: { courseId: practical.courseId },
      order: [
        ['term', 'DESC'],
        ['name', 'ASC'],
      ],
    }),
    submittedCount(practical.id),
  ]);
  const bands = await ToleranceBand.findAll({ where: { quantityDefinitionId: quantities.map((q) => q.id) }, order: [['id', 'ASC']] });
  return {
    practical: practical.get({ plain: true }),
    deadlines: deadlines.map((d) => ({ cohortId: d.cohortId, deadline: d.deadline.toISOString() })),
    cohorts: cohorts.map((c) => ({ id: c.id, name: c.name, term: c.term, instrument: c.instrument, archived: c.archivedAt !== null })),
    submissions,
    quantities: quantities.map((q) => {
      const info = QUANTITIES[q.key as QuantityKey];
      return {
        ...q.get({ plain: true }),
        label: info?.label ?? q.key,
        dimension: info?.dimension,
        unitDisplay: formatUnit(q.unit),
        reference: referenceFor(q),
        /** The consistency band that applies where the instructor sets none, in words. */
        consistencyDefault: info ? DEFAULT_CONSISTENCY_WORDS[CONSISTENCY_KIND[q.key as QuantityKey]] : null,
        bands: bands
          .filter((b) => b.quantityDefinitionId === q.id)
          .map((b) => ({ ...b.get({ plain: true }), text: describeBand(b, formatUnit) })),
      };
    }),
  };
}
