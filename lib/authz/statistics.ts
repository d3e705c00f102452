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
import { cohortsOfPractical, comparableCohorts, type StatisticsScope } from '@/lib/statistics/scope';
import { can, managesCourse, rolesIn, type Actor } from './decision';

const REFUSED = 'You do not have permission to see these statistics.';

async function practicalOr404(practicalId: number): Promise<Practical> {
  const practical = await models().Practical.findByPk(practicalId);
  if (!practical) throw new HttpError(404, 'No such practical.');
  return practical;
}

/** The statistics of one practical, for one cohort or (cohortId undefined) every cohort. */
export async function authorizeStatistics(actor: Actor, practicalId: number, cohortId?: number): Promise<StatisticsScope> {
  const practical = await practicalOr404(practicalId);
  let cohort: Cohort | null = null;
  if (cohortId !== undefined) {
    cohort = await models().Cohort.findByPk(cohortId);
    if (!cohort || cohort.courseId !== practical.courseId) throw new HttpError(404, 'No such cohort for this practical.');
  }
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
