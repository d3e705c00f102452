/**
 * Where a student takes a practical: the cohort through which they may write a submission to it,
 * read from their memberships and the practical's cohorts (never from ids the client sent).
 */
import 'server-only';
import { QueryTypes } from 'sequelize';
import { sequelize } from '@/lib/db';
import { models } from '@/models';
import type { Practical } from '@/models/practical';
import type { PracticalCohort } from '@/models/practical-cohort';
import type { Actor } from './decision';

/** The cohort through which a student takes a practical: their student membership in its course, if the practical is set for that cohort. */
export async function studentPlacement(actor: Actor, practical: Practical): Promise<PracticalCohort | null> {
  const cohortIds = actor.memberships
    .filter((m) => m.courseId === practical.courseId && m.role === 'student' && m.cohortId !== null)
    .map((m) => m.cohortId as number);
  if (!cohortIds.length) return null;
  return models().PracticalCohort.findOne({ where: { practicalId: practical.id, cohortId: cohortIds } });
}

/** What autosave needs to know about a practical for this student: its course, species and the student's cohort in it. */
export type AutosaveTarget = { practical: Pick<Practical, 'id' | 'courseId' | 'species'>; cohortId: number | null };

/**
 * studentPlacement for the autosave route, in one plain SELECT instead of two model queries:
 * autosave is the most frequent request of all (every few seconds per student with the form open).
 * Null when there is no such practical; cohortId null when it is not set for the student's cohort.
 */
export async function autosaveTarget(actor: Actor, practicalId: number): Promise<AutosaveTarget | null> {
  const cohortIds = actor.memberships.filter((m) => m.role === 'student' && m.cohortId !== null).map((m) => m.cohortId as number);
  const rows = await sequelize().query<{ id: number; courseId: number; species: string | string[]; cohortId: number | null }>(
    `SELECT p."id", p."courseId", p."species", pc."cohortId" FROM "practicals" p
     LEFT JOIN "practical_cohorts" pc ON pc."practicalId" = p."id" AND pc."cohortId" IN (:cohortIds)
     WHERE p."id" = :practicalId ORDER BY pc."id" LIMIT 1`,
    { replacements: { practicalId, cohortIds: cohortIds.length ? cohortIds : [-1] }, type: QueryTypes.SELECT },
  );
  const row = rows[0];
  if (!row) return null;
  const species = typeof row.species === 'string' ? (JSON.parse(row.species) as string[]) : row.species; // SQLite: text; PostgreSQL: parsed
  const courseId = Number(row.courseId);
  // A cohort of another course the student belongs to does not count.
  const inCourse =
    row.cohortId !== null &&
    actor.memberships.some((m) => m.courseId === courseId && m.role === 'student' && m.cohortId === Number(row.cohortId));
  return { practical: { id: Number(row.id), courseId, species }, cohortId: inCourse ? Number(row.cohortId) : null };
}
