/**
 * The marking queue: the marked attempts of the cohorts (or students) the actor marks, or of
 * every cohort of the courses they teach. Filtering, sorting and paging happen in SQL, over the
 * narrow columns a row shows (flags, verdict counts and slip codes are kept on the submission
 * when it is checked; the engine's whole result is never read here), with keyset pages: a page
 * continues after (or before) the sort value and id of a row, so page 400 costs what page 1 does.
 * Indexes: migration 20261202200100 (a practical's or a cohort's attempts in submission order).
 */
import { Op, QueryTypes, type WhereOptions } from 'sequelize';
import type { Actor } from '@/lib/authz';
import { sequelize } from '@/lib/db';
import { SLIPS } from '@/lib/grading';
import { HttpError } from '@/lib/http';
import { cohortName } from '@/lib/display';
import { models } from '@/models';
import type { QueueQuery } from '@/lib/schemas/marking';

const FLAG_COLUMN = {
  outside: 'flagOutside',
  slip: 'flagSlip',
  late: 'flagLate',
  duplicate: 'flagDuplicate',
  spectrum: 'flagSpectrumMismatch',
} as const;

/** Which submissions the actor may mark: everything, whole cohorts, or named students of a cohort (null: none at all). */
export async function markingCells(
  actor: Actor,
): Promise<{ all: boolean; cohorts: number[]; students: { cohortId: number; studentId: number }[] } | null> {
  if (actor.isAdmin) return { all: true, cohorts: [], students: [] };
  const managed = [...new Set(actor.memberships.filter((m) => m.role === 'instructor' || m.role === 'lead').map((m) => m.courseId))];
  const managedCohorts = managed.length
    ? (
        await sequelize().query<{ id: number }>('SELECT id FROM cohorts WHERE "courseId" IN (:managed)', {
          replacements: { managed },
          type: QueryTypes.SELECT,
        })
      ).map((c) => Number(c.id))
    : [];
  // actor.taDuties holds only the duties of courses the person is still a TA of (loadActor).
  const duties = actor.taDuties;
  const cohorts = [...new Set([...managedCohorts, ...duties.filter((d) => d.studentId === null).map((d) => d.cohortId)])];
  const students = duties.filter((d) => d.studentId !== null).map((d) => ({ cohortId: d.cohortId, studentId: d.studentId! }));
  if (!cohorts.length && !students.length) return null;
  return { all: false, cohorts, students };
}

/** The same, as a WHERE clause for the models (null: none at all). */
export async function markingScope(actor: Actor): Promise<WhereOptions | null> {
  const cells = await markingCells(actor);
  if (!cells) return null;
  if (cells.all) return {};
  const or: WhereOptions[] = [];
  if (cells.cohorts.length) or.push({ cohortId: { [Op.in]: cells.cohorts } });
  for (const d of cells.students) or.push({ cohortId: d.cohortId, studentId: d.studentId });
  return { [Op.or]: or };
}

export type QueueRow = {
  id: number;
  student: { id: number; name: string; email: string; studentNumber: string | null };
  practical: { id: number; title: string };
  cohort: { id: number; name: string };
  status: string;
  attempt: number;
  submittedAt: string | null;
  proposedTotal: number | null;
  awardedTotal: number | null;
  maxTotal: number | null;
  version: number;
  flags: { outside: boolean; slip: boolean; late: boolean; duplicate: boolean; spectrum: boolean };
  /** Verdict counts over the submission's check results, and its named slips. */
  summary: { within: number; partial: number; outside: number; notChecked: number; slips: { code: string; title: string }[] };
  delivery: string | null;
};

export type QueuePage = {
  rows: QueueRow[];
  /** Matching submissions, counted up to COUNT_LIMIT (totalExact false beyond: "2,000 or more"). */
  total: number;
  totalExact: boolean;
  page: number;
  pageSize: number;
  pages: number;
  /** Cursors for the next and previous pages (pass as `after` / `before`), null at either end. */
  next: string | null;
  prev: string | null;
};

/**
 * The queue counts its matching submissions up to here and says "or more" beyond: 40 pages of 50,
 * more than anyone pages through (filters narrow a longer queue). Each request pays for the rows
 * it counts, so a department-wide queue (50,000 rows at 100,000 submissions) must not be counted
 * whole on every page; the exact figures per cohort are on the statistics page.
 */
export const COUNT_LIMIT = 2_000;

const SORT_COLUMN: Record<QueueQuery['sort'], string> = {
  submittedAt: 's."submittedAt"',
  student: 'u.name',
  practical: 'p.title',
  status: 's.status',
  proposedTotal: 's."proposedTotal"',
  awardedTotal: 's."awardedTotal"',
};
const SORT_ALIAS: Record<QueueQuery['sort'], string> = {
  submittedAt: 'submittedAt',
  student: 'studentName',
  practical: 'practicalTitle',
  status: 'status',
  proposedTotal: 'proposedTotal',
  awardedTotal: 'awardedTotal',
};

type Cursor = { v: string | number | null; d?: 1; i: number };

function encodeCursor(value: unknown, id: number): string {
  const c: Cursor =
    value instanceof Date ? { v: value.toISOString(), d: 1, i: id } : { v: (value ?? null) as string | number | null, i: id };
  return Buffer.from(JSON.stringify(c)).toString('base64url');
}

function decodeCursor(text: string): { value: unknown; id: number } {
  try {
    const c = JSON.parse(Buffer.from(text, 'base64url').toString('utf8')) as Cursor;
    const okValue = c.v === null || typeof c.v === 'number' || (typeof c.v === 'string' && c.v.length <= 300);
    if (!okValue || !Number.isSafeInteger(c.i) || c.i <= 0 || (c.d && (typeof c.v !== 'string' || Number.isNaN(Date.parse(c.v)))))
      throw new Error('bad');
    return { value: c.d ? new Date(c.v as string) : c.v, id: c.i };
  } catch {
    throw new HttpError(400, 'The page link is not valid any more: go back to the first page of the queue.');
  }
}

/**
 * Rows strictly after (value, id) in the order (col asc|desc, id asc|desc). NULL sorts where the
 * database's own index puts it — smallest on SQLite, largest on PostgreSQL — so ORDER BY needs no
 * NULLS FIRST/LAST and an index in the sort column's order serves it (SQLite cannot use an index
 * for NULLS LAST, and would sort every row of the queue).
 */
function keysetAfter(
  col: string,
  ascending: boolean,
  idAscending: boolean,
  value: unknown,
  nullsLargest: boolean,
  replacements: Record<string, unknown>,
): string {
  replacements.kv = value;
  const idCmp = `s.id ${idAscending ? '>' : '<'} :ki`;
  const nullsAfter = ascending === nullsLargest; // in this direction, do NULLs come after every value?
  if (value === null) return nullsAfter ? `(${col} IS NULL AND ${idCmp})` : `(${col} IS NOT NULL OR (${col} IS NULL AND ${idCmp}))`;
  const beyond = `${col} ${ascending ? '>' : '<'} :kv`;
  return nullsAfter ? `(${beyond} OR ${col} IS NULL OR (${col} = :kv AND ${idCmp}))` : `(${beyond} OR (${col} = :kv AND ${idCmp}))`;
}

const slipTitle = (code: string) => (SLIPS as Record<string, { title: string } | undefined>)[code]?.title ?? code;

export async function queuePage(actor: Actor, q: QueueQuery): Promise<QueuePage> {
  const empty: QueuePage = { rows: [], total: 0, totalExact: true, page: 1, pageSize: q.pageSize, pages: 0, next: null, prev: null };
  const cells = await markingCells(actor);
  if (!cells) return empty;
  const replacements: Record<string, unknown> = { yes: true };
  const where: string[] = ['s."isMarkedAttempt" = :yes'];
  if (!cells.all) {
    const or: string[] = [];
    if (cells.cohorts.length) {
      replacements.scopeCohorts = cells.cohorts;
      or.push('s."cohortId" IN (:scopeCohorts)');
    }
    cells.students.forEach((d, i) => {
      replacements[`sc${i}`] = d.cohortId;
      replacements[`ss${i}`] = d.studentId;
      or.push(`(s."cohortId" = :sc${i} AND s."studentId" = :ss${i})`);
    });
    where.push(`(${or.join(' OR ')})`);
  }
  replacements.statuses = q.status ? [q.status] : ['submitted', 'marked', 'released', 'resubmission-requested'];
  where.push('s.status IN (:statuses)');
  if (q.practicalId) {
    replacements.practicalId = q.practicalId;
    where.push('s."practicalId" = :practicalId');
  }
  if (q.cohortId) {
    replacements.cohortId = q.cohortId;
    where.push('s."cohortId" = :cohortId');
  }
  if (q.flag) where.push(`s."${FLAG_COLUMN[q.flag]}" = :yes`);

  const col = SORT_COLUMN[q.sort];
  const nullsLargest = sequelize().getDialect() === 'postgres';
  const ascending = q.dir !== 'desc';
  const backwards = Boolean(q.before && !q.after);
  const cursor = q.after ?? q.before;
  const keyset = [...where];
  if (cursor) {
    const { value, id } = decodeCursor(cursor);
    replacements.ki = id;
    // Before a row: the rows after it in the reversed order, read in that order and turned round.
    keyset.push(keysetAfter(col, backwards ? !ascending : ascending, !backwards, value, nullsLargest, replacements));
  }
  const orderAsc = backwards ? !ascending : ascending;
  const order = `${col} ${orderAsc ? 'ASC' : 'DESC'}, s.id ${backwards ? 'DESC' : 'ASC'}`;
  const offset = !cursor && q.page > 1 ? (q.page - 1) * q.pageSize : 0;

  // Counting stops at the limit: keyset pages need no total, and a department-wide queue would
  // otherwise pay for reading every matching row on every page. The count rides on the rows'
  // statement (one uncorrelated subquery, evaluated once); an empty page counts on its own.
  const countSql = `SELECT COUNT(*) AS n FROM (SELECT 1 AS one FROM submissions s WHERE ${where.join(' AND ')} LIMIT ${COUNT_LIMIT + 1}) counted`;
  // The page's rows are chosen first (inner statement, by the index), then each of those few gets
  // its last release e-mail's state (email_outbox_submission).
  const outerOrder = `page."${SORT_ALIAS[q.sort]}" ${orderAsc ? 'ASC' : 'DESC'}, page.id ${backwards ? 'DESC' : 'ASC'}`;
  const rows = await sequelize().query<Record<string, unknown>>(
    `SELECT page.*, (SELECT o.status FROM email_outbox o WHERE o."submissionId" = page.id AND o."dedupeKey" LIKE 'release:%'
                     ORDER BY o.id DESC LIMIT 1) AS "delivery"
     FROM (SELECT s.id, s.status, s.attempt, s."submittedAt", s."proposedTotal", s."awardedTotal", s."maxTotal", s.version,
            s."flagOutside", s."flagSlip", s."flagLate", s."flagDuplicate", s."flagSpectrumMismatch",
            s."verdictsWithin", s."verdictsPartial", s."verdictsOutside", s."verdictsNotChecked", s."slipCodes",
            s."studentId", s."practicalId", s."cohortId", u.name AS "studentName", u.email AS "studentEmail", u."studentNumber" AS "studentNumber",
            p.title AS "practicalTitle", c.name AS "cohortName", c.term AS "cohortTerm", (${countSql}) AS "matching"
     FROM submissions s JOIN users u ON u.id = s."studentId" JOIN practicals p ON p.id = s."practicalId" JOIN cohorts c ON c.id = s."cohortId"
     WHERE ${keyset.join(' AND ')}
     ORDER BY ${order}
     LIMIT ${q.pageSize + 1}${offset ? ` OFFSET ${offset}` : ''}) page
     ORDER BY ${outerOrder}`,
    { replacements, type: QueryTypes.SELECT },
  );
  const matching = rows.length
    ? Number(rows[0].matching)
    : cursor || offset
      ? Number((await sequelize().query<{ n: number }>(countSql, { replacements, type: QueryTypes.SELECT }))[0]?.n ?? 0)
      : 0;
  const totalExact = matching <= COUNT_LIMIT;
  const total = Math.min(COUNT_LIMIT, matching);
  const more = rows.length > q.pageSize;
  const pageRows = rows.slice(0, q.pageSize);
  if (backwards) pageRows.reverse();

  const bool = (v: unknown) => v === true || v === 1 || v === '1';
  const numOrNull = (v: unknown) => (v === null || v === undefined ? null : Number(v));
  const out: QueueRow[] = pageRows.map((r) => {
    const id = Number(r.id);
    const submittedAt =
      r.submittedAt === null || r.submittedAt === undefined
        ? null
        : new Date(r.submittedAt instanceof Date ? r.submittedAt : String(r.submittedAt).replace(' ', 'T').replace(' ', ''));
    return {
      id,
      student: {
        id: Number(r.studentId),
        name: String(r.studentName),
        email: String(r.studentEmail),
        studentNumber: r.studentNumber === null || r.studentNumber === undefined ? null : String(r.studentNumber),
      },
      practical: { id: Number(r.practicalId), title: String(r.practicalTitle) },
      cohort: {
        id: Number(r.cohortId),
        name: cohortName({
          name: String(r.cohortName),
          term: r.cohortTerm === null || r.cohortTerm === undefined ? null : String(r.cohortTerm),
        }),
      },
      status: String(r.status),
      attempt: Number(r.attempt),
      submittedAt: submittedAt && !Number.isNaN(submittedAt.getTime()) ? submittedAt.toISOString() : null,
      proposedTotal: numOrNull(r.proposedTotal),
      awardedTotal: numOrNull(r.awardedTotal),
      maxTotal: numOrNull(r.maxTotal),
      version: Number(r.version),
      flags: {
        outside: bool(r.flagOutside),
        slip: bool(r.flagSlip),
        late: bool(r.flagLate),
        duplicate: bool(r.flagDuplicate),
        spectrum: bool(r.flagSpectrumMismatch),
      },
      summary: {
        within: Number(r.verdictsWithin),
        partial: Number(r.verdictsPartial),
        outside: Number(r.verdictsOutside),
        notChecked: Number(r.verdictsNotChecked),
        slips: String(r.slipCodes ?? '')
          .split(',')
          .filter(Boolean)
          .map((code) => ({ code, title: slipTitle(code) })),
      },
      delivery: r.delivery === null || r.delivery === undefined ? null : String(r.delivery),
    };
  });

  const sortValue = (r: Record<string, unknown>) => r[SORT_ALIAS[q.sort]];
  const first = pageRows[0];
  const last = pageRows[pageRows.length - 1];
  const atStart = backwards ? !more : !cursor && offset === 0;
  const atEnd = backwards ? false : !more;
  const pageNumber = Math.max(1, Math.min(q.page, Math.max(1, Math.ceil(total / q.pageSize))));
  return {
    rows: out,
    total,
    totalExact,
    page: atStart ? 1 : pageNumber,
    pageSize: q.pageSize,
    pages: Math.ceil(total / q.pageSize),
    next: !atEnd && last ? encodeCursor(sortValue(last), Number(last.id)) : null,
    prev: !atStart && first ? encodeCursor(sortValue(first), Number(first.id)) : null,
  };
}

/** Practicals and cohorts the actor can filter by. */
export async function queueFilters(actor: Actor) {
  const { Cohort, Practical, PracticalCohort } = models();
  const scope = await markingScope(actor);
  if (!scope) return { practicals: [], cohorts: [] };
  const cohortIds = new Set<number>();
  if (actor.isAdmin) (await Cohort.findAll({ attributes: ['id'] })).forEach((c) => cohortIds.add(c.id));
  else {
    const managed = actor.memberships.filter((m) => m.role === 'instructor' || m.role === 'lead').map((m) => m.courseId);
    if (managed.length) (await Cohort.findAll({ where: { courseId: managed }, attributes: ['id'] })).forEach((c) => cohortIds.add(c.id));
    actor.taDuties.forEach((d) => cohortIds.add(d.cohortId));
  }
  const cohorts = await Cohort.findAll({
    where: { id: [...cohortIds] },
    order: [
      ['term', 'DESC'],
      ['name', 'ASC'],
    ],
  });
  const links = await PracticalCohort.findAll({ where: { cohortId: [...cohortIds] }, attributes: ['practicalId'] });
  const practicals = await Practical.findAll({ where: { id: [...new Set(links.map((l) => l.practicalId))] }, order: [['title', 'ASC']] });
  return {
    practicals: practicals.map((p) => ({ id: p.id, title: p.title })),
    cohorts: cohorts.map((c) => ({ id: c.id, name: cohortName(c) })),
  };
}
