/**
 * What a statistics request covers once lib/authz/statistics.ts has allowed it: the cohorts a
 * practical was run for, the practicals compared with it, and how markers are named to the viewer.
 */
import { QueryTypes } from 'sequelize';
import type { Actor } from '@/lib/authz/decision';
import { sequelize } from '@/lib/db';
import { models } from '@/models';
import type { Practical } from '@/models/practical';
import type { Cohort } from '@/models/cohort';
import type { Scope } from './queries';

/** What statistics need of a practical and of a cohort (a model instance has these, and more). */
export type StatisticsPractical = Pick<Practical, 'id' | 'courseId' | 'title' | 'rubric'>;
export type StatisticsCohort = Pick<Cohort, 'id' | 'courseId' | 'name' | 'term' | 'instrument'>;

export interface StatisticsScope {
  actor: Actor;
  practical: StatisticsPractical;
  /** The cohort asked for, or null for every cohort of the practical. */
  cohort: StatisticsCohort | null;
  cohorts: StatisticsCohort[];
  /** Lead, instructor or admin: may see markers' names and export marks. */
  manages: boolean;
  scope: Scope;
}

/** The practicals of the same title in the same course (this year's and earlier years'), and every cohort that ran one of them. */
export async function comparableCohorts(practical: Practical): Promise<{ practicalIds: number[]; cohorts: Cohort[] }> {
  const same = await sequelize().query<{ id: number }>(
    `SELECT id FROM practicals WHERE "courseId" = :courseId AND LOWER(TRIM(title)) = LOWER(TRIM(:title)) ORDER BY id`,
    { replacements: { courseId: practical.courseId, title: practical.title }, type: QueryTypes.SELECT },
  );
  const practicalIds = same.map((r) => Number(r.id));
  const all = (await Promise.all(practicalIds.map(cohortsOfPractical))).flat();
  return { practicalIds, cohorts: [...new Map(all.map((c) => [c.id, c])).values()] };
}

/** Cohorts the practical is set for, plus any that have submissions to it. */
export async function cohortsOfPractical(practicalId: number): Promise<Cohort[]> {
  const { Cohort } = models();
  // One index probe per cohort (submissions_practical_cohort_updated) rather than a pass over
  // every submission of the practical.
  const rows = await sequelize().query<{ id: number }>(
    `SELECT "cohortId" AS id FROM practical_cohorts WHERE "practicalId" = :p
     UNION SELECT c.id AS id FROM cohorts c WHERE EXISTS (SELECT 1 FROM submissions s WHERE s."practicalId" = :p AND s."cohortId" = c.id)`,
    { replacements: { p: practicalId }, type: QueryTypes.SELECT },
  );
  if (!rows.length) return [];
  return Cohort.findAll({
    where: { id: rows.map((r) => Number(r.id)) },
    order: [
      ['term', 'ASC'],
      ['name', 'ASC'],
    ],
  });
}

/**
 * Markers' names are shown to course managers (`names`: every marker's, read by the caller); a TA
 * sees only their own name, others as "Marker n".
 */
export function markerLabels(actor: Actor, manages: boolean, markerIds: number[], names: Map<number, string>): Map<number, string> {
  const labels = new Map<number, string>();
  if (manages) {
    for (const id of markerIds) if (names.has(id)) labels.set(id, names.get(id)!);
  } else {
    let n = 0;
    for (const id of [...markerIds].sort((a, b) => a - b)) labels.set(id, id === actor.id ? `${actor.name} (you)` : `Marker ${++n}`);
  }
  for (const id of markerIds) if (!labels.has(id)) labels.set(id, `Marker #${id}`);
  return labels;
}

/** cohortsOfPractical for many practicals at once (one query for the links, one for the cohorts). */
export async function cohortsOfPracticals(practicalIds: number[]): Promise<Map<number, Cohort[]>> {
  const out = new Map<number, Cohort[]>(practicalIds.map((id) => [id, []]));
  if (!practicalIds.length) return out;
  const rows = await sequelize().query<{ practicalId: number; cohortId: number }>(
    `SELECT "practicalId", "cohortId" FROM practical_cohorts WHERE "practicalId" IN (:ids)
     UNION SELECT DISTINCT "practicalId", "cohortId" FROM submissions WHERE "practicalId" IN (:ids)`,
    { replacements: { ids: practicalIds }, type: QueryTypes.SELECT },
  );
  if (!rows.length) return out;
  const cohorts = await models().Cohort.findAll({
    where: { id: [...new Set(rows.map((r) => Number(r.cohortId)))] },
    order: [
      ['term', 'ASC'],
      ['name', 'ASC'],
    ],
  });
  for (const r of rows) {
    const c = cohorts.find((x) => x.id === Number(r.cohortId));
    const list = out.get(Number(r.practicalId));
    if (c && list && !list.includes(c)) list.push(c);
  }
  for (const list of out.values()) list.sort((a, b) => a.term.localeCompare(b.term) || a.name.localeCompare(b.name));
  return out;
}
