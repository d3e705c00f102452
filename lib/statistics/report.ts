/** The statistics of one practical in one scope, shaped for the API, the page and the exports. */
import { z } from 'zod';
import { QUANTITIES, SLIPS } from '@/lib/grading';
import { QueryTypes } from 'sequelize';
import { sequelize } from '@/lib/db';
import { validate } from '@/lib/http';
import { DEFAULT_MARKER_THRESHOLD, HISTOGRAM_EDGES_PERCENT, MIN_GROUP } from './definitions';
import {
  frequentSlips,
  markerConsistency,
  quantityStatistics,
  submissionCounts,
  type Counts,
  type MarkerRow,
  type QuantityStat,
  type SlipStat,
} from './queries';
import { cachedStatistics } from './cache';
import { markerLabels, type StatisticsScope } from './scope';

/** A quantity's name from its key ("forceConstant" → "Force constant k"). */
export function quantityName(key: string): string {
  return (QUANTITIES as Record<string, { label: string } | undefined>)[key]?.label ?? key;
}

/**
 * The names the report shows, in one read: people by id (markers), and "Student name, attempt n"
 * for each example submission.
 */
async function namesAndExamples(
  userIds: number[],
  exampleIds: number[],
): Promise<{ names: Map<number, string>; examples: Map<number, string> }> {
  const names = new Map<number, string>();
  const examples = new Map<number, string>();
  if (!userIds.length && !exampleIds.length) return { names, examples };
  const rows = await sequelize().query<{ k: 'u' | 'x'; id: number; name: string; attempt: number | null }>(
    `SELECT 'u' AS k, id, name, NULL AS attempt FROM users WHERE id IN (:userIds)
     UNION ALL
     SELECT 'x', s.id, u.name, s.attempt FROM submissions s JOIN users u ON u.id = s."studentId" WHERE s.id IN (:exampleIds)`,
    {
      replacements: { userIds: userIds.length ? userIds : [-1], exampleIds: exampleIds.length ? exampleIds : [-1] },
      type: QueryTypes.SELECT,
    },
  );
  for (const r of rows) {
    if (r.k === 'u') names.set(Number(r.id), String(r.name));
    else examples.set(Number(r.id), `${r.name}, attempt ${r.attempt}`);
  }
  return { names, examples };
}

export function slipTitle(code: string): string {
  return (SLIPS as Record<string, { title: string } | undefined>)[code]?.title ?? code;
}

const thresholdQuery = z.object({
  threshold: z
    .string()
    .regex(/^\d{1,3}(\.\d{1,2})?$/, 'threshold is percentage points, e.g. 10')
    .transform(Number)
    .refine((v) => v >= 0 && v <= 100, 'threshold must be between 0 and 100.')
    .optional(),
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
  /**
   * quantities: the names of the quantities the slip was found on (not their keys);
   * example: whose submission the example is, for the link text ("Talia Ivers, attempt 1").
   */
  slips: (SlipStat & { title: string; exampleHref: string; quantities: string[]; example: string })[];
  markers: { threshold: number; namesShown: boolean; rows: MarkerView[] };
}

export async function practicalReport(s: StatisticsScope, threshold: number): Promise<PracticalReport> {
  // Sequential: SQLite has one connection, so running them together gains nothing.
  const [countRows, quantities, slips, markers] = await cachedStatistics(
    'report',
    s.scope,
    { threshold },
    async () =>
      [
        await submissionCounts(s.scope),
        await quantityStatistics(s.scope),
        await frequentSlips(s.scope),
        await markerConsistency(s.scope, threshold),
      ] as const,
  );
  const counts = countRows[0] ?? { group: 'all', students: 0, submitted: 0, onTime: 0, late: 0, marked: 0, released: 0 };
  const suppressed = counts.students < MIN_GROUP;
  const markerIds = markers.map((m) => m.markerId);
  const { names, examples } = await namesAndExamples(s.manages ? markerIds : [], [...new Set(slips.map((sl) => sl.exampleSubmissionId))]);
  const labels = markerLabels(s.actor, s.manages, markerIds, names);
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
    quantities: suppressed
      ? quantities.map((q) => ({
          group: q.group,
          key: q.key,
          species: q.species,
          basis: q.basis,
          n: q.n,
          students: q.students,
          suppressed: true,
        }))
      : quantities,
    histogramEdgesPercent: HISTOGRAM_EDGES_PERCENT,
    slips: slips.map((sl) => ({
      ...sl,
      title: slipTitle(sl.code),
      exampleHref: `/marking/${sl.exampleSubmissionId}`,
      quantities: [...new Set(sl.keys.map(quantityName))],
      example: examples.get(sl.exampleSubmissionId) ?? `Submission ${sl.exampleSubmissionId}`,
    })),
    markers: {
      threshold,
      namesShown: s.manages,
      rows: markers.map((m) => ({
        label: labels.get(m.markerId)!,
        own: m.markerId === s.actor.id,
        submissions: m.submissions,
        suppressed: m.suppressed,
        meanMark: m.meanMark,
        sdMark: m.sdMark,
        meanDifference: m.meanDifference,
        sdDifference: m.sdDifference,
        overrides: m.overrides,
        moderations: m.moderations,
        moderationChanges: m.moderationChanges,
        othersMean: m.suppressed ? null : m.othersMean,
        flagged: m.flagged,
      })),
    },
  };
}
