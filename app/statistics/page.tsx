import Link from 'next/link';
import { redirect } from 'next/navigation';
import { authorizePage, can, managesCourse } from '@/lib/authz';
import { PageHeader } from '@/components/ui/page-header';
import { cohortName } from '@/lib/display';
import { MIN_GROUP } from '@/lib/statistics/definitions';
import { cohortsOfPracticals } from '@/lib/statistics/scope';
import { models } from '@/models';

export const metadata = { title: 'Cohort statistics' };
export const dynamic = 'force-dynamic';

/**
 * Which statistics each person may open: leads and instructors every cohort of their courses,
 * TAs the cohorts they mark (other markers' names hidden), students none. A practical is named
 * with its terms, since a course runs the same practical every year under the same title.
 */
export default async function StatisticsHome() {
  const actor = await authorizePage({ kind: 'signed-in' });
  const staffCourses = [...new Set(actor.memberships.filter((m) => m.role !== 'student').map((m) => m.courseId))];
  if (!actor.isAdmin && !staffCourses.length) redirect('/not-permitted');
  const { Practical, Course } = models();
  const practicals = await Practical.findAll({
    where: actor.isAdmin ? {} : { courseId: staffCourses },
    order: [
      ['courseId', 'ASC'],
      ['title', 'ASC'],
      ['id', 'DESC'],
    ],
  });
  const [courseRows, cohortMap] = await Promise.all([
    Course.findAll({ where: { id: [...new Set(practicals.map((p) => p.courseId))] } }),
    cohortsOfPracticals(practicals.map((p) => p.id)),
  ]);
  const courses = new Map(courseRows.map((c) => [c.id, c]));
  const visible = practicals
    .map((p) => ({
      p,
      cohorts: (cohortMap.get(p.id) ?? []).filter((c) => can(actor, { kind: 'statistics', courseId: p.courseId, cohortId: c.id })),
      all: managesCourse(actor, p.courseId),
    }))
    .filter((e) => e.cohorts.length)
    // Newest term first within a course.
    .sort(
      (a, b) =>
        a.p.courseId - b.p.courseId ||
        (b.cohorts.at(-1)?.term ?? '').localeCompare(a.cohorts.at(-1)?.term ?? '') ||
        a.p.title.localeCompare(b.p.title),
    );
  return (
    <>
      <PageHeader
        title="Cohort statistics"
        lead="Where a cohort goes wrong: deviations per quantity, the most frequent slips, marker consistency, comparison between cohorts and years, and exports."
      />
      {visible.length === 0 ? (
        <p className="card text-ink-soft">Statistics appear once a practical has cohorts with submissions.</p>
      ) : (
        <ul className="space-y-3">
          {visible.map(({ p, cohorts, all }) => {
            const terms = [...new Set(cohorts.map((c) => c.term))];
            const course = courses.get(p.courseId);
            return (
              <li key={p.id} className="card">
                <h2>
                  {p.title} <span className="font-normal text-ink-soft">— {terms.join(', ')}</span>
                </h2>
                <p className="text-sm text-ink-soft">
                  {course?.code} · {course?.title}
                  {p.archivedAt ? ' · archived' : ''}
                </p>
                <ul className="mt-2 flex flex-wrap gap-2">
                  {all && (
                    <li>
                      <Link className="btn-quiet" href={`/statistics/${p.id}`}>
                        All cohorts
                      </Link>
                    </li>
                  )}
                  {cohorts.map((c) => (
                    <li key={c.id}>
                      <Link className="btn-quiet" href={`/statistics/${p.id}?cohortId=${c.id}`}>
                        {cohortName(c)}
                      </Link>
                    </li>
                  ))}
                </ul>
              </li>
            );
          })}
        </ul>
      )}
      <p className="hint mt-6">
        Groups of fewer than {MIN_GROUP} students show counts only. Each practical’s page has the exports: marks for student records (CSV),
        the statistics (CSV) and a PDF summary.
      </p>
    </>
  );
}
