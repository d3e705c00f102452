/**
 * The cohort statistics recomputed from scratch, straight from the source tables — the reference
 * the kept statistics (queries.ts over keep.ts) are tested against (statistics-kept.test.ts) and
 * that bench:stats checks them with at every size. The pages do not use it.
 *
 * Computed in the database with portable SQL (SQLite ≥ 3.25 and PostgreSQL):
 * COUNT / SUM / AVG / MIN / MAX with GROUP BY, histogram buckets with CASE, quartiles from
 * ROW_NUMBER / COUNT window functions. JavaScript only reshapes the aggregate rows (and
 * interpolates between the two order statistics the database returns for each quartile).
 */
import { QueryTypes } from 'sequelize';
import { sequelize } from '@/lib/db';
import { HISTOGRAM_EDGES_PERCENT, MIN_GROUP } from './definitions';

import type { Basis, Counts, GroupBy, MarkSummary, MarkerRow, QuantityStat, Scope, SlipStat } from './queries';

const groupExpr: Record<GroupBy, string> = {
  none: `'all'`,
  cohort: `CAST(s."cohortId" AS VARCHAR(20))`,
  instrument: `COALESCE(c.instrument, '(not recorded)')`,
};

/** WHERE clause selecting the counted submissions of a scope (see definitions.ts). */
const COUNTED = `s."practicalId" IN (:practicalIds) AND s."cohortId" IN (:cohortIds)
  AND s.status <> 'draft' AND s."submittedAt" IS NOT NULL AND s."isMarkedAttempt" = :yes`;

function q<T extends object>(sql: string, replacements: object): Promise<T[]> {
  return sequelize().query<T>(sql, { replacements: { yes: true, ...replacements }, type: QueryTypes.SELECT });
}

const num = (v: unknown): number => (v === null || v === undefined ? 0 : Number(v));
const numOrNull = (v: unknown): number | null => (v === null || v === undefined ? null : Number(v));

// ---------------------------------------------------------------------------------------------

export async function submissionCounts(scope: Scope, groupBy: GroupBy = 'none'): Promise<Counts[]> {
  // Grouped on the derived column g: PostgreSQL refuses GROUP BY on a bare constant ('all').
  const rows = await q<Record<string, unknown>>(
    `SELECT g, COUNT(DISTINCT "studentId") AS students, COUNT(*) AS submitted,
       SUM(CASE WHEN "daysLate" > 0 THEN 0 ELSE 1 END) AS "onTime",
       SUM(CASE WHEN "daysLate" > 0 THEN 1 ELSE 0 END) AS late,
       SUM(CASE WHEN status IN ('marked', 'released') THEN 1 ELSE 0 END) AS marked,
       SUM(CASE WHEN "releasedAt" IS NOT NULL THEN 1 ELSE 0 END) AS released
     FROM (
       SELECT ${groupExpr[groupBy]} AS g, s."studentId" AS "studentId", s."daysLate" AS "daysLate", s.status AS status, s."releasedAt" AS "releasedAt"
       FROM submissions s JOIN cohorts c ON c.id = s."cohortId"
       WHERE ${COUNTED}
     ) v
     GROUP BY g`,
    { ...scope },
  );
  return rows.map((r) => ({
    group: String(r.g),
    students: num(r.students),
    submitted: num(r.submitted),
    onTime: num(r.onTime),
    late: num(r.late),
    marked: num(r.marked),
    released: num(r.released),
  }));
}

// ---------------------------------------------------------------------------------------------

/** The check rows of the counted submissions, relative deviation x in percent (null when not checked). */
const checkRows = (groupBy: GroupBy) => `
  SELECT ${groupExpr[groupBy]} AS g, cr."key" AS qkey, cr.species AS species, cr.basis AS basis, cr.verdict AS verdict,
         s."studentId" AS "studentId",
         CASE WHEN cr.verdict <> 'not-checked' AND cr."relativeDeviation" IS NOT NULL THEN cr."relativeDeviation" * 100 END AS x
  FROM check_results cr
    JOIN submissions s ON s.id = cr."submissionId"
    ${groupBy === 'instrument' ? 'JOIN cohorts c ON c.id = s."cohortId"' : ''}
  WHERE ${COUNTED}`;

const edgeReplacements = Object.fromEntries(HISTOGRAM_EDGES_PERCENT.map((e, i) => [`e${i}`, e]));
/**
 * Cumulative histogram columns: ge<i> = number of checked rows with x ≥ edge i. One comparison per
 * edge and row (a bucket index per row, summed per bucket, would expand every edge per bucket).
 * Bucket b (= number of edges at or below x) then holds ge<b−1> − ge<b>, with ge<−1> = checked
 * and ge<last+1> = 0 — the same counts, because the edges increase.
 */
const cumulativeColumns = HISTOGRAM_EDGES_PERCENT.map((_, i) => `SUM(CASE WHEN x >= :e${i} THEN 1 ELSE 0 END) AS ge${i}`).join(
  ',\n         ',
);

const quantityKey = (g: string, k: string, sp: string, b: string) => `${g}\u0000${k}\u0000${sp}\u0000${b}`;

/** 1-based ranks of the order statistics R type 7 needs for p = 1/4, 1/2, 3/4 among n values. */
function quartileRanks(n: number): number[] {
  return [1, 2, 3].flatMap((k) => {
    const lower = Math.floor(((n - 1) * k) / 4) + 1;
    return lower < n ? [lower, lower + 1] : [lower];
  });
}

export async function quantityStatistics(scope: Scope, groupBy: GroupBy = 'none'): Promise<QuantityStat[]> {
  const base = checkRows(groupBy);
  // One pass for counts, verdicts, min/max/mean/mean of squares and the histogram.
  const summary = await q<Record<string, unknown>>(
    `SELECT g, qkey, species, basis, COUNT(*) AS n, COUNT(DISTINCT "studentId") AS students,
       SUM(CASE WHEN verdict = 'within' THEN 1 ELSE 0 END) AS within,
       SUM(CASE WHEN verdict = 'partial' THEN 1 ELSE 0 END) AS partial,
       SUM(CASE WHEN verdict = 'outside' THEN 1 ELSE 0 END) AS outside,
       SUM(CASE WHEN verdict NOT IN ('within', 'partial', 'outside') THEN 1 ELSE 0 END) AS "notChecked",
       COUNT(x) AS checked, MIN(x) AS min, MAX(x) AS max, AVG(x) AS mean, AVG(x * x) AS "meanSquare",
       ${cumulativeColumns}
     FROM (${base}) v GROUP BY g, qkey, species, basis ORDER BY g, qkey, species, basis`,
    { ...scope, ...edgeReplacements },
  );
  // Quartiles: one window pass over every quantity at once, keeping only the ranks some group needs
  // (R type 7: for p = 1/4, 1/2, 3/4 the ranks ⌊(n−1)p⌋+1 and +2; n known from the summary).
  const wanted = [...new Set(summary.filter((r) => num(r.students) >= MIN_GROUP).flatMap((r) => quartileRanks(num(r.checked))))];
  const ranks = wanted.length
    ? await q<Record<string, unknown>>(
        `SELECT g, qkey, species, basis, rn, x FROM (
           SELECT g, qkey, species, basis, x, ROW_NUMBER() OVER (PARTITION BY g, qkey, species, basis ORDER BY x) AS rn
           FROM (${base}) v WHERE x IS NOT NULL
         ) r
         WHERE rn IN (:wanted)`,
        { ...scope, wanted },
      )
    : [];

  const orderStats = new Map<string, Map<number, number>>();
  for (const r of ranks) {
    const k = quantityKey(String(r.g), String(r.qkey), String(r.species), String(r.basis));
    if (!orderStats.has(k)) orderStats.set(k, new Map());
    orderStats.get(k)!.set(num(r.rn), Number(r.x));
  }

  return summary.map((r) => {
    const k = quantityKey(String(r.g), String(r.qkey), String(r.species), String(r.basis));
    const n = num(r.n);
    const students = num(r.students);
    const stat: QuantityStat = {
      group: String(r.g),
      key: String(r.qkey),
      species: String(r.species),
      basis: String(r.basis) as Basis,
      n,
      students,
      suppressed: students < MIN_GROUP,
    };
    if (stat.suppressed) return stat;
    const within = num(r.within),
      partial = num(r.partial),
      outside = num(r.outside);
    const judged = within + partial + outside;
    stat.verdicts = { within, partial, outside, notChecked: num(r.notChecked) };
    stat.shares = judged
      ? { within: within / judged, partial: partial / judged, outside: outside / judged }
      : { within: 0, partial: 0, outside: 0 };
    stat.checked = num(r.checked);
    stat.mean = numOrNull(r.mean);
    // Population SD √(mean(x²) − mean(x)²), 0 when that is not positive (rounding) or nothing was checked.
    const meanSquare = numOrNull(r.meanSquare);
    const variance = stat.mean === null || meanSquare === null ? null : meanSquare - stat.mean * stat.mean;
    stat.sd = variance !== null && variance > 0 ? Math.sqrt(variance) : 0;
    const os = orderStats.get(k);
    stat.box =
      stat.checked > 0 && os
        ? {
            min: Number(r.min),
            q1: interpolate(os, stat.checked, 1, 4),
            median: interpolate(os, stat.checked, 1, 2),
            q3: interpolate(os, stat.checked, 3, 4),
            max: Number(r.max),
          }
        : null;
    const ge = (i: number) => (i < 0 ? stat.checked! : i >= HISTOGRAM_EDGES_PERCENT.length ? 0 : num(r[`ge${i}`]));
    stat.histogram = Array.from({ length: HISTOGRAM_EDGES_PERCENT.length + 1 }, (_, b) => ({
      bucket: b,
      count: ge(b - 1) - ge(b),
    }));
    return stat;
  });
}

/** R type 7 from the order statistics the database returned (ranks are 1-based). */
function interpolate(os: Map<number, number>, n: number, num: number, den: number): number {
  const scaled = (n - 1) * num; // h·den
  const lower = Math.floor(scaled / den) + 1;
  const fraction = (scaled % den) / den;
  const a = os.get(lower)!;
  if (fraction === 0 || lower >= n) return a;
  return a + fraction * (os.get(lower + 1)! - a);
}

// ---------------------------------------------------------------------------------------------

export async function frequentSlips(scope: Scope, limit = 10): Promise<SlipStat[]> {
  const [rows, keys] = await Promise.all([
    q<Record<string, unknown>>(
      `SELECT sf.code AS code, COUNT(*) AS n, COUNT(DISTINCT sf."submissionId") AS submissions, MIN(sf."submissionId") AS example
       FROM slip_findings sf JOIN submissions s ON s.id = sf."submissionId"
       WHERE ${COUNTED}
       GROUP BY sf.code ORDER BY COUNT(*) DESC, sf.code LIMIT :limit`,
      { ...scope, limit },
    ),
    q<Record<string, unknown>>(
      `SELECT sf.code AS code, sf."key" AS qkey, COUNT(*) AS n
       FROM slip_findings sf JOIN submissions s ON s.id = sf."submissionId"
       WHERE ${COUNTED}
       GROUP BY sf.code, sf."key" ORDER BY COUNT(*) DESC`,
      scope,
    ),
  ]);
  return rows.map((r) => ({
    code: String(r.code),
    count: num(r.n),
    submissions: num(r.submissions),
    exampleSubmissionId: num(r.example),
    keys: keys.filter((k) => k.code === r.code).map((k) => String(k.qkey)),
  }));
}

// ---------------------------------------------------------------------------------------------

export async function markerConsistency(scope: Scope, thresholdPoints: number): Promise<MarkerRow[]> {
  const sdOf = (e: string) =>
    `CASE WHEN AVG(${e} * ${e}) - AVG(${e}) * AVG(${e}) > 0 THEN SQRT(AVG(${e} * ${e}) - AVG(${e}) * AVG(${e})) ELSE 0 END`;
  const [marks, overrides, moderations] = await Promise.all([
    q<Record<string, unknown>>(
      `SELECT "markerId", COUNT(*) AS submissions, COUNT(f) AS "markCount", SUM(f) AS "sumMark", AVG(f) AS "meanMark", ${sdOf('f')} AS "sdMark",
              AVG(d) AS "meanDifference", ${sdOf('d')} AS "sdDifference"
       FROM (
         SELECT s."markedById" AS "markerId",
           CASE WHEN s."maxTotal" > 0 AND s."awardedTotal" IS NOT NULL THEN 100.0 * s."awardedTotal" / s."maxTotal" END AS f,
           CASE WHEN s."maxTotal" > 0 AND s."awardedTotal" IS NOT NULL AND s."proposedTotal" IS NOT NULL
                THEN 100.0 * (s."awardedTotal" - s."proposedTotal") / s."maxTotal" END AS d
         FROM submissions s
         WHERE ${COUNTED} AND s."markedById" IS NOT NULL AND s.status IN ('marked', 'released')
       ) m GROUP BY "markerId"`,
      scope,
    ),
    q<Record<string, unknown>>(
      `SELECT s."markedById" AS "markerId", COUNT(*) AS n
       FROM marks m JOIN submissions s ON s.id = m."submissionId"
       WHERE ${COUNTED} AND s."markedById" IS NOT NULL AND m.awarded IS NOT NULL AND m.proposed IS NOT NULL
         AND ABS(m.awarded - m.proposed) > 0.000001
       GROUP BY s."markedById"`,
      scope,
    ),
    q<Record<string, unknown>>(
      `SELECT mo."markerId" AS "markerId", COUNT(*) AS n, SUM(CASE WHEN mo.decision = 'changed' THEN 1 ELSE 0 END) AS changed
       FROM moderations mo JOIN submissions s ON s.id = mo."submissionId"
       WHERE ${COUNTED} AND mo."markerId" IS NOT NULL
       GROUP BY mo."markerId"`,
      scope,
    ),
  ]);
  const ov = new Map(overrides.map((r) => [num(r.markerId), num(r.n)]));
  const mo = new Map(moderations.map((r) => [num(r.markerId), { n: num(r.n), changed: num(r.changed) }]));
  const rows: MarkerRow[] = marks.map((r) => ({
    markerId: num(r.markerId),
    submissions: num(r.submissions),
    meanMark: numOrNull(r.meanMark),
    sdMark: numOrNull(r.sdMark),
    meanDifference: numOrNull(r.meanDifference),
    sdDifference: numOrNull(r.sdDifference),
    overrides: ov.get(num(r.markerId)) ?? 0,
    moderations: mo.get(num(r.markerId))?.n ?? 0,
    moderationChanges: mo.get(num(r.markerId))?.changed ?? 0,
    othersMean: null,
    flagged: false,
    suppressed: num(r.submissions) < MIN_GROUP,
    sumMark: num(r.sumMark),
    markCount: num(r.markCount),
  }));
  const totalSum = rows.reduce((a, r) => a + r.sumMark, 0);
  const totalCount = rows.reduce((a, r) => a + r.markCount, 0);
  for (const r of rows) {
    const othersCount = totalCount - r.markCount;
    r.othersMean = othersCount > 0 ? (totalSum - r.sumMark) / othersCount : null;
    r.flagged =
      !r.suppressed &&
      othersCount >= MIN_GROUP &&
      r.meanMark !== null &&
      r.othersMean !== null &&
      Math.abs(r.meanMark - r.othersMean) > thresholdPoints;
    if (r.suppressed) {
      r.meanMark = r.sdMark = r.meanDifference = r.sdDifference = null;
    }
  }
  return rows;
}

// ---------------------------------------------------------------------------------------------

/** Mean and population SD of awarded / max (percent) per group, over marked counted submissions. */
export async function markSummary(scope: Scope, groupBy: GroupBy): Promise<MarkSummary[]> {
  const rows = await q<Record<string, unknown>>(
    `SELECT g, COUNT(DISTINCT "studentId") AS students, COUNT(f) AS marked, AVG(f) AS mean,
       CASE WHEN AVG(f * f) - AVG(f) * AVG(f) > 0 THEN SQRT(AVG(f * f) - AVG(f) * AVG(f)) ELSE 0 END AS sd
     FROM (
       SELECT ${groupExpr[groupBy]} AS g, s."studentId" AS "studentId",
         CASE WHEN s.status IN ('marked', 'released') AND s."maxTotal" > 0 AND s."awardedTotal" IS NOT NULL
              THEN 100.0 * s."awardedTotal" / s."maxTotal" END AS f
       FROM submissions s JOIN cohorts c ON c.id = s."cohortId"
       WHERE ${COUNTED}
     ) m GROUP BY g`,
    scope,
  );
  return rows.map((r) => ({
    group: String(r.g),
    students: num(r.students),
    marked: num(r.marked),
    meanMark: numOrNull(r.mean),
    sdMark: numOrNull(r.sd),
  }));
}
