/**
 * Definitions every statistics figure follows, stated once so the page, the exports and the
 * tests agree.
 *
 * - A submission counts when it is not a draft, has been submitted and is the student's marked
 *   attempt (`isMarkedAttempt`): one per student and practical.
 * - On time: daysLate = 0. Late: daysLate > 0. Marked: status 'marked' or 'released'.
 *   Released: releasedAt set.
 * - Relative deviation: check_results.relativeDeviation (signed, (reported − expected)/|expected|),
 *   shown in percent. Rows with verdict 'not-checked' count towards n but not the distribution.
 * - Quartiles and median: linear interpolation between order statistics, R type 7 (the default of
 *   R and numpy; simple-statistics `quantileSorted`): h = (n − 1)p, value = x[⌊h⌋] + (h − ⌊h⌋)(x[⌊h⌋+1] − x[⌊h⌋]).
 * - Spread: population standard deviation, √(mean(x²) − mean(x)²), divided by n (not n − 1).
 * - Small groups: a group (the cohorts asked for, one cohort in a comparison, one marker) with
 *   fewer than MIN_GROUP students shows counts only: no shares, no distribution, no means.
 */
export const MIN_GROUP = 5;

/**
 * Histogram edges for relative deviation, in percent. Fixed and symmetric so cohorts and years
 * compare bucket by bucket; narrow near zero (rounding), wide outside (slips give factors such as
 * 4π² or 10⁴, which land in the outer buckets).
 */
export const HISTOGRAM_EDGES_PERCENT = [-10, -5, -2, -1, -0.5, -0.2, 0, 0.2, 0.5, 1, 2, 5, 10] as const;

export function bucketLabel(index: number): string {
  const e = HISTOGRAM_EDGES_PERCENT;
  const fmt = (v: number) => `${v > 0 ? '+' : v < 0 ? '−' : ''}${Math.abs(v)}`;
  if (index === 0) return `< ${fmt(e[0])} %`;
  if (index === e.length) return `≥ ${fmt(e[e.length - 1])} %`;
  return `${fmt(e[index - 1])} to ${fmt(e[index])} %`;
}

export const DEFAULT_MARKER_THRESHOLD = 10; // percentage points of the maximum mark

/**
 * Marks CSV for the institution's student records: one row per student on the roster of the
 * cohort(s), whether or not they submitted. Header, in this order:
 *
 *   student_number,name,email,cohort,practical,attempt,submitted_at,late_days,late_penalty_percent,
 *   <one column per quantity: mark_<key>_<species>>,<one per hand-marked rubric item: mark_<rubric key>>,
 *   total,max_total,status
 *
 * submitted_at is ISO 8601 (UTC). Quantity columns hold the awarded marks summed over both bases
 * (consistency and accuracy) of that quantity; total is the awarded total after any late penalty.
 * Students without a submission have status "not-submitted" and empty mark cells. Text cells that
 * start with = + - @ (or tab / carriage return) are prefixed with ' so spreadsheets do not run them.
 */
export const MARKS_CSV_LEADING = [
  'student_number',
  'name',
  'email',
  'cohort',
  'practical',
  'attempt',
  'submitted_at',
  'late_days',
  'late_penalty_percent',
] as const;
export const MARKS_CSV_TRAILING = ['total', 'max_total', 'status'] as const;

/** Statistics CSV: one row per quantity and basis for the scope asked for (header below). */
export const STATS_CSV_HEADER = [
  'scope',
  'quantity',
  'species',
  'basis',
  'n',
  'within',
  'partial',
  'outside',
  'not_checked',
  'min_percent',
  'q1_percent',
  'median_percent',
  'q3_percent',
  'max_percent',
  'mean_percent',
] as const;
