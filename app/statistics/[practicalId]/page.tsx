import Link from 'next/link';
import { notFound } from 'next/navigation';
import { authorizePage } from '@/lib/authz';
import { PageHeader } from '@/components/ui/page-header';
import { StatisticsDashboard } from '@/components/statistics/statistics-dashboard';
import { cohortsOfPractical, managesCourse } from '@/lib/statistics/scope';
import { models } from '@/models';

export const metadata = { title: 'Practical statistics' };
export const dynamic = 'force-dynamic';

type Props = { params: Promise<{ practicalId: string }>; searchParams: Promise<{ cohortId?: string }> };

export default async function PracticalStatisticsPage({ params, searchParams }: Props) {
  const { practicalId } = await params;
  const { cohortId: rawCohort } = await searchParams;
  if (!/^\d{1,12}$/.test(practicalId) || (rawCohort !== undefined && !/^\d{1,12}$/.test(rawCohort))) notFound();
  const { Practical, Cohort, Course } = models();
  const practical = await Practical.findByPk(Number(practicalId));
  if (!practical) notFound();
  const cohort = rawCohort ? await Cohort.findByPk(Number(rawCohort)) : null;
  if (rawCohort && (!cohort || cohort.courseId !== practical.courseId)) notFound();
  const actor = await authorizePage({ kind: 'statistics', courseId: practical.courseId, cohortId: cohort?.id });
  const manages = managesCourse(actor, practical.courseId);
  const course = await Course.findByPk(practical.courseId);
  const cohorts = manages ? await cohortsOfPractical(practical.id) : [];
  return (
    <>
      <PageHeader title={`Statistics: ${practical.title}`} lead={`${course?.code ?? ''} · ${cohort ? `${cohort.name}, ${cohort.term}${cohort.instrument ? ` · ${cohort.instrument}` : ''}` : 'All cohorts'}`}>
        <Link className="btn-quiet" href="/statistics">All practicals</Link>
      </PageHeader>
      {manages && cohorts.length > 1 && (
        <nav aria-label="Cohort" className="mb-6 flex flex-wrap gap-2 text-sm">
          <Link href={`/statistics/${practical.id}`} aria-current={!cohort ? 'page' : undefined} className={!cohort ? 'btn' : 'btn-quiet'}>All cohorts</Link>
          {cohorts.map((c) => (
            <Link key={c.id} href={`/statistics/${practical.id}?cohortId=${c.id}`} aria-current={cohort?.id === c.id ? 'page' : undefined} className={cohort?.id === c.id ? 'btn' : 'btn-quiet'}>{c.name}, {c.term}</Link>
          ))}
        </nav>
      )}
      <StatisticsDashboard practicalId={practical.id} cohortId={cohort?.id ?? null} canExportMarks={manages} />
    </>
  );
}
