import { authorizePage } from '@/lib/authz';
import { PageHeader } from '@/components/ui/page-header';

export const metadata = { title: 'Courses & practicals' };

export default async function CoursesHome() {
  await authorizePage({ kind: 'role', role: 'instructor' });
  return (
    <>
      <PageHeader title="Courses & practicals" lead="Set up cohorts and rosters, define practicals with their quantities and tolerance bands, and moderate marking." />
      <p className="card text-ink-soft">Course set-up screens are being built.</p>
    </>
  );
}
