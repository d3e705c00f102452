/**
 * Cohort statistics, read from the kept aggregates (keep.ts): a row per practical and cohort
 * (and per quantity, slip or marker) in the scope, added up here. A page over 10,000 or 100,000
 * submissions reads a few hundred rows. Definitions in definitions.ts; the same figures
 * recomputed from the source tables are in recompute.ts (the reference for the tests).
 *
 * - Means and spreads come from exact sums (exact.ts): mean Σx/n, population variance
 *   (nΣx² − (Σx)²)/n², computed exactly and rounded once.
 * - Quartiles (R type 7), minimum and maximum are exact order statistics: the kept fine
 *   histogram (bins.ts) says which fine bin holds each wanted rank and its place in that bin,
 *   and only that bin's values are read, in order, from the index on statistics_values.
 * - "Students" counts people: the kept rows count each student once per practical and cohort,
 *   and the few students with counted submissions in two cells of one group (a student moved
 *   between cohorts, or one who took two practicals compared side by side) are found and
 *   subtracted once.
 */
import { QueryTypes } from 'sequelize';
import { sequelize } from '@/lib/db';
import { HISTOGRAM_EDGES_PERCENT, MIN_GROUP } from './definitions';
import { add, meanAndVariance, negate, parse, toNumber, ZERO, type Exact } from './exact';
import { coarseOfFine, parseHistogram, type FineHistogram } from './bins';
import { ensureKeptStatistics } from './keep';

export type Basis = 'consistency' | 'accuracy';

export interface Scope {
  practicalIds: number[];
  cohortIds: number[];
}

/** "Grouping" for the per-group variants: nothing, the cohort, or the cohort's instrument. */
export type GroupBy = 'none' | 'cohort' | 'instrument';

type Row = Record<string, unknown>;
const SEP = '\u0000';

async function q<T extends object = Row>(sql: string, replacements: object = {}): Promise<T[]> {
  return sequelize().query<T>(sql, { replacements: { yes: true, ...replacements }, type: QueryTypes.SELECT });
}

const num = (v: unknown): number => (v === null || v === undefined ? 0 : Number(v));

/** Rows of a kept table in the scope, each with the group it falls in. */
async function scoped(table: string, scope: Scope, groupBy: GroupBy): Promise<(Row & { g: string })[]> {
  await ensureKeptStatistics();
  const [rows, groupOf] = await Promise.all([
    q(`SELECT * FROM ${table} WHERE "practicalId" IN (:practicalIds) AND "cohortId" IN (:cohortIds)`, scope),
    groups(scope, groupBy),
  ]);
  return rows.map((r) => ({ ...r, g: groupOf(Number(r.cohortId)) }));
}

/** The group of a cohort: 'all', the cohort id, or its instrument ('(not recorded)' when none). */
async function groups(scope: Scope, groupBy: GroupBy): Promise<(cohortId: number) => string> {
  if (groupBy === 'none') return () => 'all';
  if (groupBy === 'cohort') return (c) => String(c);
  const rows = await q<{ id: number; instrument: string | null }>(`SELECT id, instrument FROM cohorts WHERE id IN (:cohortIds)`, scope);
  const instrument = new Map(rows.map((r) => [Number(r.id), r.instrument ?? '(not recorded)']));
  return (c) => instrument.get(c) ?? '(not recorded)';
}

/**
 * Students counted more than once by adding up cells: for each group, how many times too many,
 * overall and per quantity (key\0species\0basis). Only students with counted submissions in
 * more than one cell of the scope can be; usually there are none.
 */
async function studentOvercount(scope: Scope, groupBy: GroupBy): Promise<{ group: Map<string, number>; quantity: Map<string, number> }> {
  const group = new Map<string, number>();
  const quantity = new Map<string, number>();
  const candidates = new Set<number>(
    (
      await q<{ studentId: number }>(
        `SELECT "studentId" FROM statistics_submissions WHERE "practicalId" IN (:practicalIds) AND spans = :yes AND "cohortId" IN (:cohortIds)`,
        scope,
      )
    ).map((r) => Number(r.studentId)),
  );
  if (scope.practicalIds.length > 1) {
    // Side by side across practicals: a student who took two of them (a repeat year).
    for (const r of await q<{ studentId: number }>(
      `SELECT "studentId" FROM statistics_submissions WHERE "practicalId" IN (:practicalIds) AND "cohortId" IN (:cohortIds)
       GROUP BY "studentId" HAVING COUNT(DISTINCT "practicalId") > 1`,
      scope,
    ))
      candidates.add(Number(r.studentId));
  }
  if (!candidates.size) return { group, quantity };
  const subs = await q(
    `SELECT "submissionId", "practicalId", "cohortId", "studentId" FROM statistics_submissions
     WHERE "studentId" IN (:students) AND "practicalId" IN (:practicalIds) AND "cohortId" IN (:cohortIds)`,
    { ...scope, students: [...candidates] },
  );
  const values = subs.length
    ? await q(`SELECT DISTINCT "submissionId", key, species, basis FROM statistics_values WHERE "submissionId" IN (:ids)`, {
        ids: subs.map((s) => Number(s.submissionId)),
      })
    : [];
  const groupOf = await groups(scope, groupBy);
  const cellsIn = new Map<string, Set<string>>(); // student\0group → cells
  const qCellsIn = new Map<string, Set<string>>(); // student\0group\0quantity → cells
  const subById = new Map(subs.map((s) => [Number(s.submissionId), s]));
  for (const s of subs) {
    const k = [s.studentId, groupOf(Number(s.cohortId))].join(SEP);
    if (!cellsIn.has(k)) cellsIn.set(k, new Set());
    cellsIn.get(k)!.add(`${s.practicalId}|${s.cohortId}`);
  }
  for (const v of values) {
    const s = subById.get(Number(v.submissionId))!;
    const k = [s.studentId, groupOf(Number(s.cohortId)), v.key, v.species, v.basis].join(SEP);
    if (!qCellsIn.has(k)) qCellsIn.set(k, new Set());
    qCellsIn.get(k)!.add(`${s.practicalId}|${s.cohortId}`);
  }
  for (const [k, cells] of cellsIn) {
    const g = k.split(SEP)[1];
    if (cells.size > 1) group.set(g, (group.get(g) ?? 0) + cells.size - 1);
  }
  for (const [k, cells] of qCellsIn) {
    const [, g, ...rest] = k.split(SEP);
    const qk = [g, ...rest].join(SEP);
    if (cells.size > 1) quantity.set(qk, (quantity.get(qk) ?? 0) + cells.size - 1);
  }
  return { group, quantity };
}

// ---------------------------------------------------------------------------------------------

export interface Counts {
  group: string;
  students: number;
  submitted: number;
  onTime: number;
  late: number;
  marked: number;
  released: number;
}

interface GroupSum {
  students: number;
  submitted: number;
  late: number;
  marked: number;
  released: number;
  markCount: number;
  markSum: Exact;
  markSquares: Exact;
}

async function groupSums(scope: Scope, groupBy: GroupBy): Promise<Map<string, GroupSum>> {
  const [rows, over] = await Promise.all([scoped('statistics_groups', scope, groupBy), studentOvercount(scope, groupBy)]);
  const out = new Map<string, GroupSum>();
  for (const r of rows) {
    let s = out.get(r.g);
    if (!s)
      out.set(r.g, (s = { students: 0, submitted: 0, late: 0, marked: 0, released: 0, markCount: 0, markSum: ZERO, markSquares: ZERO }));
    s.students += num(r.students);
    s.submitted += num(r.submitted);
    s.late += num(r.late);
    s.marked += num(r.marked);
    s.released += num(r.released);
    s.markCount += num(r.markCount);
    s.markSum = add(s.markSum, parse(r.markSum as string));
    s.markSquares = add(s.markSquares, parse(r.markSquares as string));
  }
  for (const [g, extra] of over.group) if (out.has(g)) out.get(g)!.students -= extra;
  return out;
}

export async function submissionCounts(scope: Scope, groupBy: GroupBy = 'none'): Promise<Counts[]> {
  const sums = await groupSums(scope, groupBy);
  return [...sums.entries()].map(([group, s]) => ({
    group,
    students: s.students,
    submitted: s.submitted,
    onTime: s.submitted - s.late,
    late: s.late,
    marked: s.marked,
    released: s.released,
  }));
}

// ---------------------------------------------------------------------------------------------

export interface BoxPlot {
  min: number;
  q1: number;
  median: number;
  q3: number;
  max: number;
}

export interface QuantityStat {
  group: string;
  key: string;
  species: string;
  basis: Basis;
  /** Check results (one per counted submission that reported this quantity). */
  n: number;
  /** Students behind them; below MIN_GROUP only counts are given. */
  students: number;
  suppressed: boolean;
  verdicts?: { within: number; partial: number; outside: number; notChecked: number };
  shares?: { within: number; partial: number; outside: number };
  /** Relative deviation in percent, over checked rows. */
  checked?: number;
  mean?: number | null;
  sd?: number | null;
  box?: BoxPlot | null;
  /** Counts per bucket of relative deviation (HISTOGRAM_EDGES_PERCENT; bucketLabel names a bucket). */
  histogram?: { bucket: number; count: number }[];
}

interface QuantitySum {
  g: string;
  key: string;
  species: string;
  basis: string;
  cohorts: Set<number>;
  n: number;
  students: number;
  within: number;
  partial: number;
  outside: number;
  notChecked: number;
  checked: number;
  xSum: Exact;
  xSquares: Exact;
  bins: FineHistogram;
}

/** 1-based ranks of the order statistics R type 7 needs for p = 1/4, 1/2, 3/4 among n values, plus the extremes. */
function wantedRanks(n: number): number[] {
  const ranks = new Set([1, n]);
  for (const k of [1, 2, 3]) {
    const lower = Math.floor(((n - 1) * k) / 4) + 1;
    ranks.add(lower);
    if (lower < n) ranks.add(lower + 1);
  }
  return [...ranks].sort((a, b) => a - b);
}

/** R type 7 from the order statistics (ranks are 1-based). */
function interpolate(os: Map<number, number>, n: number, numerator: number, den: number): number {
  const scaled = (n - 1) * numerator; // h·den
  const lower = Math.floor(scaled / den) + 1;
  const fraction = (scaled % den) / den;
  const a = os.get(lower)!;
  if (fraction === 0 || lower >= n) return a;
  return a + fraction * (os.get(lower + 1)! - a);
}

/**
 * The order statistics wanted for each quantity: for each rank, its fine bin and place in the bin
 * from the kept histogram, then one ordered, limited read per bin (in as few statements as the
 * database allows).
 */
async function orderStatistics(
  scope: Scope,
  wanted: { sum: QuantitySum; ranks: number[] }[],
): Promise<Map<QuantitySum, Map<number, number>>> {
  type Read = { sum: QuantitySum; bin: number; offset: number; limit: number; ranks: { rank: number; at: number }[] };
  const reads: Read[] = [];
  for (const { sum, ranks } of wanted) {
    const bins = [...sum.bins.entries()].filter(([, c]) => c > 0).sort((a, b) => a[0] - b[0]);
    let below = 0;
    let i = 0;
    const byBin = new Map<number, { rank: number; at: number }[]>();
    for (const rank of ranks) {
      while (i < bins.length && below + bins[i][1] < rank) below += bins[i++][1];
      if (i >= bins.length) throw new Error(`kept histogram of ${sum.key} holds fewer than ${rank} values: rebuild the kept statistics`);
      const [bin] = bins[i];
      if (!byBin.has(bin)) byBin.set(bin, []);
      byBin.get(bin)!.push({ rank, at: rank - below - 1 });
    }
    for (const [bin, list] of byBin) {
      const first = Math.min(...list.map((r) => r.at));
      const last = Math.max(...list.map((r) => r.at));
      reads.push({ sum, bin, offset: first, limit: last - first + 1, ranks: list });
    }
  }
  const out = new Map<QuantitySum, Map<number, number>>();
  const s = sequelize();
  const practicals = scope.practicalIds.map((p) => Number(p)).join(', ');
  // SQLite allows 500 terms in one compound SELECT.
  for (let start = 0; start < reads.length; start += 400) {
    const part = reads.slice(start, start + 400);
    const sql = part
      .map(
        (r, i) =>
          `SELECT ${i} AS t, x FROM (SELECT x FROM statistics_values WHERE "practicalId" IN (${practicals}) AND key = ${s.escape(r.sum.key)}` +
          ` AND species = ${s.escape(r.sum.species)} AND basis = ${s.escape(r.sum.basis)} AND bin = ${Number(r.bin)}` +
          ` AND "cohortId" IN (${[...r.sum.cohorts].map(Number).join(', ')}) ORDER BY x LIMIT ${Number(r.limit)} OFFSET ${Number(r.offset)}) q${i}`,
      )
      .join(' UNION ALL ');
    const rows = await s.query<{ t: number; x: number }>(sql, { type: QueryTypes.SELECT });
    const got = new Map<number, number[]>();
    for (const row of rows) {
      const t = Number(row.t);
      if (!got.has(t)) got.set(t, []);
      got.get(t)!.push(Number(row.x));
    }
    part.forEach((r, i) => {
      const xs = (got.get(i) ?? []).sort((a, b) => a - b);
      if (xs.length !== r.limit)
        throw new Error(`kept values of ${r.sum.key} do not match the kept histogram: rebuild the kept statistics`);
      if (!out.has(r.sum)) out.set(r.sum, new Map());
      for (const { rank, at } of r.ranks) out.get(r.sum)!.set(rank, xs[at - r.offset]);
    });
  }
  return out;
}

export async function quantityStatistics(scope: Scope, groupBy: GroupBy = 'none'): Promise<QuantityStat[]> {
  const [rows, over] = await Promise.all([scoped('statistics_quantities', scope, groupBy), studentOvercount(scope, groupBy)]);
  const sums = new Map<string, QuantitySum>();
  for (const r of rows) {
    const k = [r.g, r.key, r.species, r.basis].join(SEP);
    let s = sums.get(k);
    if (!s) {
      s = {
        g: r.g,
        key: String(r.key),
        species: String(r.species),
        basis: String(r.basis),
        cohorts: new Set(),
        n: 0,
        students: 0,
        within: 0,
        partial: 0,
        outside: 0,
        notChecked: 0,
        checked: 0,
        xSum: ZERO,
        xSquares: ZERO,
        bins: new Map(),
      };
      sums.set(k, s);
    }
    s.cohorts.add(Number(r.cohortId));
    s.n += num(r.n);
    s.students += num(r.students);
    s.within += num(r.within);
    s.partial += num(r.partial);
    s.outside += num(r.outside);
    s.notChecked += num(r.notChecked);
    s.checked += num(r.checked);
    s.xSum = add(s.xSum, parse(r.xSum as string));
    s.xSquares = add(s.xSquares, parse(r.xSquares as string));
    parseHistogram(r.bins as string, s.bins);
  }
  for (const [k, extra] of over.quantity) if (sums.has(k)) sums.get(k)!.students -= extra;
  // In code-unit order of group, quantity, species, basis (the same on every database).
  const ordered = [...sums.entries()].sort((a, b) => (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0)).map(([, s]) => s);
  const shown = ordered.filter((s) => s.students >= MIN_GROUP && s.checked > 0);
  const order = await orderStatistics(
    scope,
    shown.map((sum) => ({ sum, ranks: wantedRanks(sum.checked) })),
  );

  return ordered.map((s) => {
    const stat: QuantityStat = {
      group: s.g,
      key: s.key,
      species: s.species,
      basis: s.basis as Basis,
      n: s.n,
      students: s.students,
      suppressed: s.students < MIN_GROUP,
    };
    if (stat.suppressed) return stat;
    const judged = s.within + s.partial + s.outside;
    stat.verdicts = { within: s.within, partial: s.partial, outside: s.outside, notChecked: s.notChecked };
    stat.shares = judged
      ? { within: s.within / judged, partial: s.partial / judged, outside: s.outside / judged }
      : { within: 0, partial: 0, outside: 0 };
    stat.checked = s.checked;
    if (s.checked > 0) {
      const { mean, variance } = meanAndVariance(s.checked, s.xSum, s.xSquares);
      stat.mean = mean;
      stat.sd = variance > 0 ? Math.sqrt(variance) : 0;
    } else {
      stat.mean = null;
      stat.sd = 0;
    }
    const os = order.get(s);
    stat.box =
      s.checked > 0 && os
        ? {
            min: os.get(1)!,
            q1: interpolate(os, s.checked, 1, 4),
            median: interpolate(os, s.checked, 1, 2),
            q3: interpolate(os, s.checked, 3, 4),
            max: os.get(s.checked)!,
          }
        : null;
    const buckets = new Array<number>(HISTOGRAM_EDGES_PERCENT.length + 1).fill(0);
    for (const [bin, count] of s.bins) buckets[coarseOfFine[bin]] += count;
    stat.histogram = buckets.map((count, b) => ({ bucket: b, count }));
    return stat;
  });
}

// ---------------------------------------------------------------------------------------------

export interface SlipStat {
  code: string;
  count: number;
  submissions: number;
  exampleSubmissionId: number;
  keys: string[];
}

export async function frequentSlips(scope: Scope, limit = 10): Promise<SlipStat[]> {
  const [findings, codes] = await Promise.all([scoped('statistics_slips', scope, 'none'), scoped('statistics_slip_codes', scope, 'none')]);
  const byCode = new Map<string, { count: number; submissions: number; example: number | null; keys: Map<string, number> }>();
  const entry = (code: string) => {
    let e = byCode.get(code);
    if (!e) byCode.set(code, (e = { count: 0, submissions: 0, example: null, keys: new Map() }));
    return e;
  };
  for (const r of findings) {
    const e = entry(String(r.code));
    e.count += num(r.findings);
    e.keys.set(String(r.key), (e.keys.get(String(r.key)) ?? 0) + num(r.findings));
  }
  for (const r of codes) {
    const e = entry(String(r.code));
    e.submissions += num(r.submissions);
    if (r.example !== null && r.example !== undefined)
      e.example = e.example === null ? Number(r.example) : Math.min(e.example, Number(r.example));
  }
  const cmp = (a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0);
  return [...byCode.entries()]
    .filter(([, e]) => e.count > 0)
    .sort((a, b) => b[1].count - a[1].count || cmp(a[0], b[0]))
    .slice(0, limit)
    .map(([code, e]) => ({
      code,
      count: e.count,
      submissions: e.submissions,
      exampleSubmissionId: e.example ?? 0,
      keys: [...e.keys.entries()].sort((a, b) => b[1] - a[1] || cmp(a[0], b[0])).map(([k]) => k),
    }));
}

// ---------------------------------------------------------------------------------------------

export interface MarkerRow {
  markerId: number;
  submissions: number;
  /** Mean and population SD of awardedTotal / maxTotal, in percent. */
  meanMark: number | null;
  sdMark: number | null;
  /** Mean and population SD of (awardedTotal − proposedTotal) / maxTotal, in percentage points. */
  meanDifference: number | null;
  sdDifference: number | null;
  overrides: number;
  moderations: number;
  moderationChanges: number;
  /** Mean of the other markers' submissions pooled, and whether this marker differs by more than the threshold. */
  othersMean: number | null;
  flagged: boolean;
  suppressed: boolean;
  sumMark: number;
  markCount: number;
}

const spread = (n: number, sum: Exact, squares: Exact) => {
  if (!n) return { mean: null, sd: 0 };
  const { mean, variance } = meanAndVariance(n, sum, squares);
  return { mean, sd: variance > 0 ? Math.sqrt(variance) : 0 };
};

export async function markerConsistency(scope: Scope, thresholdPoints: number): Promise<MarkerRow[]> {
  const rows = await scoped('statistics_markers', scope, 'none');
  const by = new Map<
    number,
    {
      submissions: number;
      markCount: number;
      markSum: Exact;
      markSquares: Exact;
      differenceCount: number;
      differenceSum: Exact;
      differenceSquares: Exact;
      overrides: number;
      moderations: number;
      moderationChanges: number;
    }
  >();
  for (const r of rows) {
    const id = Number(r.markerId);
    let m = by.get(id);
    if (!m)
      by.set(
        id,
        (m = {
          submissions: 0,
          markCount: 0,
          markSum: ZERO,
          markSquares: ZERO,
          differenceCount: 0,
          differenceSum: ZERO,
          differenceSquares: ZERO,
          overrides: 0,
          moderations: 0,
          moderationChanges: 0,
        }),
      );
    m.submissions += num(r.submissions);
    m.markCount += num(r.markCount);
    m.markSum = add(m.markSum, parse(r.markSum as string));
    m.markSquares = add(m.markSquares, parse(r.markSquares as string));
    m.differenceCount += num(r.differenceCount);
    m.differenceSum = add(m.differenceSum, parse(r.differenceSum as string));
    m.differenceSquares = add(m.differenceSquares, parse(r.differenceSquares as string));
    m.overrides += num(r.overrides);
    m.moderations += num(r.moderations);
    m.moderationChanges += num(r.moderationChanges);
  }
  // Only markers with marked submissions have a row (overrides and moderations alone do not make one).
  const out: MarkerRow[] = [...by.entries()]
    .filter(([, m]) => m.submissions > 0)
    .sort((a, b) => a[0] - b[0])
    .map(([markerId, m]) => {
      const marks = spread(m.markCount, m.markSum, m.markSquares);
      const diffs = spread(m.differenceCount, m.differenceSum, m.differenceSquares);
      return {
        markerId,
        submissions: m.submissions,
        meanMark: marks.mean,
        sdMark: marks.sd,
        meanDifference: diffs.mean,
        sdDifference: diffs.sd,
        overrides: m.overrides,
        moderations: m.moderations,
        moderationChanges: m.moderationChanges,
        othersMean: null,
        flagged: false,
        suppressed: m.submissions < MIN_GROUP,
        sumMark: toNumber(m.markSum),
        markCount: m.markCount,
      };
    });
  const totalSum = [...by.values()].filter((m) => m.submissions > 0).reduce((a, m) => add(a, m.markSum), ZERO);
  const totalCount = out.reduce((a, r) => a + r.markCount, 0);
  for (const r of out) {
    const othersCount = totalCount - r.markCount;
    const mine = by.get(r.markerId)!;
    r.othersMean = othersCount > 0 ? toNumber(add(totalSum, negate(mine.markSum))) / othersCount : null;
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
  return out;
}

// ---------------------------------------------------------------------------------------------

export interface MarkSummary {
  group: string;
  students: number;
  marked: number;
  meanMark: number | null;
  sdMark: number | null;
}

/** Mean and population SD of awarded / max (percent) per group, over marked counted submissions. */
export async function markSummary(scope: Scope, groupBy: GroupBy): Promise<MarkSummary[]> {
  const sums = await groupSums(scope, groupBy);
  return [...sums.entries()].map(([group, s]) => {
    const { mean, sd } = spread(s.markCount, s.markSum, s.markSquares);
    return { group, students: s.students, marked: s.markCount, meanMark: mean, sdMark: sd };
  });
}
