/**
 * Who may see which statistics. The practical (and cohort, when one is asked for) is looked up
 * first so the course comes from the database row, then lib/authz decides:
 * leads and instructors see every cohort of their course, TAs only cohorts they mark (they must
 * name one), students nothing. Anonymous callers get 401 before any id is looked up.
 */
import { QueryTypes } from 'sequelize';
import { z } from 'zod';
import { actorFromRequest, can, rolesIn, type Actor } from '@/lib/authz';
import { sequelize } from '@/lib/db';
import { HttpError, validate } from '@/lib/http';
import { models } from '@/models';
import type { Practical } from '@/models/practical';
import type { Cohort } from '@/models/cohort';
import type { Scope } from './queries';

export interface StatisticsScope {
  actor: Actor;
  practical: Practical;
  /** The cohort asked for, or null for every cohort of the practical. */
  cohort: Cohort | null;
  cohorts: Cohort[];
  /** Lead, instructor or admin: may see markers' names and export marks. */
  manages: boolean;
  scope: Scope;
}

export function managesCourse(actor: Actor, courseId: number): boolean {
  const roles = rolesIn(actor, courseId);
  return actor.isAdmin || roles.includes('lead') || roles.includes('instructor');
}

const cohortQuery = z.object({
  cohortId: z.string().regex(/^\d{1,12}$/, 'cohortId must be a positive whole number.').transform(Number).optional(),
});

export async function statisticsScope(request: Request, practicalId: number): Promise<StatisticsScope> {
  const actor = await actorFromRequest(request);
  if (!actor) throw new HttpError(401, 'Sign in to continue.');
  const url = new URL(request.url);
  const { cohortId } = validate(cohortQuery, { cohortId: url.searchParams.get('cohortId') ?? undefined });

  const { Practical, Cohort } = models();
  const practical = await Practical.findByPk(practicalId);
  if (!practical) throw new HttpError(404, 'No such practical.');
  let cohort: Cohort | null = null;
  if (cohortId !== undefined) {
    cohort = await Cohort.findByPk(cohortId);
    if (!cohort || cohort.courseId !== practical.courseId) throw new HttpError(404, 'No such cohort for this practical.');
  }
  if (!can(actor, { kind: 'statistics', courseId: practical.courseId, cohortId: cohort?.id })) {
    throw new HttpError(403, cohort || managesCourse(actor, practical.courseId) || !rolesIn(actor, practical.courseId).includes('ta')
      ? 'You do not have permission to see these statistics.'
      : 'Choose one of the cohorts you mark.');
  }
  const cohorts = cohort ? [cohort] : await cohortsOfPractical(practical.id);
  return {
    actor, practical, cohort, cohorts, manages: managesCourse(actor, practical.courseId),
    scope: { practicalIds: [practical.id], cohortIds: cohorts.length ? cohorts.map((c) => c.id) : [-1] },
  };
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
  return Cohort.findAll({ where: { id: rows.map((r) => Number(r.id)) }, order: [['term', 'ASC'], ['name', 'ASC']] });
}

/** Markers' names are shown to course managers; a TA sees only their own name, others as "Marker n". */
export async function markerLabels(actor: Actor, manages: boolean, markerIds: number[]): Promise<Map<number, string>> {
  const { User } = models();
  const labels = new Map<number, string>();
  if (manages) {
    const users = markerIds.length ? await User.findAll({ where: { id: markerIds }, attributes: ['id', 'name'] }) : [];
    for (const u of users) labels.set(u.id, u.name);
  } else {
    const me = markerIds.includes(actor.id) ? await User.findByPk(actor.id, { attributes: ['id', 'name'] }) : null;
    let n = 0;
    for (const id of [...markerIds].sort((a, b) => a - b)) labels.set(id, id === actor.id ? `${me?.name ?? 'You'} (you)` : `Marker ${++n}`);
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
  const cohorts = await models().Cohort.findAll({ where: { id: [...new Set(rows.map((r) => Number(r.cohortId)))] }, order: [['term', 'ASC'], ['name', 'ASC']] });
  for (const r of rows) {
    const c = cohorts.find((x) => x.id === Number(r.cohortId));
    const list = out.get(Number(r.practicalId));
    if (c && list && !list.includes(c)) list.push(c);
  }
  for (const list of out.values()) list.sort((a, b) => a.term.localeCompare(b.term) || a.name.localeCompare(b.name));
  return out;
}
