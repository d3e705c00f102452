import { Suspense } from 'react';
import Link from 'next/link';
import { notFound } from 'next/navigation';
import { authorizePage, managesCourse, type Actor } from '@/lib/authz';
import { PageHeader } from '@/components/ui/page-header';
import { LoadingBlock } from '@/components/ui/loading-block';
import { StatisticsDashboard } from '@/components/statistics/statistics-dashboard';
import { DEFAULT_MARKER_THRESHOLD } from '@/lib/statistics/definitions';
import { practicalReport } from '@/lib/statistics/report';
import { cohortsOfPractical } from '@/lib/statistics/scope';
import { cohortName } from '@/lib/display';
import { models } from '@/models';
import type { Cohort } from '@/models/cohort';
import type { Practical } from '@/models/practical';

export const metadata = { title: 'Practical statistics' };
export const dynamic = 'force-dynamic';

type Props = { params: Promise<{ practicalId: string }>; searchParams: Promise<{ cohortId?: string }> };

/** The figures, computed here on the server so they come with the page (streamed after the header). */
async function Figures({
  actor,
  practical,
  cohort,
  cohorts,
  manages,
}: {
  actor: Actor;
  practical: Practical;
  cohort: Cohort | null;
  cohorts: Cohort[];
  manages: boolean;
}) {
  const inScope = cohort ? [cohort] : cohorts;
  const report = await practicalReport(
    {
      actor,
      practical,
      cohort,
      cohorts: inScope,
      manages,
      scope: { practicalIds: [practical.id], cohortIds: inScope.length ? inScope.map((c) => c.id) : [-1] },
    },
    DEFAULT_MARKER_THRESHOLD,
  );
  return <StatisticsDashboard practicalId={practical.id} cohortId={cohort?.id ?? null} canExportMarks={manages} initial={report} />;
}

export default async function PracticalStatisticsPage({ params, searchParams }: Props) {
  const { practicalId } = await params;
  const { cohortId: rawCohort } = await searchParams;
  if (!/^\d{1,12}$/.test(practicalId) || (rawCohort !== undefined && !/^\d{1,12}$/.test(rawCohort))) notFound();
  const { Practical, Cohort, Course } = models();
  const [practical, cohort] = await Promise.all([
    Practical.findByPk(Number(practicalId)),
    rawCohort ? Cohort.findByPk(Number(rawCohort)) : Promise.resolve(null),
  ]);
  if (!practical) notFound();
  if (rawCohort && (!cohort || cohort.courseId !== practical.courseId)) notFound();
  const actor = await authorizePage({ kind: 'statistics', courseId: practical.courseId, cohortId: cohort?.id });
  const manages = managesCourse(actor, practical.courseId);
  const [course, cohorts] = await Promise.all([
    Course.findByPk(practical.courseId),
    cohort && !manages ? Promise.resolve([]) : cohortsOfPractical(practical.id),
  ]);
  return (
    <>
      <PageHeader
        title={`Statistics: ${practical.title}`}
        lead={`${course?.code ?? ''} · ${cohort ? `${cohortName(cohort)}${cohort.instrument ? ` · ${cohort.instrument}` : ''}` : `All cohorts (${cohorts.map((c) => cohortName(c)).join(', ')})`}`}
      >
        <Link className="btn-quiet" href="/statistics">
          All practicals
        </Link>
      </PageHeader>
      {manages && cohorts.length > 1 && (
        <nav aria-label="Cohort" className="mb-6 flex flex-wrap gap-2 text-sm">
          <Link href={`/statistics/${practical.id}`} aria-current={!cohort ? 'page' : undefined} className={!cohort ? 'btn' : 'btn-quiet'}>
            All cohorts
          </Link>
          {cohorts.map((c) => (
            <Link
              key={c.id}
              href={`/statistics/${practical.id}?cohortId=${c.id}`}
              aria-current={cohort?.id === c.id ? 'page' : undefined}
              className={cohort?.id === c.id ? 'btn' : 'btn-quiet'}
            >
              {cohortName(c)}
            </Link>
          ))}
        </nav>
      )}
      <Suspense fallback={<LoadingBlock label="Computing the statistics…" rows={8} />}>
        <Figures actor={actor} practical={practical} cohort={cohort} cohorts={cohorts} manages={manages} />
      </Suspense>
    </>
  );
}
