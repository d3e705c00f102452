/** CSV exports: the marks file for student records and the statistics file. Headers: definitions.ts. */
import Papa from 'papaparse';
import { QueryTypes } from 'sequelize';
import { sequelize } from '@/lib/db';
import { models } from '@/models';
import { MARKS_CSV_LEADING, MARKS_CSV_TRAILING, STATS_CSV_HEADER } from './definitions';
import type { PracticalReport } from './report';
import type { StatisticsScope } from './scope';

/**
 * Spreadsheets run a cell that starts with = + - @ (and tab / CR) as a formula (CSV injection,
 * OWASP): prefix text cells with an apostrophe. Numbers stay numbers, so −0.5 is not touched.
 */
export function neutralise(cell: unknown): string | number {
  if (cell === null || cell === undefined) return '';
  if (typeof cell === 'number') return Number.isFinite(cell) ? cell : '';
  const text = String(cell);
  return /^[=+\-@\t\r]/.test(text) ? `'${text}` : text;
}

export function toCsv(header: readonly string[], rows: unknown[][]): string {
  return Papa.unparse({ fields: [...header], data: rows.map((r) => r.map(neutralise)) }, { newline: '\r\n' });
}

export function csvResponse(body: string, filename: string): Response {
  return new Response(`\ufeff${body}\r\n`, {
    headers: {
      'Content-Type': 'text/csv; charset=utf-8',
      'Content-Disposition': `attachment; filename="${filename.replace(/[^A-Za-z0-9._-]+/g, '-')}"`,
      'Cache-Control': 'no-store',
    },
  });
}

const round = (v: number | null | undefined, digits = 4) => (v === null || v === undefined ? null : Number(v.toFixed(digits)));

export async function marksCsv(s: StatisticsScope): Promise<{ header: string[]; csv: string }> {
  const { QuantityDefinition } = models();
  const quantities = await QuantityDefinition.findAll({
    where: { practicalId: s.practical.id },
    order: [
      ['position', 'ASC'],
      ['id', 'ASC'],
    ],
  });
  const rubric = Array.isArray(s.practical.rubric) ? s.practical.rubric : [];
  const header = [
    ...MARKS_CSV_LEADING,
    ...quantities.map((q) => `mark_${q.key}_${q.species}`),
    ...rubric.map((r) => `mark_${r.key}`),
    ...MARKS_CSV_TRAILING,
  ];
  const students = await sequelize().query<Record<string, unknown>>(
    `SELECT u."studentNumber" AS "studentNumber", u.name AS name, u.email AS email, c.name AS cohort, c.term AS term,
            s.id AS sid, s.attempt AS attempt, s."submittedAt" AS "submittedAt", s."daysLate" AS "daysLate",
            s."latePenalty" AS "latePenalty", s."awardedTotal" AS "awardedTotal", s."maxTotal" AS "maxTotal", s.status AS status
     FROM course_memberships cm
       JOIN users u ON u.id = cm."userId"
       JOIN cohorts c ON c.id = cm."cohortId"
       LEFT JOIN submissions s ON s."studentId" = cm."userId" AND s."practicalId" = :practicalId
         AND s."isMarkedAttempt" = :yes AND s.status <> 'draft' AND s."submittedAt" IS NOT NULL
         AND NOT EXISTS (SELECT 1 FROM submissions s2 WHERE s2."studentId" = s."studentId" AND s2."practicalId" = s."practicalId"
           AND s2."isMarkedAttempt" = :yes AND s2.status <> 'draft' AND s2."submittedAt" IS NOT NULL AND s2.attempt > s.attempt)
     WHERE cm.role = 'student' AND cm."courseId" = :courseId AND cm."cohortId" IN (:cohortIds)
     ORDER BY c.term, c.name, u."studentNumber", u.name, u.id`,
    {
      replacements: { practicalId: s.practical.id, courseId: s.practical.courseId, cohortIds: s.scope.cohortIds, yes: true },
      type: QueryTypes.SELECT,
    },
  );
  const ids = students
    .map((r) => r.sid)
    .filter((v) => v !== null && v !== undefined)
    .map(Number);
  const marks = ids.length
    ? await sequelize().query<{ submissionId: number; itemKey: string; awarded: number | null }>(
        `SELECT "submissionId", "itemKey", awarded FROM marks WHERE "submissionId" IN (:ids)`,
        { replacements: { ids }, type: QueryTypes.SELECT },
      )
    : [];
  const bySubmission = new Map<number, Map<string, number>>();
  for (const m of marks) {
    if (m.awarded === null || m.awarded === undefined) continue;
    const sid = Number(m.submissionId);
    let cells = bySubmission.get(sid);
    if (!cells) bySubmission.set(sid, (cells = new Map()));
    const rub = rubric.find((r) => m.itemKey === `rubric:${r.key}` || m.itemKey === r.key);
    const qd = quantities.find((q) => m.itemKey === `${q.key}:${q.species}` || m.itemKey.startsWith(`${q.key}:${q.species}:`));
    const col = rub ? `mark_${rub.key}` : qd ? `mark_${qd.key}_${qd.species}` : null;
    if (col) cells.set(col, (cells.get(col) ?? 0) + Number(m.awarded));
  }
  const rows = students.map((r) => {
    const has = r.sid !== null && r.sid !== undefined;
    const cells = has ? bySubmission.get(Number(r.sid)) : undefined;
    const submittedAt = r.submittedAt ? new Date(r.submittedAt as string).toISOString() : '';
    return [
      r.studentNumber ?? '',
      r.name,
      r.email,
      `${r.cohort} (${r.term})`,
      s.practical.title,
      has ? Number(r.attempt) : '',
      submittedAt,
      has ? Number(r.daysLate) : '',
      has ? round(Number(r.latePenalty), 2) : '',
      ...header
        .slice(MARKS_CSV_LEADING.length, header.length - MARKS_CSV_TRAILING.length)
        .map((col) => (cells?.has(col) ? round(cells.get(col)!, 2) : '')),
      has && r.awardedTotal !== null ? round(Number(r.awardedTotal), 2) : '',
      has && r.maxTotal !== null ? round(Number(r.maxTotal), 2) : '',
      has ? String(r.status) : 'not-submitted',
    ];
  });
  return { header, csv: toCsv(header, rows) };
}

export function statisticsCsv(report: PracticalReport): string {
  const rows = report.quantities.map((q) => [
    report.scope.label,
    q.key,
    q.species,
    q.basis,
    q.n,
    q.verdicts?.within ?? '',
    q.verdicts?.partial ?? '',
    q.verdicts?.outside ?? '',
    q.verdicts?.notChecked ?? '',
    round(q.box?.min),
    round(q.box?.q1),
    round(q.box?.median),
    round(q.box?.q3),
    round(q.box?.max),
    round(q.mean ?? null),
  ]);
  return toCsv(STATS_CSV_HEADER, rows);
}
