/**
 * Tolerance bands: each quantity has a course-wide default per basis (cohortId null) and may
 * have an override for a cohort (say, a coarser instrument). The override beats the default.
 * The submission checker calls `resolveBands` and `toleranceFor` to build the engine's tolerances.
 */
import { Op } from 'sequelize';
import { models } from '@/models';
import type { BandBasis, ToleranceBand as BandRow } from '@/models/tolerance-band';
import type { Tolerance } from '@/lib/grading/tolerance';

export type BandLike = Pick<BandRow, 'kind' | 'inner' | 'outer' | 'unit'>;
export type ResolvedBand = BandLike & { id: number; cohortId: number | null; basis: BandBasis; quantityDefinitionId: number };
/** Per quantity definition: the band that applies for each basis (absent: none set). */
export type ResolvedBands = Map<number, Partial<Record<BandBasis, ResolvedBand>>>;

/** The bands that apply to a cohort: its own override where there is one, else the course default. */
export async function resolveBands(quantityDefinitionIds: number[], cohortId: number | null): Promise<ResolvedBands> {
  const out: ResolvedBands = new Map(quantityDefinitionIds.map((id) => [id, {}]));
  if (quantityDefinitionIds.length === 0) return out;
  const rows = await models().ToleranceBand.findAll({
    where: {
      quantityDefinitionId: quantityDefinitionIds,
      cohortId: cohortId === null ? { [Op.is]: null } : { [Op.or]: [{ [Op.is]: null }, { [Op.eq]: cohortId }] },
    },
  });
  return pickBands(
    rows.map((r) => r.get({ plain: true }) as ResolvedBand),
    cohortId,
    out,
  );
}

/** The pure part of resolveBands (also used by the live preview on already loaded rows). */
export function pickBands(rows: ResolvedBand[], cohortId: number | null, out: ResolvedBands = new Map()): ResolvedBands {
  for (const row of rows) {
    if (row.cohortId !== null && row.cohortId !== cohortId) continue;
    const slot = out.get(row.quantityDefinitionId) ?? {};
    const current = slot[row.basis];
    if (!current || (current.cohortId === null && row.cohortId !== null)) slot[row.basis] = row;
    out.set(row.quantityDefinitionId, slot);
  }
  return out;
}

/** A stored band in the grading engine's Tolerance shape (inner band full marks, outer band partial credit). */
export function toleranceFor(band: BandLike): Tolerance {
  const width = (value: number) =>
    band.kind === 'absolute' ? { absolute: value } : band.kind === 'relative' ? { relative: value } : { sigma: value };
  const tolerance: Tolerance = { ...width(band.inner) };
  if (band.kind === 'absolute' && band.unit) tolerance.unit = band.unit;
  if (band.outer !== null && band.outer !== undefined) tolerance.partial = width(band.outer);
  return tolerance;
}

/** How a band reads to people: "± 2 cm⁻¹ (partial credit to ± 5 cm⁻¹)". */
export function describeBand(band: BandLike, formatUnit: (u: string) => string = (u) => u): string {
  const one = (v: number) =>
    band.kind === 'absolute'
      ? `± ${v} ${formatUnit(band.unit ?? '')}`.trim()
      : band.kind === 'relative'
        ? `± ${+(v * 100).toPrecision(6)} %`
        : `± ${v} σ`;
  return band.outer != null ? `${one(band.inner)} (partial credit to ${one(band.outer)})` : one(band.inner);
}

/**
 * A quantity's marks are shared between its two questions: is the number right from the
 * student's own data (consistency), and is the measurement close to the accepted value (accuracy).
 */
export const BASIS_SHARE: Record<BandBasis, number> = { consistency: 0.5, accuracy: 0.5 };
