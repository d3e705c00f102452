/**
 * The marking queue: the marked attempts of the cohorts (or students) the actor marks, or of
 * every cohort of the courses they teach. Filtering, sorting and paging happen in SQL.
 */
import { Op, type WhereOptions, type Order } from 'sequelize';
import type { Actor } from '@/lib/authz';
import { models } from '@/models';
import type { QueueQuery } from '@/lib/schemas/marking';
import { SLIPS } from '@/lib/grading';

const FLAG_COLUMN = { outside: 'flagOutside', slip: 'flagSlip', late: 'flagLate', duplicate: 'flagDuplicate', spectrum: 'flagSpectrumMismatch' } as const;

/** Which submissions the actor may mark, as a WHERE clause (null: none at all). */
export async function markingScope(actor: Actor): Promise<WhereOptions | null> {
  if (actor.isAdmin) return {};
  const { Cohort } = models();
  const managed = [...new Set(actor.memberships.filter((m) => m.role === 'instructor' || m.role === 'lead').map((m) => m.courseId))];
  const taCourses = new Set(actor.memberships.filter((m) => m.role === 'ta').map((m) => m.courseId));
  const managedCohorts = managed.length ? (await Cohort.findAll({ where: { courseId: managed }, attributes: ['id'] })).map((c) => c.id) : [];
  let duties = actor.taDuties;
  if (duties.length) {
    // A TA duty counts only while the person is still a TA in that cohort's course.
    const cohorts = await Cohort.findAll({ where: { id: [...new Set(duties.map((d) => d.cohortId))] }, attributes: ['id', 'courseId'] });
    const ok = new Set(cohorts.filter((c) => taCourses.has(c.courseId)).map((c) => c.id));
    duties = duties.filter((d) => ok.has(d.cohortId));
  }
  const whole = [...new Set([...managedCohorts, ...duties.filter((d) => d.studentId === null).map((d) => d.cohortId)])];
  const named = duties.filter((d) => d.studentId !== null);
  const or: WhereOptions[] = [];
  if (whole.length) or.push({ cohortId: { [Op.in]: whole } });
  for (const d of named) or.push({ cohortId: d.cohortId, studentId: d.studentId! });
  if (!or.length) return null;
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
  /** The named slips' titles, so the flag can say which. */
  slips: string[];
  delivery: string | null;
};

export async function queuePage(actor: Actor, q: QueueQuery): Promise<{ rows: QueueRow[]; total: number; page: number; pageSize: number; pages: number }> {
  const { Submission, User, Practical, Cohort, EmailOutbox, SlipFinding } = models();
  const scope = await markingScope(actor);
  if (!scope) return { rows: [], total: 0, page: q.page, pageSize: q.pageSize, pages: 0 };
  const where: WhereOptions[] = [scope, { isMarkedAttempt: true }];
  where.push({ status: q.status ? q.status : { [Op.in]: ['submitted', 'marked', 'released', 'resubmission-requested'] } });
  if (q.practicalId) where.push({ practicalId: q.practicalId });
  if (q.cohortId) where.push({ cohortId: q.cohortId });
  if (q.flag) where.push({ [FLAG_COLUMN[q.flag]]: true });
  const dir = q.dir === 'desc' ? 'DESC' : 'ASC';
  const order: Order = {
    submittedAt: [['submittedAt', dir]],
    student: [[{ model: User, as: 'student' }, 'name', dir]],
    practical: [[Practical, 'title', dir]],
    status: [['status', dir]],
    proposedTotal: [['proposedTotal', dir]],
    awardedTotal: [['awardedTotal', dir]],
  }[q.sort] as Order;
  const { rows, count } = await Submission.findAndCountAll({
    where: { [Op.and]: where },
    include: [
      { model: User, as: 'student', attributes: ['id', 'name', 'email', 'studentNumber'] },
      { model: Practical, attributes: ['id', 'title'] },
      { model: Cohort, attributes: ['id', 'name', 'term'] },
    ],
    order: [...(order as unknown[]), ['id', 'ASC']] as Order,
    limit: q.pageSize,
    offset: (q.page - 1) * q.pageSize,
  });
  const ids = rows.map((r) => r.id);
  const mail = ids.length
    ? await EmailOutbox.findAll({ where: { submissionId: ids }, attributes: ['submissionId', 'status', 'dedupeKey', 'id'], order: [['id', 'ASC']] })
    : [];
  const findings = ids.length ? await SlipFinding.findAll({ where: { submissionId: ids }, attributes: ['submissionId', 'code'] }) : [];
  const slipTitles = new Map<number, string[]>();
  for (const f of findings) {
    const title = (SLIPS as Record<string, { title: string } | undefined>)[f.code]?.title ?? f.code;
    const list = slipTitles.get(f.submissionId) ?? [];
    if (!list.includes(title)) list.push(title);
    slipTitles.set(f.submissionId, list);
  }
  const lastRelease = new Map<number, string>();
  for (const m of mail) if (m.dedupeKey.startsWith('release:') && m.submissionId) lastRelease.set(m.submissionId, m.status);
  return {
    rows: rows.map((s) => {
      const r = s as typeof s & { student: InstanceType<typeof User>; Practical: InstanceType<typeof Practical>; Cohort: InstanceType<typeof Cohort> };
      return {
        id: s.id,
        student: { id: r.student.id, name: r.student.name, email: r.student.email, studentNumber: r.student.studentNumber },
        practical: { id: r.Practical.id, title: r.Practical.title },
        cohort: { id: r.Cohort.id, name: `${r.Cohort.name} (${r.Cohort.term})` },
        status: s.status,
        attempt: s.attempt,
        submittedAt: s.submittedAt?.toISOString() ?? null,
        proposedTotal: s.proposedTotal,
        awardedTotal: s.awardedTotal,
        maxTotal: s.maxTotal,
        version: s.version,
        flags: { outside: s.flagOutside, slip: s.flagSlip, late: s.flagLate, duplicate: s.flagDuplicate, spectrum: s.flagSpectrumMismatch },
        slips: slipTitles.get(s.id) ?? [],
        delivery: lastRelease.get(s.id) ?? null,
      };
    }),
    total: count,
    page: q.page,
    pageSize: q.pageSize,
    pages: Math.ceil(count / q.pageSize),
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
  const cohorts = await Cohort.findAll({ where: { id: [...cohortIds] }, order: [['term', 'DESC'], ['name', 'ASC']] });
  const links = await PracticalCohort.findAll({ where: { cohortId: [...cohortIds] }, attributes: ['practicalId'] });
  const practicals = await Practical.findAll({ where: { id: [...new Set(links.map((l) => l.practicalId))] }, order: [['title', 'ASC']] });
  return { practicals: practicals.map((p) => ({ id: p.id, title: p.title })), cohorts: cohorts.map((c) => ({ id: c.id, name: `${c.name} (${c.term})` })) };
}
