/** The statistics of one practical in one scope, shaped for the API, the page and the exports. */
import { z } from 'zod';
import { SLIPS } from '@/lib/grading';
import { validate } from '@/lib/http';
import { DEFAULT_MARKER_THRESHOLD, HISTOGRAM_EDGES_PERCENT, MIN_GROUP } from './definitions';
import { frequentSlips, markerConsistency, quantityStatistics, submissionCounts, type Counts, type MarkerRow, type QuantityStat, type SlipStat } from './queries';
import { cachedStatistics } from './cache';
import { markerLabels, type StatisticsScope } from './scope';

export function slipTitle(code: string): string {
  return (SLIPS as Record<string, { title: string } | undefined>)[code]?.title ?? code;
}

const thresholdQuery = z.object({
  threshold: z.string().regex(/^\d{1,3}(\.\d{1,2})?$/, 'threshold is percentage points, e.g. 10').transform(Number)
    .refine((v) => v >= 0 && v <= 100, 'threshold must be between 0 and 100.').optional(),
});

export function thresholdFrom(request: Request): number {
  const raw = new URL(request.url).searchParams.get('threshold') ?? undefined;
  return validate(thresholdQuery, { threshold: raw }).threshold ?? DEFAULT_MARKER_THRESHOLD;
}

/** A marker's row as shown: the query's figures without the raw sums and ids, under a label. */
export type MarkerView = Omit<MarkerRow, 'markerId' | 'sumMark' | 'markCount'> & { label: string; own: boolean };

export interface PracticalReport {
  practical: { id: number; title: string; courseId: number };
  scope: { cohortId: number | null; label: string; cohorts: { id: number; name: string; term: string; instrument: string | null }[] };
  minGroup: number;
  suppressed: boolean;
  counts: Omit<Counts, 'group'>;
  quantities: QuantityStat[];
  histogramEdgesPercent: readonly number[];
  slips: (SlipStat & { title: string; exampleHref: string })[];
  markers: { threshold: number; namesShown: boolean; rows: MarkerView[] };
}

export async function practicalReport(s: StatisticsScope, threshold: number): Promise<PracticalReport> {
  // Sequential: SQLite has one connection, so running them together gains nothing.
  const [countRows, quantities, slips, markers] = await cachedStatistics('report', s.scope, { threshold }, async () => [
    await submissionCounts(s.scope),
    await quantityStatistics(s.scope),
    await frequentSlips(s.scope),
    await markerConsistency(s.scope, threshold),
  ] as const);
  const counts = countRows[0] ?? { group: 'all', students: 0, submitted: 0, onTime: 0, late: 0, marked: 0, released: 0 };
  const suppressed = counts.students < MIN_GROUP;
  const labels = await markerLabels(s.actor, s.manages, markers.map((m) => m.markerId));
  const { group: _g, ...plainCounts } = counts;
  void _g;
  return {
    practical: { id: s.practical.id, title: s.practical.title, courseId: s.practical.courseId },
    scope: {
      cohortId: s.cohort?.id ?? null,
      label: s.cohort ? `${s.cohort.name}, ${s.cohort.term}` : 'All cohorts',
      cohorts: s.cohorts.map((c) => ({ id: c.id, name: c.name, term: c.term, instrument: c.instrument })),
    },
    minGroup: MIN_GROUP,
    suppressed,
    counts: plainCounts,
    // A small group shows counts only, whatever size each quantity has.
    quantities: suppressed ? quantities.map((q) => ({ group: q.group, key: q.key, species: q.species, basis: q.basis, n: q.n, students: q.students, suppressed: true })) : quantities,
    histogramEdgesPercent: HISTOGRAM_EDGES_PERCENT,
    slips: slips.map((sl) => ({ ...sl, title: slipTitle(sl.code), exampleHref: `/marking/${sl.exampleSubmissionId}` })),
    markers: {
      threshold,
      namesShown: s.manages,
      rows: markers.map((m) => ({
        label: labels.get(m.markerId)!, own: m.markerId === s.actor.id, submissions: m.submissions, suppressed: m.suppressed,
        meanMark: m.meanMark, sdMark: m.sdMark, meanDifference: m.meanDifference, sdDifference: m.sdDifference,
        overrides: m.overrides, moderations: m.moderations, moderationChanges: m.moderationChanges,
        othersMean: m.suppressed ? null : m.othersMean, flagged: m.flagged,
      })),
    },
  };
}
