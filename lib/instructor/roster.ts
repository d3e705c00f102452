/**
 * Roster import: a CSV of students (name, e-mail, student number, cohort) is read with
 * papaparse, every row is classified (new / already enrolled / invalid, with the reason) for a
 * preview, and the import writes all rows or none, in one transaction, so running it twice
 * changes nothing the second time.
 */
import Papa from 'papaparse';
import { Op, type Transaction } from 'sequelize';
import { sequelize } from '@/lib/db';
import { models } from '@/models';
import { HttpError } from '@/lib/http-error';
import { audit } from '@/lib/audit';
import { inviteUser } from './invitations';

export const MAX_ROSTER_BYTES = 1_000_000;
export const MAX_ROSTER_ROWS = 2000;

/** Column headers accepted for each field (compared lower-case, without spaces, _ or -). */
const COLUMNS = {
  name: ['name', 'fullname', 'studentname'],
  email: ['email', 'e-mail', 'emailaddress'],
  studentNumber: ['studentnumber', 'studentno', 'studentid', 'number'],
  cohort: ['cohort', 'group'],
} as const;
type Field = keyof typeof COLUMNS;
const squash = (h: string) => h.toLowerCase().replace(/[\s_-]+/g, '');

export type RowStatus = 'new' | 'enrolled' | 'invalid';
export type RosterRow = {
  line: number;
  name: string;
  email: string;
  studentNumber: string;
  cohort: string;
  status: RowStatus;
  reason?: string;
  /** Cells that began like a spreadsheet formula and were neutralised. */
  notes?: string[];
};
export type RosterPreview = {
  rows: RosterRow[];
  counts: Record<RowStatus, number>;
};

/**
 * A cell that a spreadsheet would run as a formula (=, +, -, @, or a leading tab/CR) is
 * neutralised by dropping those leading characters (common practice against CSV injection;
 * none of the four fields legitimately starts with them).
 */
export function neutraliseCell(value: string): { value: string; changed: boolean } {
  const trimmed = value.trim();
  const cleaned = trimmed.replace(/^[=+\-@\t\r\s]+/, '').trim();
  return { value: cleaned, changed: cleaned !== trimmed };
}

/** Bytes → text, refusing what is too big or not UTF-8. */
export function decodeRoster(bytes: Uint8Array): string {
  if (bytes.byteLength === 0) throw new HttpError(400, 'The file is empty.');
  if (bytes.byteLength > MAX_ROSTER_BYTES) throw new HttpError(413, `The file is larger than 1 MB (${(bytes.byteLength / 1e6).toFixed(1)} MB); split the roster.`);
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    throw new HttpError(400, 'The file is not UTF-8 text. Save it from your spreadsheet as "CSV UTF-8" and try again.');
  }
  if (text.includes('\u0000')) throw new HttpError(400, 'The file contains binary data, not CSV text.');
  return text.replace(/^\uFEFF/, '');
}

type ParsedRow = { line: number; cells: Record<Field, string>; notes: string[] };

/** Parse the CSV and map its header to the four fields; wrong or missing columns refuse the file. */
export function parseRosterCsv(text: string): ParsedRow[] {
  const parsed = Papa.parse<string[]>(text, { skipEmptyLines: 'greedy' });
  const data = parsed.data;
  if (data.length === 0) throw new HttpError(400, 'The file has no rows.');
  const header = data[0].map((h) => squash(String(h ?? '')));
  const index = {} as Record<Field, number>;
  const unknown: string[] = [];
  header.forEach((h, i) => {
    const field = (Object.keys(COLUMNS) as Field[]).find((f) => (COLUMNS[f] as readonly string[]).includes(h));
    if (!field) unknown.push(String(data[0][i]).slice(0, 40) || `(column ${i + 1} has no header)`);
    else if (index[field] !== undefined) unknown.push(`${data[0][i]} (second ${field} column)`);
    else index[field] = i;
  });
  const missing = (Object.keys(COLUMNS) as Field[]).filter((f) => index[f] === undefined);
  if (missing.length || unknown.length) {
    const parts = [];
    if (missing.length) parts.push(`missing ${missing.map((m) => `"${m === 'studentNumber' ? 'student_number' : m}"`).join(', ')}`);
    if (unknown.length) parts.push(`unexpected ${unknown.map((u) => `"${u}"`).join(', ')}`);
    throw new HttpError(400, `The columns must be exactly name, email, student_number, cohort: ${parts.join('; ')}.`);
  }
  const rows = data.slice(1);
  if (rows.length === 0) throw new HttpError(400, 'The file has a header but no students.');
  if (rows.length > MAX_ROSTER_ROWS) throw new HttpError(400, `At most ${MAX_ROSTER_ROWS} students per file (this one has ${rows.length}).`);
  return rows.map((cells, i) => {
    const notes: string[] = [];
    const out = {} as Record<Field, string>;
    for (const f of Object.keys(COLUMNS) as Field[]) {
      const { value, changed } = neutraliseCell(String(cells[index[f]] ?? ''));
      if (changed) notes.push(`A formula-like start was removed from ${f === 'studentNumber' ? 'student number' : f}.`);
      out[f] = value;
    }
    return { line: i + 2, cells: out, notes };
  });
}

const EMAIL = /^[^\s@,;<>"]+@[^\s@,;<>"]+\.[^\s@,;<>"]+$/;

/** Classify every row against the course as it is now (inside `transaction` when importing). */
export async function previewRoster(courseId: number, parsed: ParsedRow[], transaction?: Transaction): Promise<RosterPreview> {
  const { Cohort, User, CourseMembership } = models();
  const cohorts = await Cohort.findAll({ where: { courseId, archivedAt: null }, transaction });
  const emails = [...new Set(parsed.map((r) => r.cells.email.toLowerCase()).filter(Boolean))];
  const numbers = [...new Set(parsed.map((r) => r.cells.studentNumber).filter(Boolean))];
  const users = await User.findAll({ where: { [Op.or]: [{ email: emails }, { studentNumber: numbers }] }, transaction });
  const memberships = await CourseMembership.findAll({ where: { courseId, userId: users.map((u) => u.id) }, transaction });
  // The preview tells the course only about its own people: whether an address has an account
  // elsewhere, and that account's student number, are not the course's to know.
  const inCourse = new Set(memberships.map((m) => m.userId));
  const MISMATCH = 'The e-mail and student number do not match the records held for this student; check both against the student record, or ask the site administrator.';

  const seen = new Map<string, number>();
  const seenNumber = new Map<string, number>();
  for (const r of parsed) {
    const e = r.cells.email.toLowerCase();
    if (e) seen.set(e, (seen.get(e) ?? 0) + 1);
    if (r.cells.studentNumber) seenNumber.set(r.cells.studentNumber, (seenNumber.get(r.cells.studentNumber) ?? 0) + 1);
  }
  const linesOf = (pick: (r: ParsedRow) => string, v: string) => parsed.filter((r) => pick(r) === v).map((r) => r.line).join(', ');

  const rows = parsed.map((r): RosterRow => {
    const email = r.cells.email.toLowerCase();
    const base = { line: r.line, name: r.cells.name, email, studentNumber: r.cells.studentNumber, cohort: r.cells.cohort, notes: r.notes.length ? r.notes : undefined };
    const invalid = (reason: string): RosterRow => ({ ...base, status: 'invalid', reason });
    if (!r.cells.name) return invalid('The name is empty.');
    if (r.cells.name.length > 200) return invalid('The name is longer than 200 characters.');
    if (!email) return invalid('The e-mail is empty.');
    if (email.length > 254 || !EMAIL.test(email)) return invalid(`"${r.cells.email.slice(0, 60)}" is not an e-mail address.`);
    if ((seen.get(email) ?? 0) > 1) return invalid(`The e-mail appears more than once in this file (lines ${linesOf((x) => x.cells.email.toLowerCase(), email)}).`);
    if (!r.cells.studentNumber) return invalid('The student number is empty.');
    if (r.cells.studentNumber.length > 40) return invalid('The student number is longer than 40 characters.');
    if ((seenNumber.get(r.cells.studentNumber) ?? 0) > 1) return invalid(`The student number appears more than once in this file (lines ${linesOf((x) => x.cells.studentNumber, r.cells.studentNumber)}).`);
    const matching = cohorts.filter((c) => c.name.toLowerCase() === r.cells.cohort.toLowerCase());
    if (!r.cells.cohort) return invalid('The cohort is empty.');
    if (matching.length === 0) return invalid(`No open cohort "${r.cells.cohort}" in this course (there are: ${cohorts.map((c) => c.name).join(', ') || 'none'}).`);
    if (matching.length > 1) return invalid(`Several open cohorts are called "${r.cells.cohort}"; archive the old one first.`);
    const cohort = matching[0];
    const user = users.find((u) => u.email.toLowerCase() === email);
    const byNumber = users.find((u) => u.studentNumber === r.cells.studentNumber);
    if (byNumber && byNumber.id !== user?.id) {
      return invalid(inCourse.has(byNumber.id) ? `Student number ${r.cells.studentNumber} belongs to someone else in this course.` : MISMATCH);
    }
    if (user?.studentNumber && user.studentNumber !== r.cells.studentNumber) {
      return invalid(inCourse.has(user.id) ? `In this course this person has student number ${user.studentNumber}, not ${r.cells.studentNumber}.` : MISMATCH);
    }
    if (user) {
      const mine = memberships.filter((m) => m.userId === user.id);
      if (mine.some((m) => m.role !== 'student')) return invalid('This person is on the staff of this course.');
      const enrolled = mine.find((m) => m.role === 'student');
      if (enrolled) {
        if (enrolled.cohortId === cohort.id) return { ...base, status: 'enrolled' };
        const other = cohorts.find((c) => c.id === enrolled.cohortId);
        return invalid(`Already enrolled in ${other ? `"${other.name}"` : 'another cohort'}; moving students between cohorts is not done by import.`);
      }
    }
    // New to the course, with or without an account elsewhere: the preview says the same either way.
    return { ...base, status: 'new' };
  });
  const counts = { new: 0, enrolled: 0, invalid: 0 };
  for (const row of rows) counts[row.status]++;
  return { rows, counts };
}

export async function previewRosterFile(courseId: number, bytes: Uint8Array): Promise<RosterPreview> {
  return previewRoster(courseId, parseRosterCsv(decodeRoster(bytes)));
}

export type RosterImportResult = RosterPreview & { created: number; enrolled: number; invited: number };

/** All or nothing: any invalid row refuses the whole file; already-enrolled rows are left as they are. */
export async function importRosterFile(courseId: number, bytes: Uint8Array, actorId: number): Promise<RosterImportResult> {
  const parsed = parseRosterCsv(decodeRoster(bytes));
  const { User, CourseMembership, Cohort, Course } = models();
  return sequelize().transaction(async (transaction) => {
    const preview = await previewRoster(courseId, parsed, transaction);
    if (preview.counts.invalid > 0) {
      throw new HttpError(422, `Nothing was imported: ${preview.counts.invalid} row(s) are invalid. Fix them and upload the file again.`);
    }
    const course = await Course.findByPk(courseId, { transaction });
    const cohorts = await Cohort.findAll({ where: { courseId, archivedAt: null }, transaction });
    let created = 0;
    let enrolled = 0;
    let invited = 0;
    for (const row of preview.rows) {
      if (row.status !== 'new') continue;
      const cohort = cohorts.find((c) => c.name.toLowerCase() === row.cohort.toLowerCase())!;
      let user = await User.findOne({ where: { email: row.email }, transaction });
      if (!user) {
        user = await User.create({ email: row.email, name: row.name, passwordHash: null, isAdmin: false, studentNumber: row.studentNumber }, { transaction });
        created++;
      } else if (!user.studentNumber) {
        await user.update({ studentNumber: row.studentNumber }, { transaction });
      }
      await CourseMembership.create({ userId: user.id, courseId, role: 'student', cohortId: cohort.id }, { transaction });
      enrolled++;
      if (!user.passwordHash) {
        await inviteUser(user, { courseTitle: `${course!.code} ${course!.title}`, role: 'student' }, transaction);
        invited++;
      }
    }
    await audit(
      { actorId, action: 'roster.import', entityType: 'course', entityId: courseId, before: null, after: { created, enrolled, invited, unchanged: preview.counts.enrolled } },
      transaction,
    );
    return { ...preview, created, enrolled, invited };
  });
}

/** Read a roster upload: the raw file as the body (text/csv), bounded before it is read whole. */
export async function readRosterBody(request: Request): Promise<Uint8Array> {
  const declared = Number(request.headers.get('content-length') ?? 0);
  if (declared > MAX_ROSTER_BYTES) throw new HttpError(413, `The file is larger than 1 MB (${(declared / 1e6).toFixed(1)} MB); split the roster.`);
  if (!request.body) throw new HttpError(400, 'The file is empty.');
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.byteLength;
    if (size > MAX_ROSTER_BYTES) {
      await reader.cancel();
      throw new HttpError(413, 'The file is larger than 1 MB; split the roster.');
    }
    chunks.push(value);
  }
  return Buffer.concat(chunks);
}
