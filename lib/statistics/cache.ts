/**
 * A small in-process cache of the statistics, keyed by what was asked (function, practicals,
 * cohorts, options) and by a change stamp read from the database first: the change tokens of
 * the kept statistics of those practicals and cohorts, and the cohorts' own latest change
 * (instrument, term). Any change to the kept figures renews a token in the same transaction, so
 * a stale entry is never served — also when another process wrote. The stamp is read before the
 * aggregates, so a write landing in between makes the next request recompute.
 * Set STATS_CACHE=off to disable (the benchmark reports both).
 */
import { QueryTypes } from 'sequelize';
import { sequelize } from '@/lib/db';
import type { Scope } from './queries';

const MAX_ENTRIES = 64;
const entries = new Map<string, { stamp: string; value: unknown }>();

export const statisticsCacheEnabled = () => process.env.STATS_CACHE !== 'off';

/**
 * The change tokens of the kept statistics of every practical and cohort in the scope (a new random
 * token whenever anything kept for that cell changes, lib/statistics/keep.ts) and the latest
 * change to the cohorts themselves, in one statement: an indexed read of a row per cell.
 */
export async function changeStamp(scope: Scope): Promise<string> {
  const cells = await sequelize().query<Record<string, unknown>>(
    `SELECT "practicalId", "cohortId", "changeToken", (SELECT MAX("updatedAt") FROM cohorts WHERE id IN (:cohortIds)) AS "cohortsChanged"
     FROM statistics_groups WHERE "practicalId" IN (:practicalIds) AND "cohortId" IN (:cohortIds)
     UNION ALL SELECT 0, 0, '', (SELECT MAX("updatedAt") FROM cohorts WHERE id IN (:cohortIds))`,
    { replacements: { practicalIds: scope.practicalIds, cohortIds: scope.cohortIds }, type: QueryTypes.SELECT },
  );
  const cohorts = [{ t: cells[cells.length - 1]?.cohortsChanged }];
  const t = cohorts[0]?.t;
  return [
    ...cells
      .filter((r) => Number(r.practicalId) > 0)
      .map((r) => `${r.practicalId}/${r.cohortId}=${r.changeToken}`)
      .sort(),
    `cohorts=${t instanceof Date ? t.toISOString() : String(t)}`,
  ].join(';');
}

/** compute() unless the same question was answered at the same change stamp. */
export async function cachedStatistics<T>(what: string, scope: Scope, options: unknown, compute: () => Promise<T>): Promise<T> {
  if (!statisticsCacheEnabled()) return compute();
  const key = JSON.stringify([what, [...scope.practicalIds].sort((a, b) => a - b), [...scope.cohortIds].sort((a, b) => a - b), options]);
  const stamp = await changeStamp(scope);
  const hit = entries.get(key);
  if (hit && hit.stamp === stamp) {
    entries.delete(key); // most recently used goes last
    entries.set(key, hit);
    return hit.value as T;
  }
  const value = await compute();
  entries.set(key, { stamp, value });
  while (entries.size > MAX_ENTRIES) entries.delete(entries.keys().next().value!);
  return value;
}

/** For tests. */
export function clearStatisticsCache(): void {
  entries.clear();
}
