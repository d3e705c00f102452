import Link from 'next/link';
import { notFound } from 'next/navigation';
import { authorizePage } from '@/lib/authz';
import { idParam } from '@/lib/http';
import { PageHeader } from '@/components/ui/page-header';
import { managedCourses } from '@/lib/instructor/courses';
import { CourseWorkspace } from '@/components/instructor/course-workspace';
import { models } from '@/models';

export const dynamic = 'force-dynamic';

export async function generateMetadata({ params }: { params: Promise<{ courseId: string }> }) {
  const id = Number((await params).courseId);
  const course = Number.isSafeInteger(id) ? await models().Course.findByPk(id) : null;
  return { title: course ? `${course.code} set-up` : 'Course' };
}

export default async function CoursePage({ params }: { params: Promise<{ courseId: string }> }) {
  let courseId: number;
  try {
    courseId = idParam((await params).courseId);
  } catch {
    notFound();
  }
  const course = await models().Course.findByPk(courseId);
  if (!course) notFound();
  const actor = await authorizePage({ kind: 'course-manage', courseId: course.id });
  const summary = (await managedCourses(actor)).find((c) => c.id === course.id)!;
  return (
    <>
      <p className="mb-2 text-sm">
        <Link href="/courses">← All courses</Link>
      </p>
      <PageHeader
        title={`${course.code} · ${course.title}`}
        lead={course.archivedAt ? 'This course is archived.' : 'Cohorts, roster, staff, TA duties and practicals.'}
      >
        {(await models().LtiContext.count({ where: { courseId: course.id } })) > 0 && (
          <Link className="btn-quiet" href={`/courses/${course.id}/learning-platform`}>
            Learning platform
          </Link>
        )}
      </PageHeader>
      <CourseWorkspace course={summary} />
    </>
  );
}
