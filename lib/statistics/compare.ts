/**
 * The same figures side by side for every cohort (or instrument) that ran a practical of the same
 * title in the same course: this year against last, bench against bench.
 */
import { QueryTypes } from 'sequelize';
import { actorFromRequest, can } from '@/lib/authz';
import { sequelize } from '@/lib/db';
import { HttpError } from '@/lib/http';
import { models } from '@/models';
import { MIN_GROUP } from './definitions';
import { markSummary, quantityStatistics, submissionCounts, type Counts, type GroupBy, type QuantityStat } from './queries';
import { cachedStatistics } from './cache';
import { cohortsOfPractical, managesCourse } from './scope';

export interface ComparisonGroup {
  group: string;
  label: string;
  term: string | null;
  instrument: string | null;
  counts: Omit<Counts, 'group'>;
  suppressed: boolean;
  meanMark: number | null;
  sdMark: number | null;
  quantities: QuantityStat[];
}

export interface Comparison {
  title: string;
  by: Exclude<GroupBy, 'none'>;
  practicalIds: number[];
  groups: ComparisonGroup[];
}

export async function comparison(request: Request, practicalId: number, by: Exclude<GroupBy, 'none'>): Promise<Comparison> {
  const actor = await actorFromRequest(request);
  if (!actor) throw new HttpError(401, 'Sign in to continue.');
  const { Practical } = models();
  const practical = await Practical.findByPk(practicalId);
  if (!practical) throw new HttpError(404, 'No such practical.');
  const courseId = practical.courseId;

  const same = await sequelize().query<{ id: number }>(
    `SELECT id FROM practicals WHERE "courseId" = :courseId AND LOWER(TRIM(title)) = LOWER(TRIM(:title)) ORDER BY id`,
    { replacements: { courseId, title: practical.title }, type: QueryTypes.SELECT },
  );
  const practicalIds = same.map((r) => Number(r.id));
  const all = (await Promise.all(practicalIds.map(cohortsOfPractical))).flat();
  const unique = [...new Map(all.map((c) => [c.id, c])).values()];
  const manages = managesCourse(actor, courseId);
  // TAs compare only the cohorts they mark; leads and instructors every cohort of the course.
  const visible = manages ? unique : unique.filter((c) => can(actor, { kind: 'statistics', courseId, cohortId: c.id }));
  if (!manages && !visible.length) throw new HttpError(403, 'You do not have permission to see these statistics.');
  if (!can(actor, { kind: 'statistics', courseId, cohortId: manages ? undefined : visible[0].id })) {
    throw new HttpError(403, 'You do not have permission to see these statistics.');
  }
  // Instruments are compared only for staff who see every cohort (a TA's group would be one bench anyway).
  const scope = { practicalIds, cohortIds: visible.length ? visible.map((c) => c.id) : [-1] };
  const [counts, quantities, marks] = await cachedStatistics('compare', scope, { by }, async () => [
    await submissionCounts(scope, by), await quantityStatistics(scope, by), await markSummary(scope, by),
  ] as const);
  const cohortById = new Map(visible.map((c) => [String(c.id), c]));
  const groups: ComparisonGroup[] = counts.map(({ group, ...rest }) => {
    const cohort = by === 'cohort' ? cohortById.get(group) : undefined;
    const suppressed = rest.students < MIN_GROUP;
    const m = marks.find((x) => x.group === group);
    return {
      group,
      label: cohort ? `${cohort.name}, ${cohort.term}` : group,
      term: cohort?.term ?? null,
      instrument: cohort ? cohort.instrument : group,
      counts: rest,
      suppressed,
      meanMark: suppressed ? null : m?.meanMark ?? null,
      sdMark: suppressed ? null : m?.sdMark ?? null,
      quantities: quantities.filter((q) => q.group === group).map((q) =>
        suppressed || q.suppressed ? { group: q.group, key: q.key, species: q.species, basis: q.basis, n: q.n, students: q.students, suppressed: true } : q,
      ),
    };
  });
  groups.sort((a, b) => (a.term ?? '').localeCompare(b.term ?? '') || a.label.localeCompare(b.label));
  return { title: practical.title, by, practicalIds, groups };
}
