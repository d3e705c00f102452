import { authorizePage } from '@/lib/authz';
import { PageHeader } from '@/components/ui/page-header';
import { managedCourses } from '@/lib/instructor/courses';
import { CoursesOverview } from '@/components/instructor/courses-overview';

export const metadata = { title: 'Courses & practicals' };
export const dynamic = 'force-dynamic';

export default async function CoursesHome() {
  const actor = await authorizePage({ kind: 'course-manager' });
  const courses = await managedCourses(actor);
  return (
    <>
      <PageHeader
        title="Courses & practicals"
        lead="Set up cohorts and rosters, define practicals with their quantities and tolerance bands, and copy them to a new term."
      />
      <CoursesOverview courses={courses} />
    </>
  );
}
