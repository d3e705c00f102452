/**
 * Who may see which statistics. The practical (and cohort, when one is asked for) is looked up
 * first so the course comes from the database row, then the decision: leads and instructors see
 * every cohort of their course, TAs only cohorts they mark (they must name one, except in a
 * comparison, which shows them the cohorts they mark), students nothing. The route authenticates
 * (401) before calling these, so an anonymous caller learns nothing about which ids exist.
 */
import 'server-only';
import { HttpError } from '@/lib/http-error';
import { models } from '@/models';
import type { Cohort } from '@/models/cohort';
import type { Practical } from '@/models/practical';
import { QueryTypes } from 'sequelize';
import { sequelize } from '@/lib/db';
import {
  cohortsOfPractical,
  comparableCohorts,
  type StatisticsCohort,
  type StatisticsPractical,
  type StatisticsScope,
} from '@/lib/statistics/scope';
import { can, managesCourse, rolesIn, type Actor } from './decision';

const REFUSED = 'You do not have permission to see these statistics.';

async function practicalOr404(practicalId: number): Promise<Practical> {
  const practical = await models().Practical.findByPk(practicalId);
  if (!practical) throw new HttpError(404, 'No such practical.');
  return practical;
}

/**
 * The practical and (when asked for) the cohort, in one statement: this runs on every statistics
 * request, before anything else is read.
 */
async function practicalAndCohort(
  practicalId: number,
  cohortId: number | undefined,
): Promise<{ practical: StatisticsPractical | null; cohort: StatisticsCohort | null }> {
  const rows = await sequelize().query<{
    k: 'p' | 'c';
    id: number;
    courseId: number;
    name: string;
    term: string | null;
    instrument: string | null;
    rubric: unknown;
  }>(
    `SELECT 'p' AS k, id, "courseId", title AS name, NULL AS term, NULL AS instrument, rubric FROM practicals WHERE id = :practicalId
     UNION ALL
     SELECT 'c', id, "courseId", name, term, instrument, NULL FROM cohorts WHERE id = :cohortId`,
    { replacements: { practicalId, cohortId: cohortId ?? -1 }, type: QueryTypes.SELECT },
  );
  const p = rows.find((r) => r.k === 'p');
  const c = rows.find((r) => r.k === 'c');
  return {
    // SQLite hands JSON columns back as text, PostgreSQL as values.
    practical: p
      ? {
          id: Number(p.id),
          courseId: Number(p.courseId),
          title: String(p.name),
          rubric: typeof p.rubric === 'string' ? JSON.parse(p.rubric) : p.rubric,
        }
      : null,
    cohort: c
      ? {
          id: Number(c.id),
          courseId: Number(c.courseId),
          name: String(c.name),
          term: String(c.term),
          instrument: c.instrument === null ? null : String(c.instrument),
        }
      : null,
  };
}

/** The statistics of one practical, for one cohort or (cohortId undefined) every cohort. */
export async function authorizeStatistics(actor: Actor, practicalId: number, cohortId?: number): Promise<StatisticsScope> {
  const { practical, cohort } = await practicalAndCohort(practicalId, cohortId);
  if (!practical) throw new HttpError(404, 'No such practical.');
  if (cohortId !== undefined && (!cohort || cohort.courseId !== practical.courseId))
    throw new HttpError(404, 'No such cohort for this practical.');
  const manages = managesCourse(actor, practical.courseId);
  if (!can(actor, { kind: 'statistics', courseId: practical.courseId, cohortId: cohort?.id })) {
    const taWithoutCohort = !cohort && !manages && rolesIn(actor, practical.courseId).includes('ta');
    throw new HttpError(403, taWithoutCohort ? 'Choose one of the cohorts you mark.' : REFUSED);
  }
  const cohorts = cohort ? [cohort] : await cohortsOfPractical(practical.id);
  return {
    actor,
    practical,
    cohort,
    cohorts,
    manages,
    scope: { practicalIds: [practical.id], cohortIds: cohorts.length ? cohorts.map((c) => c.id) : [-1] },
  };
}

/** What a comparison may show: the practicals of the same title and the cohorts of them the actor may see (403 when none). */
export async function authorizeComparison(
  actor: Actor,
  practicalId: number,
): Promise<{ practical: Practical; practicalIds: number[]; cohorts: Cohort[] }> {
  const practical = await practicalOr404(practicalId);
  const courseId = practical.courseId;
  const { practicalIds, cohorts } = await comparableCohorts(practical);
  if (managesCourse(actor, courseId)) return { practical, practicalIds, cohorts };
  // TAs compare only the cohorts they mark; leads and instructors every cohort of the course.
  const visible = cohorts.filter((c) => can(actor, { kind: 'statistics', courseId, cohortId: c.id }));
  if (!visible.length) throw new HttpError(403, REFUSED);
  return { practical, practicalIds, cohorts: visible };
}
