/**
 * Kept statistics: the aggregates behind the statistics pages, kept up to date as submissions are
 * checked, marked, moderated, released, superseded or removed, so a page reads a few hundred
 * aggregate rows instead of every check result (tables: migration 20261202200000).
 *
 * How they stay right. What each counted submission contributes is kept beside the aggregates
 * (statistics_submissions, statistics_values, statistics_slip_findings: the "applied" rows).
 * Whenever a submission (or one of its check results, slip findings, marks or moderations)
 * changes, the student's counted submissions to that practical are read again; their
 * contribution now, minus what the applied rows say they contributed, is added to the
 * aggregates, and the applied rows are replaced. The student, not the submission, is the unit,
 * because "students" counts distinct people. Sums are exact (exact.ts), so the order of changes
 * does not matter and the kept figures equal a recomputation from scratch exactly
 * (tests/integration/statistics-kept.test.ts).
 *
 * When. Model hooks (keep-hooks.ts) note the changed submission; inside a transaction the work
 * runs once, just before COMMIT (lib/db beforeCommit), in that transaction, so the aggregates
 * commit or roll back with the change; outside one it runs at once in a transaction of its own.
 * Writes that bypass the models (raw SQL, ON DELETE CASCADE from a removed user) are not seen:
 * `npm run stats:rebuild` rebuilds everything from the check results.
 *
 * Concurrency. SQLite runs one writing transaction at a time. On PostgreSQL a transaction takes
 * an advisory lock per practical before reading the applied rows (and a rebuild takes them all),
 * so two instances never apply the same difference twice; the locks are taken at the very end
 * of a transaction, after all its other work, in practical order.
 */
import crypto from 'node:crypto';
import { QueryTypes, type Transaction } from 'sequelize';
import { beforeCommit, holdsWriterTurn, outsideWriterTurn, rootTransaction, sequelize } from '@/lib/db';
import { add, exactOf, isZero, negate, parse, serialise, ZERO, type Exact } from './exact';
import { fineBin, histogramText, parseHistogram, type FineHistogram } from './bins';
import { log } from '@/lib/log';

/**
 * Version of the kept tables' contents; statistics_meta.keptVersion below this means "rebuild"
 * (done when the app next starts, or by `npm run stats:rebuild`).
 *   1: the kept statistics as introduced.
 *   2: rebuilt once, because before it writes through some of the server's API routes (marks,
 *      releases) did not update them (lib/db/index.ts, processWide), so running databases drifted.
 */
export const KEPT_VERSION = 2;

const CHUNK = 500;
const SEP = '\u0000';

type Row = Record<string, unknown>;

const isPostgres = () => sequelize().getDialect() === 'postgres';
const sel = <T extends object = Row>(sql: string, replacements: object, transaction?: Transaction | null) =>
  sequelize().query<T>(sql, {
    replacements: { yes: true, ...replacements },
    type: QueryTypes.SELECT,
    transaction: transaction ?? undefined,
  });
const run = (sql: string, options: { replacements?: Record<string, unknown>; bind?: unknown[]; transaction?: Transaction | null }) =>
  sequelize().query(sql, { ...options, type: QueryTypes.RAW, transaction: options.transaction ?? undefined });

function chunks<T>(items: T[], size = CHUNK): T[][] {
  const out: T[][] = [];
  for (let i = 0; i < items.length; i += size) out.push(items.slice(i, i + size));
  return out;
}
const bool = (v: unknown) => v === true || v === 1 || v === '1' || v === 't' || v === 'true';
const numOrNull = (v: unknown): number | null => (v === null || v === undefined ? null : Number(v));

// ---------------------------------------------------------------------------------------------
// What one counted submission contributes.

export interface ValueRow {
  key: string;
  species: string;
  basis: string;
  verdict: string;
  x: number | null;
  bin: number | null;
}
export interface SlipRow {
  key: string;
  code: string;
}

export interface Contribution {
  submissionId: number;
  practicalId: number;
  cohortId: number;
  studentId: number;
  spans: boolean;
  late: boolean;
  marked: boolean;
  released: boolean;
  markedById: number | null;
  markPercent: number | null;
  differencePercent: number | null;
  overrides: number;
  moderations: string;
  values: ValueRow[];
  slips: SlipRow[];
}

const COUNTED = `s.status <> 'draft' AND s."submittedAt" IS NOT NULL AND s."isMarkedAttempt" = :yes`;
/** The same test as COUNTED, on a row read back (definitions.ts: not a draft, submitted, the marked attempt). */
const counted = (r: Row) => r.status !== 'draft' && r.submittedAt !== null && r.submittedAt !== undefined && bool(r.isMarkedAttempt);

const scalarSignature = (c: Contribution) =>
  JSON.stringify([
    c.practicalId,
    c.cohortId,
    c.studentId,
    c.spans,
    c.late,
    c.marked,
    c.released,
    c.markedById,
    c.markPercent,
    c.differencePercent,
    c.overrides,
    c.moderations,
  ]);
const valueOrder = (a: ValueRow, b: ValueRow) =>
  a.key.localeCompare(b.key) ||
  a.species.localeCompare(b.species) ||
  a.basis.localeCompare(b.basis) ||
  a.verdict.localeCompare(b.verdict) ||
  (a.x ?? -Infinity) - (b.x ?? -Infinity);
const valuesSignature = (c: Contribution) =>
  JSON.stringify([c.cohortId, [...c.values].sort(valueOrder).map((v) => [v.key, v.species, v.basis, v.verdict, v.x])]);
const slipsSignature = (c: Contribution) => JSON.stringify([c.cohortId, c.slips.map((s) => `${s.key}${SEP}${s.code}`).sort()]);

export function valueRow(r: { key: string; species: string; basis: string; verdict: string; relativeDeviation: number | null }): ValueRow {
  const x =
    r.verdict !== 'not-checked' && r.relativeDeviation !== null && r.relativeDeviation !== undefined
      ? Number(r.relativeDeviation) * 100
      : null;
  return { key: r.key, species: r.species, basis: r.basis, verdict: r.verdict, x, bin: x === null || Number.isNaN(x) ? null : fineBin(x) };
}

type Pair = { practicalId: number; studentId: number };
const pairKey = (p: Pair) => `${p.practicalId}|${p.studentId}`;

/** The contributions the students' counted submissions make now, read from the source tables. */
async function currentContributions(pairs: Pair[], t: Transaction): Promise<Contribution[]> {
  if (!pairs.length) return [];
  const wanted = new Set(pairs.map(pairKey));
  // All the students' attempts, found through the (practical, student, attempt) index, and the
  // counted ones picked here: asking SQL for them invites the statistics index, which would read
  // every counted submission of the practical to find a student's few.
  const subs = (
    await sel(
      `SELECT s.id, s."practicalId", s."cohortId", s."studentId", s.status, s."submittedAt", s."isMarkedAttempt", s."daysLate", s."releasedAt",
              s."awardedTotal", s."proposedTotal", s."maxTotal", s."markedById"
       FROM submissions s
       WHERE s."studentId" IN (:students) AND s."practicalId" IN (:practicals)`,
      { students: [...new Set(pairs.map((p) => p.studentId))], practicals: [...new Set(pairs.map((p) => p.practicalId))] },
      t,
    )
  ).filter((r) => wanted.has(`${r.practicalId}|${r.studentId}`) && counted(r));
  if (!subs.length) return [];
  const ids = subs.map((r) => Number(r.id));
  // One after another: a transaction has one connection (pg would queue them anyway).
  const values = await sel(
    `SELECT "submissionId", key, species, basis, verdict, "relativeDeviation" FROM check_results WHERE "submissionId" IN (:ids)`,
    { ids },
    t,
  );
  const slips = await sel(`SELECT "submissionId", key, code FROM slip_findings WHERE "submissionId" IN (:ids)`, { ids }, t);
  const overrides = await sel(
    `SELECT "submissionId", COUNT(*) AS n FROM marks
     WHERE "submissionId" IN (:ids) AND awarded IS NOT NULL AND proposed IS NOT NULL AND ABS(awarded - proposed) > 0.000001
     GROUP BY "submissionId"`,
    { ids },
    t,
  );
  const moderations = await sel(
    `SELECT "submissionId", "markerId", decision FROM moderations WHERE "submissionId" IN (:ids) AND "markerId" IS NOT NULL`,
    { ids },
    t,
  );
  const by = <T extends Row>(rows: T[]) => {
    const m = new Map<number, T[]>();
    for (const r of rows) {
      const k = Number(r.submissionId);
      const list = m.get(k);
      if (list) list.push(r);
      else m.set(k, [r]);
    }
    return m;
  };
  const valuesBy = by(values);
  const slipsBy = by(slips);
  const overridesBy = new Map(overrides.map((r) => [Number(r.submissionId), Number(r.n)]));
  const moderationsBy = by(moderations);
  const cohortsOfPair = new Map<string, Set<number>>();
  for (const r of subs) {
    const k = `${r.practicalId}|${r.studentId}`;
    if (!cohortsOfPair.has(k)) cohortsOfPair.set(k, new Set());
    cohortsOfPair.get(k)!.add(Number(r.cohortId));
  }
  return subs.map((r) => {
    const id = Number(r.id);
    const status = String(r.status);
    const marked = status === 'marked' || status === 'released';
    const awarded = numOrNull(r.awardedTotal);
    const proposed = numOrNull(r.proposedTotal);
    const max = numOrNull(r.maxTotal);
    return {
      submissionId: id,
      practicalId: Number(r.practicalId),
      cohortId: Number(r.cohortId),
      studentId: Number(r.studentId),
      spans: cohortsOfPair.get(`${r.practicalId}|${r.studentId}`)!.size > 1,
      late: Number(r.daysLate) > 0,
      marked,
      released: r.releasedAt !== null && r.releasedAt !== undefined,
      markedById: numOrNull(r.markedById),
      // The same arithmetic, in the same order, as the statistics always used (definitions.ts).
      markPercent: marked && max !== null && max > 0 && awarded !== null ? (100 * awarded) / max : null,
      differencePercent: max !== null && max > 0 && awarded !== null && proposed !== null ? (100 * (awarded - proposed)) / max : null,
      overrides: overridesBy.get(id) ?? 0,
      moderations: (moderationsBy.get(id) ?? [])
        .map((m) => `${Number(m.markerId)}:${m.decision === 'changed' ? 1 : 0}`)
        .sort()
        .join(','),
      values: (valuesBy.get(id) ?? []).map((v) =>
        valueRow({
          key: String(v.key),
          species: String(v.species),
          basis: String(v.basis),
          verdict: String(v.verdict),
          relativeDeviation: numOrNull(v.relativeDeviation),
        }),
      ),
      slips: (slipsBy.get(id) ?? []).map((s) => ({ key: String(s.key), code: String(s.code) })),
    };
  });
}

/** What the applied rows say the students' submissions contributed. */
async function appliedContributions(pairs: Pair[], t: Transaction): Promise<Contribution[]> {
  if (!pairs.length) return [];
  const wanted = new Set(pairs.map(pairKey));
  const subs = (
    await sel(
      `SELECT * FROM statistics_submissions WHERE "studentId" IN (:students) AND "practicalId" IN (:practicals)`,
      { students: [...new Set(pairs.map((p) => p.studentId))], practicals: [...new Set(pairs.map((p) => p.practicalId))] },
      t,
    )
  ).filter((r) => wanted.has(`${r.practicalId}|${r.studentId}`));
  if (!subs.length) return [];
  const ids = subs.map((r) => Number(r.submissionId));
  const values = await sel(
    `SELECT "submissionId", key, species, basis, verdict, x, bin FROM statistics_values WHERE "submissionId" IN (:ids)`,
    { ids },
    t,
  );
  const slips = await sel(`SELECT "submissionId", key, code FROM statistics_slip_findings WHERE "submissionId" IN (:ids)`, { ids }, t);
  const valuesBy = new Map<number, ValueRow[]>();
  for (const v of values) {
    const k = Number(v.submissionId);
    if (!valuesBy.has(k)) valuesBy.set(k, []);
    valuesBy.get(k)!.push({
      key: String(v.key),
      species: String(v.species),
      basis: String(v.basis),
      verdict: String(v.verdict),
      x: numOrNull(v.x),
      bin: numOrNull(v.bin),
    });
  }
  const slipsBy = new Map<number, SlipRow[]>();
  for (const s of slips) {
    const k = Number(s.submissionId);
    if (!slipsBy.has(k)) slipsBy.set(k, []);
    slipsBy.get(k)!.push({ key: String(s.key), code: String(s.code) });
  }
  return subs.map((r) => ({
    submissionId: Number(r.submissionId),
    practicalId: Number(r.practicalId),
    cohortId: Number(r.cohortId),
    studentId: Number(r.studentId),
    spans: bool(r.spans),
    late: bool(r.late),
    marked: bool(r.marked),
    released: bool(r.released),
    markedById: numOrNull(r.markedById),
    markPercent: numOrNull(r.markPercent),
    differencePercent: numOrNull(r.differencePercent),
    overrides: Number(r.overrides),
    moderations: String(r.moderations ?? ''),
    values: valuesBy.get(Number(r.submissionId)) ?? [],
    slips: slipsBy.get(Number(r.submissionId)) ?? [],
  }));
}

// ---------------------------------------------------------------------------------------------
// Differences to the aggregates.

interface GroupDelta {
  students: number;
  submitted: number;
  late: number;
  marked: number;
  released: number;
  markCount: number;
  markSum: Exact;
  markSquares: Exact;
}
interface QuantityDelta {
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
interface MarkerDelta {
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

export class Deltas {
  groups = new Map<string, GroupDelta>();
  quantities = new Map<string, QuantityDelta>();
  slips = new Map<string, number>();
  slipCodes = new Map<string, number>();
  markers = new Map<string, MarkerDelta>();
  /** Practical and cohort of anything that changed (their change token is renewed). */
  cells = new Set<string>();
  /** Slip codes whose example may have changed. */
  codes = new Set<string>();

  private group(cell: string): GroupDelta {
    let g = this.groups.get(cell);
    if (!g)
      this.groups.set(
        cell,
        (g = { students: 0, submitted: 0, late: 0, marked: 0, released: 0, markCount: 0, markSum: ZERO, markSquares: ZERO }),
      );
    return g;
  }
  private quantity(k: string): QuantityDelta {
    let q = this.quantities.get(k);
    if (!q)
      this.quantities.set(
        k,
        (q = {
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
        }),
      );
    return q;
  }
  private marker(k: string): MarkerDelta {
    let m = this.markers.get(k);
    if (!m) {
      m = {
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
      };
      this.markers.set(k, m);
    }
    return m;
  }

  /** Add (sign 1) or take away (sign −1) what one student's counted submissions to one practical contribute. */
  addStudent(subs: Contribution[], sign: 1 | -1): void {
    const cellsWithStudent = new Set<string>();
    const quantitiesWithStudent = new Set<string>();
    for (const s of subs) {
      const cell = `${s.practicalId}|${s.cohortId}`;
      cellsWithStudent.add(cell);
      const g = this.group(cell);
      g.submitted += sign;
      if (s.late) g.late += sign;
      if (s.marked) g.marked += sign;
      if (s.released) g.released += sign;
      if (s.markPercent !== null) {
        g.markCount += sign;
        g.markSum = add(g.markSum, signed(exactOf(s.markPercent), sign));
        g.markSquares = add(g.markSquares, signed(square(s.markPercent), sign));
      }
      for (const v of s.values) {
        const qk = [s.practicalId, s.cohortId, v.key, v.species, v.basis].join(SEP);
        quantitiesWithStudent.add(qk);
        const q = this.quantity(qk);
        q.n += sign;
        if (v.verdict === 'within') q.within += sign;
        else if (v.verdict === 'partial') q.partial += sign;
        else if (v.verdict === 'outside') q.outside += sign;
        else q.notChecked += sign;
        if (v.x !== null) {
          q.checked += sign;
          q.xSum = add(q.xSum, signed(exactOf(v.x), sign));
          q.xSquares = add(q.xSquares, signed(square(v.x), sign));
          if (v.bin !== null) q.bins.set(v.bin, (q.bins.get(v.bin) ?? 0) + sign);
        }
      }
      const codes = new Set<string>();
      for (const f of s.slips) {
        const sk = [s.practicalId, s.cohortId, f.code, f.key].join(SEP);
        this.slips.set(sk, (this.slips.get(sk) ?? 0) + sign);
        codes.add(f.code);
      }
      for (const code of codes) {
        const ck = [s.practicalId, s.cohortId, code].join(SEP);
        this.slipCodes.set(ck, (this.slipCodes.get(ck) ?? 0) + sign);
        this.codes.add(ck);
      }
      if (s.markedById !== null) {
        const m = this.marker([s.practicalId, s.cohortId, s.markedById].join(SEP));
        m.overrides += sign * s.overrides;
        if (s.marked) {
          m.submissions += sign;
          if (s.markPercent !== null) {
            m.markCount += sign;
            m.markSum = add(m.markSum, signed(exactOf(s.markPercent), sign));
            m.markSquares = add(m.markSquares, signed(square(s.markPercent), sign));
          }
          if (s.differencePercent !== null) {
            m.differenceCount += sign;
            m.differenceSum = add(m.differenceSum, signed(exactOf(s.differencePercent), sign));
            m.differenceSquares = add(m.differenceSquares, signed(square(s.differencePercent), sign));
          }
        }
      }
      for (const entry of s.moderations ? s.moderations.split(',') : []) {
        const [markerId, changed] = entry.split(':');
        const m = this.marker([s.practicalId, s.cohortId, markerId].join(SEP));
        m.moderations += sign;
        if (changed === '1') m.moderationChanges += sign;
      }
    }
    for (const cell of cellsWithStudent) this.group(cell).students += sign;
    for (const qk of quantitiesWithStudent) this.quantity(qk).students += sign;
  }

  /** Drop entries that came to nothing, and note the cells that changed. */
  settle(): void {
    const note = (k: string) => {
      const [p, c] = k.split(SEP);
      this.cells.add(`${p}|${c}`);
    };
    for (const [k, g] of this.groups) {
      if (!g.students && !g.submitted && !g.late && !g.marked && !g.released && !g.markCount && isZero(g.markSum) && isZero(g.markSquares))
        this.groups.delete(k);
      else this.cells.add(k);
    }
    for (const [k, q] of this.quantities) {
      for (const [b, c] of q.bins) if (c === 0) q.bins.delete(b);
      if (
        !q.n &&
        !q.students &&
        !q.within &&
        !q.partial &&
        !q.outside &&
        !q.notChecked &&
        !q.checked &&
        isZero(q.xSum) &&
        isZero(q.xSquares) &&
        !q.bins.size
      )
        this.quantities.delete(k);
      else note(k);
    }
    for (const [k, n] of this.slips)
      if (!n) this.slips.delete(k);
      else note(k);
    for (const [k, n] of this.slipCodes) if (!n) this.slipCodes.delete(k);
    for (const k of this.codes) note(k); // the example may change even when the counts do not
    for (const [k, m] of this.markers) {
      if (
        !m.submissions &&
        !m.markCount &&
        !m.differenceCount &&
        !m.overrides &&
        !m.moderations &&
        !m.moderationChanges &&
        isZero(m.markSum) &&
        isZero(m.markSquares) &&
        isZero(m.differenceSum) &&
        isZero(m.differenceSquares)
      )
        this.markers.delete(k);
      else note(k);
    }
  }

  get empty(): boolean {
    return !this.groups.size && !this.quantities.size && !this.slips.size && !this.slipCodes.size && !this.markers.size && !this.codes.size;
  }
}

const signed = (e: Exact, sign: 1 | -1) => (sign === 1 ? e : negate(e));
function square(x: number): Exact {
  if (!Number.isFinite(x)) return exactOf(Infinity);
  const e = exactOf(x);
  return { m: e.m * e.m, e: 2 * e.e, pinf: 0, ninf: 0 };
}

// ---------------------------------------------------------------------------------------------
// Writing.

function cellFilter(keys: Iterable<string>, sep = SEP) {
  const practicals = new Set<number>();
  const cohorts = new Set<number>();
  for (const k of keys) {
    const [p, c] = k.split(sep);
    practicals.add(Number(p));
    cohorts.add(Number(c));
  }
  return { practicals: [...practicals], cohorts: [...cohorts] };
}

/**
 * Multi-row INSERT with positional parameters, so doubles reach the database bit for bit (SQLite's
 * own text-to-double parsing is off by an ulp now and then). On SQLite the statement goes straight
 * to the transaction's connection: Sequelize binds by name, and SQLite looks every name up in a
 * list, which made a 500-row insert quadratic.
 */
async function insertRows(
  table: string,
  columns: string[],
  rows: unknown[][],
  t: Transaction,
  conflict?: { keys: string[]; update: string[] },
) {
  const sqlite = !isPostgres();
  const per = Math.max(1, Math.floor(30000 / columns.length));
  for (const part of chunks(rows, Math.min(per, CHUNK))) {
    const params: unknown[] = [];
    const tuples = part.map(
      (r) =>
        `(${r
          .map((v) => {
            params.push(v);
            return sqlite ? '?' : `$${params.length}`;
          })
          .join(', ')})`,
    );
    let sql = `INSERT INTO ${table} (${columns.map((c) => `"${c}"`).join(', ')}) VALUES ${tuples.join(', ')}`;
    if (conflict)
      sql += ` ON CONFLICT (${conflict.keys.map((c) => `"${c}"`).join(', ')}) DO UPDATE SET ${conflict.update.map((c) => `"${c}" = excluded."${c}"`).join(', ')}`;
    if (sqlite) {
      const connection = (
        t as unknown as { connection: { run: (sql: string, params: unknown[], cb: (err: Error | null) => void) => void } }
      ).connection;
      await new Promise<void>((resolve, reject) =>
        connection.run(
          sql,
          params.map((v) => (typeof v === 'boolean' ? (v ? 1 : 0) : v)),
          (err) => (err ? reject(err) : resolve()),
        ),
      );
    } else {
      await run(sql, { bind: params, transaction: t });
    }
  }
}

async function deleteIds(table: string, column: string, ids: number[], t: Transaction) {
  for (const part of chunks(ids))
    await run(`DELETE FROM ${table} WHERE "${column}" IN (:ids)`, { replacements: { ids: part }, transaction: t });
}

/** Replace the applied rows of submissions whose contribution changed. */
async function writeApplied(before: Contribution[], after: Contribution[], t: Transaction) {
  const old = new Map(before.map((c) => [c.submissionId, c]));
  const now = new Map(after.map((c) => [c.submissionId, c]));
  const scalars: number[] = [];
  const values: number[] = [];
  const slips: number[] = [];
  for (const id of new Set([...old.keys(), ...now.keys()])) {
    const a = old.get(id);
    const b = now.get(id);
    if (!a || !b || scalarSignature(a) !== scalarSignature(b)) scalars.push(id);
    if (!a || !b ? (a ?? b)!.values.length > 0 : valuesSignature(a) !== valuesSignature(b)) values.push(id);
    if (!a || !b ? (a ?? b)!.slips.length > 0 : slipsSignature(a) !== slipsSignature(b)) slips.push(id);
  }
  if (scalars.length) {
    await deleteIds(
      'statistics_submissions',
      'submissionId',
      scalars.filter((id) => old.has(id)),
      t,
    );
    const rows = scalars
      .filter((id) => now.has(id))
      .map((id) => {
        const c = now.get(id)!;
        return [
          c.submissionId,
          c.practicalId,
          c.cohortId,
          c.studentId,
          c.spans,
          c.late,
          c.marked,
          c.released,
          c.markedById,
          c.markPercent,
          c.differencePercent,
          c.overrides,
          c.moderations,
        ];
      });
    if (rows.length) {
      await insertRows(
        'statistics_submissions',
        [
          'submissionId',
          'practicalId',
          'cohortId',
          'studentId',
          'spans',
          'late',
          'marked',
          'released',
          'markedById',
          'markPercent',
          'differencePercent',
          'overrides',
          'moderations',
        ],
        rows,
        t,
      );
    }
  }
  if (values.length) {
    await deleteIds(
      'statistics_values',
      'submissionId',
      values.filter((id) => old.has(id)),
      t,
    );
    const rows = values
      .filter((id) => now.has(id))
      .flatMap((id) => {
        const c = now.get(id)!;
        return c.values.map((v) => [c.submissionId, c.practicalId, c.cohortId, v.key, v.species, v.basis, v.verdict, v.x, v.bin]);
      });
    if (rows.length)
      await insertRows(
        'statistics_values',
        ['submissionId', 'practicalId', 'cohortId', 'key', 'species', 'basis', 'verdict', 'x', 'bin'],
        rows,
        t,
      );
  }
  if (slips.length) {
    await deleteIds(
      'statistics_slip_findings',
      'submissionId',
      slips.filter((id) => old.has(id)),
      t,
    );
    const rows = slips
      .filter((id) => now.has(id))
      .flatMap((id) => {
        const c = now.get(id)!;
        return c.slips.map((s) => [c.submissionId, c.practicalId, c.cohortId, s.key, s.code]);
      });
    if (rows.length) await insertRows('statistics_slip_findings', ['submissionId', 'practicalId', 'cohortId', 'key', 'code'], rows, t);
  }
}

async function readKeyed(table: string, keys: string[], keyOf: (r: Row) => string, t: Transaction): Promise<Map<string, Row>> {
  const out = new Map<string, Row>();
  if (!keys.length) return out;
  const { practicals, cohorts } = cellFilter(keys);
  const want = new Set(keys);
  for (const r of await sel(
    `SELECT * FROM ${table} WHERE "practicalId" IN (:practicals) AND "cohortId" IN (:cohorts)`,
    { practicals, cohorts },
    t,
  )) {
    const k = keyOf(r);
    if (want.has(k)) out.set(k, r);
  }
  return out;
}

/** Add the differences to the aggregate rows: upsert what remains, delete what came to zero. */
async function applyDeltas(d: Deltas, t: Transaction) {
  await applyGroupDeltas(d, t);
  await applyQuantityDeltas(d, t);
  await applySlipDeltas(d, t);
  await applySlipCodeDeltas(d, t);
  await applyMarkerDeltas(d, t);
}

/** Groups: every changed cell gets a new change token, even when only its quantities changed. */
async function applyGroupDeltas(d: Deltas, t: Transaction) {
  const cellKeys = [...d.cells].map((c) => c.replace('|', SEP));
  const groups = await readKeyed('statistics_groups', cellKeys, (r) => [r.practicalId, r.cohortId].join(SEP), t);
  const groupRows: unknown[][] = [];
  const groupGone: number[] = [];
  for (const cell of d.cells) {
    const [p, c] = cell.split('|').map(Number);
    const k = [p, c].join(SEP);
    const old = groups.get(k);
    const delta = d.groups.get(cell);
    const v = {
      students: num(old?.students) + (delta?.students ?? 0),
      submitted: num(old?.submitted) + (delta?.submitted ?? 0),
      late: num(old?.late) + (delta?.late ?? 0),
      marked: num(old?.marked) + (delta?.marked ?? 0),
      released: num(old?.released) + (delta?.released ?? 0),
      markCount: num(old?.markCount) + (delta?.markCount ?? 0),
      markSum: add(parse(old?.markSum as string), delta?.markSum ?? ZERO),
      markSquares: add(parse(old?.markSquares as string), delta?.markSquares ?? ZERO),
    };
    if (!v.students && !v.submitted) {
      if (old) groupGone.push(Number(old.id));
      continue;
    }
    groupRows.push([
      p,
      c,
      v.students,
      v.submitted,
      v.late,
      v.marked,
      v.released,
      v.markCount,
      serialise(v.markSum),
      serialise(v.markSquares),
      crypto.randomBytes(8).toString('hex'),
    ]);
  }
  await deleteIds('statistics_groups', 'id', groupGone, t);
  if (groupRows.length) {
    const cols = [
      'practicalId',
      'cohortId',
      'students',
      'submitted',
      'late',
      'marked',
      'released',
      'markCount',
      'markSum',
      'markSquares',
      'changeToken',
    ];
    await insertRows('statistics_groups', cols, groupRows, t, { keys: ['practicalId', 'cohortId'], update: cols.slice(2) });
  }
}

/** Quantities: counts per verdict, exact sums and the fine histogram. */
async function applyQuantityDeltas(d: Deltas, t: Transaction) {
  const qKeys = [...d.quantities.keys()];
  const quantities = await readKeyed(
    'statistics_quantities',
    qKeys,
    (r) => [r.practicalId, r.cohortId, r.key, r.species, r.basis].join(SEP),
    t,
  );
  const qRows: unknown[][] = [];
  const qGone: number[] = [];
  for (const [k, delta] of d.quantities) {
    const old = quantities.get(k);
    const bins = parseHistogram(old?.bins as string);
    for (const [b, c] of delta.bins) {
      const n = (bins.get(b) ?? 0) + c;
      if (n) bins.set(b, n);
      else bins.delete(b);
    }
    const n = num(old?.n) + delta.n;
    if (!n) {
      if (old) qGone.push(Number(old.id));
      continue;
    }
    const [p, c, key, species, basis] = k.split(SEP);
    qRows.push([
      Number(p),
      Number(c),
      key,
      species,
      basis,
      n,
      num(old?.students) + delta.students,
      num(old?.within) + delta.within,
      num(old?.partial) + delta.partial,
      num(old?.outside) + delta.outside,
      num(old?.notChecked) + delta.notChecked,
      num(old?.checked) + delta.checked,
      serialise(add(parse(old?.xSum as string), delta.xSum)),
      serialise(add(parse(old?.xSquares as string), delta.xSquares)),
      histogramText(bins),
    ]);
  }
  await deleteIds('statistics_quantities', 'id', qGone, t);
  if (qRows.length) {
    const cols = [
      'practicalId',
      'cohortId',
      'key',
      'species',
      'basis',
      'n',
      'students',
      'within',
      'partial',
      'outside',
      'notChecked',
      'checked',
      'xSum',
      'xSquares',
      'bins',
    ];
    await insertRows('statistics_quantities', cols, qRows, t, { keys: cols.slice(0, 5), update: cols.slice(5) });
  }
}

/** Slips per code and quantity. */
async function applySlipDeltas(d: Deltas, t: Transaction) {
  const slips = await readKeyed('statistics_slips', [...d.slips.keys()], (r) => [r.practicalId, r.cohortId, r.code, r.key].join(SEP), t);
  const sRows: unknown[][] = [];
  const sGone: number[] = [];
  for (const [k, delta] of d.slips) {
    const old = slips.get(k);
    const n = num(old?.findings) + delta;
    if (!n) {
      if (old) sGone.push(Number(old.id));
      continue;
    }
    const [p, c, code, key] = k.split(SEP);
    sRows.push([Number(p), Number(c), code, key, n]);
  }
  await deleteIds('statistics_slips', 'id', sGone, t);
  if (sRows.length)
    await insertRows('statistics_slips', ['practicalId', 'cohortId', 'code', 'key', 'findings'], sRows, t, {
      keys: ['practicalId', 'cohortId', 'code', 'key'],
      update: ['findings'],
    });
}

/** Slips per code: submissions, and the lowest submission id as the example (read from the applied rows). */
async function applySlipCodeDeltas(d: Deltas, t: Transaction) {
  const codeKeys = [...d.codes];
  const codes = await readKeyed('statistics_slip_codes', codeKeys, (r) => [r.practicalId, r.cohortId, r.code].join(SEP), t);
  const examples = new Map<string, number | null>();
  for (const part of chunks(codeKeys, 200)) {
    const sql = part
      .map(
        (_, i) =>
          `SELECT ${i} AS i, MIN("submissionId") AS example FROM statistics_slip_findings WHERE "practicalId" = :p${i} AND "cohortId" = :c${i} AND code = :k${i}`,
      )
      .join(' UNION ALL ');
    const replacements: Record<string, unknown> = {};
    part.forEach((k, i) => {
      const [p, c, code] = k.split(SEP);
      replacements[`p${i}`] = Number(p);
      replacements[`c${i}`] = Number(c);
      replacements[`k${i}`] = code;
    });
    for (const r of await sel(sql, replacements, t)) examples.set(part[Number(r.i)], numOrNull(r.example));
  }
  const cRows: unknown[][] = [];
  const cGone: number[] = [];
  for (const k of codeKeys) {
    const old = codes.get(k);
    const n = num(old?.submissions) + (d.slipCodes.get(k) ?? 0);
    if (!n) {
      if (old) cGone.push(Number(old.id));
      continue;
    }
    const [p, c, code] = k.split(SEP);
    cRows.push([Number(p), Number(c), code, n, examples.get(k) ?? null]);
  }
  await deleteIds('statistics_slip_codes', 'id', cGone, t);
  if (cRows.length)
    await insertRows('statistics_slip_codes', ['practicalId', 'cohortId', 'code', 'submissions', 'example'], cRows, t, {
      keys: ['practicalId', 'cohortId', 'code'],
      update: ['submissions', 'example'],
    });
}

/** Markers: what each marked, their marks, awarded − proposed, overrides and moderations. */
async function applyMarkerDeltas(d: Deltas, t: Transaction) {
  const markers = await readKeyed('statistics_markers', [...d.markers.keys()], (r) => [r.practicalId, r.cohortId, r.markerId].join(SEP), t);
  const mRows: unknown[][] = [];
  const mGone: number[] = [];
  for (const [k, delta] of d.markers) {
    const old = markers.get(k);
    const v = {
      submissions: num(old?.submissions) + delta.submissions,
      markCount: num(old?.markCount) + delta.markCount,
      differenceCount: num(old?.differenceCount) + delta.differenceCount,
      overrides: num(old?.overrides) + delta.overrides,
      moderations: num(old?.moderations) + delta.moderations,
      moderationChanges: num(old?.moderationChanges) + delta.moderationChanges,
    };
    const sums = {
      markSum: add(parse(old?.markSum as string), delta.markSum),
      markSquares: add(parse(old?.markSquares as string), delta.markSquares),
      differenceSum: add(parse(old?.differenceSum as string), delta.differenceSum),
      differenceSquares: add(parse(old?.differenceSquares as string), delta.differenceSquares),
    };
    if (
      !v.submissions &&
      !v.markCount &&
      !v.differenceCount &&
      !v.overrides &&
      !v.moderations &&
      !v.moderationChanges &&
      Object.values(sums).every(isZero)
    ) {
      if (old) mGone.push(Number(old.id));
      continue;
    }
    const [p, c, markerId] = k.split(SEP).map(Number);
    mRows.push([
      p,
      c,
      markerId,
      v.submissions,
      v.markCount,
      serialise(sums.markSum),
      serialise(sums.markSquares),
      v.differenceCount,
      serialise(sums.differenceSum),
      serialise(sums.differenceSquares),
      v.overrides,
      v.moderations,
      v.moderationChanges,
    ]);
  }
  await deleteIds('statistics_markers', 'id', mGone, t);
  if (mRows.length) {
    const cols = [
      'practicalId',
      'cohortId',
      'markerId',
      'submissions',
      'markCount',
      'markSum',
      'markSquares',
      'differenceCount',
      'differenceSum',
      'differenceSquares',
      'overrides',
      'moderations',
      'moderationChanges',
    ];
    await insertRows('statistics_markers', cols, mRows, t, { keys: cols.slice(0, 3), update: cols.slice(3) });
  }
}

const num = (v: unknown) => (v === null || v === undefined ? 0 : Number(v));

// ---------------------------------------------------------------------------------------------
// Bringing students up to date.

async function lockPracticals(practicalIds: number[], t: Transaction) {
  if (!isPostgres()) return; // SQLite: one writing transaction at a time anyway.
  await sel('SELECT pg_advisory_xact_lock_shared(40210, 0) AS ok', {}, t);
  for (const p of [...new Set(practicalIds)].sort((a, b) => a - b)) await sel('SELECT pg_advisory_xact_lock(40211, :p) AS ok', { p }, t);
}

/** The (practical, student) pairs behind submission ids, including submissions since removed. */
async function pairsOf(submissionIds: number[], t: Transaction): Promise<Pair[]> {
  const pairs = new Map<string, Pair>();
  for (const ids of chunks([...new Set(submissionIds)])) {
    const rows = [
      ...(await sel(`SELECT "practicalId", "studentId" FROM submissions WHERE id IN (:ids)`, { ids }, t)),
      ...(await sel(`SELECT "practicalId", "studentId" FROM statistics_submissions WHERE "submissionId" IN (:ids)`, { ids }, t)),
    ];
    for (const r of rows) {
      const p = { practicalId: Number(r.practicalId), studentId: Number(r.studentId) };
      pairs.set(pairKey(p), p);
    }
  }
  return [...pairs.values()];
}

/** Compute the differences for some students and write their applied rows; the aggregates are left to the caller. */
async function collect(pairs: Pair[], t: Transaction, into: Deltas): Promise<void> {
  for (const part of chunks(pairs)) {
    const [now, before] = [await currentContributions(part, t), await appliedContributions(part, t)];
    const byPair = (list: Contribution[]) => {
      const m = new Map<string, Contribution[]>();
      for (const c of list) {
        const k = `${c.practicalId}|${c.studentId}`;
        if (!m.has(k)) m.set(k, []);
        m.get(k)!.push(c);
      }
      return m;
    };
    const nowBy = byPair(now);
    const beforeBy = byPair(before);
    for (const p of part) {
      const k = pairKey(p);
      if (nowBy.has(k)) into.addStudent(nowBy.get(k)!, 1);
      if (beforeBy.has(k)) into.addStudent(beforeBy.get(k)!, -1);
    }
    await writeApplied(before, now, t);
  }
}

/** Bring the kept statistics up to date for these submissions' students, in transaction t. */
export async function keepStatisticsFor(submissionIds: number[], t: Transaction): Promise<void> {
  if (!submissionIds.length) return;
  const pairs = await pairsOf(submissionIds, t);
  if (!pairs.length) return;
  await lockPracticals(
    pairs.map((p) => p.practicalId),
    t,
  );
  const deltas = new Deltas();
  await collect(pairs, t, deltas);
  deltas.settle();
  if (!deltas.empty) await applyDeltas(deltas, t);
}

// ---------------------------------------------------------------------------------------------
// When: noted by the model hooks, done before COMMIT or at once.

const pending = new WeakMap<Transaction, Set<number>>();
let suspended = 0;

/**
 * Note that submissions changed. In a transaction, the statistics are brought up to date once,
 * just before it commits; outside one, at once in a transaction of their own.
 */
export async function noteChangedSubmissions(ids: number[], transaction?: Transaction | null): Promise<void> {
  const list = ids.filter((id) => Number.isInteger(id) && id > 0);
  if (!list.length || suspended > 0) return;
  if (transaction) {
    const root = rootTransaction(transaction);
    let set = pending.get(root);
    if (!set) {
      set = new Set();
      pending.set(root, set);
      beforeCommit(root, async (t) => {
        const ids = [...(pending.get(t) ?? [])];
        pending.delete(t);
        await keepStatisticsFor(ids, t);
      });
    }
    for (const id of list) set.add(id);
    return;
  }
  const work = () => sequelize().transaction((t) => keepStatisticsFor(list, t));
  if (holdsWriterTurn()) {
    // A write outside any transaction, made while this process's SQLite writer turn is held (an
    // afterCommit callback, say): a transaction now would wait for that turn, which waits for us.
    // Queue it behind the turn instead.
    outsideWriterTurn(() => work()).catch((error) => log().error({ err: error }, 'keeping statistics failed'));
    return;
  }
  await work();
}

/**
 * Run a bulk load with the hooks' upkeep switched off (in this process), then rebuild the
 * statistics of the practicals it touched: much faster than keeping them row by row.
 */
export async function withoutKeeping<T>(fn: () => Promise<T>): Promise<T> {
  suspended++;
  try {
    return await fn();
  } finally {
    suspended--;
  }
}

// ---------------------------------------------------------------------------------------------
// Rebuilding from scratch.

const KEPT_TABLES = [
  'statistics_groups',
  'statistics_quantities',
  'statistics_slips',
  'statistics_slip_codes',
  'statistics_markers',
  'statistics_submissions',
  'statistics_values',
  'statistics_slip_findings',
];

/**
 * Throw away the kept rows (of some practicals, or all) and build them again from the source
 * tables, in one transaction. Call after changing rows behind the models' back, e.g. a bulk
 * re-check done with raw SQL or a restored backup. Writers wait while it runs.
 */
export async function rebuildStatistics(
  options: { practicalIds?: number[]; onProgress?: (done: number, total: number) => void; onlyIfStale?: boolean } = {},
): Promise<{ students: number; submissions: number; skipped?: true }> {
  return sequelize().transaction(async (t) => {
    if (isPostgres()) await sel('SELECT pg_advisory_xact_lock(40210, 0) AS ok', {}, t);
    if (options.onlyIfStale) {
      // Another instance may have built them while this one waited for the lock.
      const [meta] = await sel<{ keptVersion: number }>('SELECT "keptVersion" FROM statistics_meta WHERE id = 1', {}, t);
      if (meta && Number(meta.keptVersion) >= KEPT_VERSION) return { students: 0, submissions: 0, skipped: true as const };
    }
    const only = options.practicalIds;
    for (const table of KEPT_TABLES) {
      if (only) {
        for (const ids of chunks(only))
          await run(`DELETE FROM ${table} WHERE "practicalId" IN (:ids)`, { replacements: { ids }, transaction: t });
      } else await run(`DELETE FROM ${table}`, { transaction: t });
    }
    const pairs = (
      await sel(
        `SELECT DISTINCT s."practicalId", s."studentId" FROM submissions s WHERE ${COUNTED}${only ? ' AND s."practicalId" IN (:only)' : ''}`,
        only ? { only: only.length ? only : [-1] } : {},
        t,
      )
    ).map((r) => ({ practicalId: Number(r.practicalId), studentId: Number(r.studentId) }));
    const deltas = new Deltas();
    for (let i = 0; i < pairs.length; i += CHUNK * 4) {
      await collect(pairs.slice(i, i + CHUNK * 4), t, deltas);
      options.onProgress?.(Math.min(pairs.length, i + CHUNK * 4), pairs.length);
    }
    deltas.settle();
    await applyDeltas(deltas, t);
    if (!only)
      await run('UPDATE statistics_meta SET "keptVersion" = :v WHERE id = 1', { replacements: { v: KEPT_VERSION }, transaction: t });
    const [{ n }] = await sel<{ n: number }>('SELECT COUNT(*) AS n FROM statistics_submissions', {}, t);
    return { students: pairs.length, submissions: Number(n) };
  });
}

let keptChecked: Promise<void> | null = null;

/** Before the first statistics read of a process: rebuild once if a migration left the kept tables to be built. */
export function ensureKeptStatistics(): Promise<void> {
  keptChecked ??= (async () => {
    const rows = await sel<{ keptVersion: number }>('SELECT "keptVersion" FROM statistics_meta WHERE id = 1', {});
    if (rows.length && Number(rows[0].keptVersion) >= KEPT_VERSION) return;
    log().info('building the kept statistics from the check results');
    const r = await rebuildStatistics({ onlyIfStale: true });
    if (!r.skipped) log().info({ submissions: r.submissions, students: r.students }, 'kept statistics built');
  })().catch((error) => {
    keptChecked = null;
    throw error;
  });
  return keptChecked;
}

/** For tests: forget that the kept tables were checked (a new database). */
export function forgetKeptCheck(): void {
  keptChecked = null;
}

/** Every kept row, without ids and change tokens, in a stable order: for comparing kept with rebuilt. */
export async function keptSnapshot(practicalIds?: number[]): Promise<Record<string, Row[]>> {
  const out: Record<string, Row[]> = {};
  for (const table of KEPT_TABLES) {
    const rows = await sel(
      `SELECT * FROM ${table}${practicalIds ? ' WHERE "practicalId" IN (:p)' : ''}`,
      practicalIds ? { p: practicalIds } : {},
    );
    out[table] = rows
      .map((r) => {
        const { id: _id, changeToken: _t, ...rest } = r as Row;
        void _id;
        void _t;
        for (const [k, v] of Object.entries(rest)) if (typeof v === 'boolean') rest[k] = v ? 1 : 0;
        return rest;
      })
      .sort((a, b) => (JSON.stringify(a) < JSON.stringify(b) ? -1 : 1));
  }
  return out;
}
