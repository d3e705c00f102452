import { authorizePage } from '@/lib/authz';
import { PageHeader } from '@/components/ui/page-header';

export const metadata = { title: 'Cohort statistics' };

export default async function StatisticsHome() {
  await authorizePage({ kind: 'role', role: 'lead' });
  return (
    <>
      <PageHeader title="Cohort statistics" lead="Where a cohort goes wrong: deviations per quantity, the most frequent slips, marker consistency and exports." />
      <p className="card text-ink-soft">Statistics appear once submissions have been checked.</p>
    </>
  );
}
