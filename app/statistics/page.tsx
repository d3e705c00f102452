import Link from 'next/link';
import { redirect } from 'next/navigation';
import { authorizePage, can } from '@/lib/authz';
import { PageHeader } from '@/components/ui/page-header';
import { MIN_GROUP } from '@/lib/statistics/definitions';
import { cohortsOfPractical, managesCourse } from '@/lib/statistics/scope';
import { models } from '@/models';

export const metadata = { title: 'Cohort statistics' };
export const dynamic = 'force-dynamic';

/**
 * Which statistics each person may open: leads and instructors every cohort of their courses,
 * TAs the cohorts they mark (other markers' names hidden), students none.
 */
export default async function StatisticsHome() {
  const actor = await authorizePage({ kind: 'signed-in' });
  const staffCourses = [...new Set(actor.memberships.filter((m) => m.role !== 'student').map((m) => m.courseId))];
  if (!actor.isAdmin && !staffCourses.length) redirect('/not-permitted');
  const { Practical, Course } = models();
  const practicals = await Practical.findAll({ where: actor.isAdmin ? {} : { courseId: staffCourses }, order: [['courseId', 'ASC'], ['title', 'ASC'], ['id', 'ASC']] });
  const courses = new Map((await Course.findAll({ where: { id: [...new Set(practicals.map((p) => p.courseId))] } })).map((c) => [c.id, c]));
  const entries = await Promise.all(practicals.map(async (p) => {
    const cohorts = (await cohortsOfPractical(p.id)).filter((c) => can(actor, { kind: 'statistics', courseId: p.courseId, cohortId: c.id }));
    return { p, cohorts, all: managesCourse(actor, p.courseId) };
  }));
  const visible = entries.filter((e) => e.cohorts.length);
  return (
    <>
      <PageHeader title="Cohort statistics" lead="Where a cohort goes wrong: deviations per quantity, the most frequent slips, marker consistency, comparison between cohorts and years, and exports." />
      {visible.length === 0 ? (
        <p className="card text-ink-soft">Statistics appear once a practical has cohorts with submissions.</p>
      ) : (
        <ul className="space-y-3">
          {visible.map(({ p, cohorts, all }) => (
            <li key={p.id} className="card">
              <h2>{p.title}</h2>
              <p className="text-sm text-ink-soft">{courses.get(p.courseId)?.code} · {courses.get(p.courseId)?.title}</p>
              <ul className="mt-2 flex flex-wrap gap-2">
                {all && <li><Link className="btn-quiet" href={`/statistics/${p.id}`}>All cohorts</Link></li>}
                {cohorts.map((c) => (
                  <li key={c.id}><Link className="btn-quiet" href={`/statistics/${p.id}?cohortId=${c.id}`}>{c.name}, {c.term}</Link></li>
                ))}
              </ul>
            </li>
          ))}
        </ul>
      )}
      <p className="hint mt-6">Groups of fewer than {MIN_GROUP} students show counts only. Marks CSV header: student_number, name, email, cohort, practical, attempt, submitted_at, late_days, late_penalty_percent, one mark_… column per quantity and rubric item, total, max_total, status.</p>
    </>
  );
}
