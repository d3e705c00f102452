import { notFound } from 'next/navigation';
import { authorizePage } from '@/lib/authz';
import { idParam } from '@/lib/http';
import { PageHeader } from '@/components/ui/page-header';
import { PlatformCourse, type PlatformContextView, type ScoreRow } from '@/components/lti/platform-course';
import { models } from '@/models';

export const dynamic = 'force-dynamic';
export const metadata = { title: 'Learning platform' };

/** A course's connection to the learning platform: cohort for arrivals, roster from the platform, scores sent back. */
export default async function CourseLearningPlatform({
  params,
  searchParams,
}: {
  params: Promise<{ courseId: string }>;
  searchParams: Promise<{ review?: string; next?: string }>;
}) {
  let courseId: number;
  try {
    courseId = idParam((await params).courseId);
  } catch {
    notFound();
  }
  const { Course, Cohort, LtiContext, LtiRegistration, LtiScoreOutbox, Practical, User } = models();
  const course = await Course.findByPk(courseId);
  if (!course) notFound();
  await authorizePage({ kind: 'course-manage', courseId: course.id });
  const { review, next } = await searchParams;
  const [contexts, cohorts] = await Promise.all([
    LtiContext.findAll({ where: { courseId: course.id }, order: [['id', 'ASC']] }),
    Cohort.findAll({ where: { courseId: course.id, archivedAt: null }, order: [['name', 'ASC']] }),
  ]);
  const registrations = await LtiRegistration.findAll({ where: { id: [...new Set(contexts.map((c) => c.registrationId))] } });
  const scores = contexts.length
    ? await LtiScoreOutbox.findAll({ where: { ltiContextId: contexts.map((c) => c.id) }, order: [['id', 'DESC']], limit: 200 })
    : [];
  const [practicals, students] = await Promise.all([
    Practical.findAll({ where: { id: [...new Set(scores.map((s) => s.practicalId))] }, attributes: ['id', 'title'] }),
    User.findAll({ where: { id: [...new Set(scores.map((s) => s.userId))] }, attributes: ['id', 'name'] }),
  ]);
  const views: PlatformContextView[] = contexts.map((c) => ({
    id: c.id,
    contextId: c.contextId,
    title: c.title,
    platform: registrations.find((r) => r.id === c.registrationId)?.name ?? '—',
    defaultCohortId: c.defaultCohortId,
    roster: Boolean(c.membershipsUrl),
    gradebook: Boolean(c.lineItemsUrl),
    rosterSyncedAt: c.rosterSyncedAt?.toISOString() ?? null,
  }));
  const rows: ScoreRow[] = scores.map((s) => ({
    id: s.id,
    ltiContextId: s.ltiContextId,
    submissionId: s.submissionId,
    practical: practicals.find((p) => p.id === s.practicalId)?.title ?? '—',
    student: students.find((u) => u.id === s.userId)?.name ?? '—',
    score: `${s.scoreGiven} / ${s.scoreMaximum}`,
    status: s.status,
    attempts: s.attempts,
    lastError: s.lastError,
    sentAt: s.sentAt?.toISOString() ?? null,
  }));
  const safeNext = next && next.startsWith('/') && !next.startsWith('//') ? next : null;
  return (
    <>
      <p className="mb-2 text-sm">
        <a href={`/courses/${course.id}`}>← {course.code}</a>
      </p>
      <PageHeader
        title={`${course.code} · learning platform`}
        lead="Students and staff arriving from the learning platform, its roster, and the scores Oscillab sends back to its gradebook."
      >
        {safeNext && (
          <a className="btn" href={safeNext}>
            Continue to the practical
          </a>
        )}
      </PageHeader>
      {views.length === 0 ? (
        <p className="card">
          This course is not connected to a learning-platform course. The site administrator connects it on{' '}
          <a href="/admin/learning-platform">Site administration → Learning platform</a>.
        </p>
      ) : (
        <PlatformCourse
          contexts={views}
          cohorts={cohorts.map((c) => ({ id: c.id, name: c.name }))}
          scores={rows}
          review={review ? Number(review) : null}
        />
      )}
    </>
  );
}
