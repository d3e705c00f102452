/**
 * The same figures side by side for every cohort (or instrument) that ran a practical of the same
 * title in the same course: this year against last, bench against bench.
 */
import type { Cohort } from '@/models/cohort';
import type { Practical } from '@/models/practical';
import { MIN_GROUP } from './definitions';
import { markSummary, quantityStatistics, submissionCounts, type Counts, type GroupBy, type QuantityStat } from './queries';
import { cachedStatistics } from './cache';

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

/** What to compare, as lib/authz/statistics.ts `authorizeComparison` allowed it. */
export interface ComparisonTarget {
  practical: Pick<Practical, 'title'>;
  practicalIds: number[];
  /** The cohorts the viewer may see. */
  cohorts: Cohort[];
}

export async function comparison(
  { practical, practicalIds, cohorts: visible }: ComparisonTarget,
  by: Exclude<GroupBy, 'none'>,
): Promise<Comparison> {
  // Instruments are compared only for staff who see every cohort (a TA's group would be one bench anyway).
  const scope = { practicalIds, cohortIds: visible.length ? visible.map((c) => c.id) : [-1] };
  const [counts, quantities, marks] = await cachedStatistics(
    'compare',
    scope,
    { by },
    async () => [await submissionCounts(scope, by), await quantityStatistics(scope, by), await markSummary(scope, by)] as const,
  );
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
      meanMark: suppressed ? null : (m?.meanMark ?? null),
      sdMark: suppressed ? null : (m?.sdMark ?? null),
      quantities: quantities
        .filter((q) => q.group === group)
        .map((q) =>
          suppressed || q.suppressed
            ? { group: q.group, key: q.key, species: q.species, basis: q.basis, n: q.n, students: q.students, suppressed: true }
            : q,
        ),
    };
  });
  groups.sort((a, b) => (a.term ?? '').localeCompare(b.term ?? '') || a.label.localeCompare(b.label));
  return { title: practical.title, by, practicalIds, groups };
}
