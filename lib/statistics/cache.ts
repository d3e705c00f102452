/**
 * A small in-process cache of the statistics aggregates, keyed by what was asked (function,
 * practicals, cohorts, options) and by a change stamp read from the database first:
 * row counts and the latest updatedAt of the submissions, check results, marks and moderations of
 * those practicals and cohorts (every aggregate is restricted to them), and of the cohorts
 * themselves (instrument, term). Any insert, update or delete of those rows
 * changes the stamp, so a stale entry is never served — also when another process wrote. The stamp
 * is read before the aggregates, so a write landing in between makes the next request recompute.
 * Set STATS_CACHE=off to disable (the benchmark reports both).
 */
import { QueryTypes } from 'sequelize';
import { sequelize } from '@/lib/db';
import type { Scope } from './queries';

const MAX_ENTRIES = 64;
const entries = new Map<string, { stamp: string; value: unknown }>();

export const statisticsCacheEnabled = () => process.env.STATS_CACHE !== 'off';

/** One row of counts and latest change times; each part reads an index only (migration 20261201000700). */
export async function changeStamp(scope: Scope): Promise<string> {
  const rows = await sequelize().query<Record<string, unknown>>(
    `SELECT
       (SELECT COUNT(*) FROM submissions s WHERE s."practicalId" IN (:practicalIds) AND s."cohortId" IN (:cohortIds)) AS s_n,
       (SELECT MAX(s."updatedAt") FROM submissions s WHERE s."practicalId" IN (:practicalIds) AND s."cohortId" IN (:cohortIds)) AS s_t,
       (SELECT COUNT(*) FROM check_results cr JOIN submissions s ON s.id = cr."submissionId" WHERE s."practicalId" IN (:practicalIds) AND s."cohortId" IN (:cohortIds)) AS c_n,
       (SELECT MAX(cr."updatedAt") FROM check_results cr JOIN submissions s ON s.id = cr."submissionId" WHERE s."practicalId" IN (:practicalIds) AND s."cohortId" IN (:cohortIds)) AS c_t,
       (SELECT COUNT(*) FROM slip_findings sf JOIN submissions s ON s.id = sf."submissionId" WHERE s."practicalId" IN (:practicalIds) AND s."cohortId" IN (:cohortIds)) AS f_n,
       (SELECT COUNT(*) FROM marks m JOIN submissions s ON s.id = m."submissionId" WHERE s."practicalId" IN (:practicalIds) AND s."cohortId" IN (:cohortIds)) AS m_n,
       (SELECT MAX(m."updatedAt") FROM marks m JOIN submissions s ON s.id = m."submissionId" WHERE s."practicalId" IN (:practicalIds) AND s."cohortId" IN (:cohortIds)) AS m_t,
       (SELECT COUNT(*) FROM moderations mo JOIN submissions s ON s.id = mo."submissionId" WHERE s."practicalId" IN (:practicalIds) AND s."cohortId" IN (:cohortIds)) AS o_n,
       (SELECT MAX(mo."updatedAt") FROM moderations mo JOIN submissions s ON s.id = mo."submissionId" WHERE s."practicalId" IN (:practicalIds) AND s."cohortId" IN (:cohortIds)) AS o_t,
       (SELECT MAX(c."updatedAt") FROM cohorts c WHERE c.id IN (:cohortIds)) AS h_t`,
    { replacements: { practicalIds: scope.practicalIds, cohortIds: scope.cohortIds }, type: QueryTypes.SELECT },
  );
  const r = rows[0] ?? {};
  return Object.keys(r).sort().map((k) => `${k}=${r[k] instanceof Date ? (r[k] as Date).toISOString() : String(r[k])}`).join(';');
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
