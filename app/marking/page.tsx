import { authorizePage } from '@/lib/authz';
import { PageHeader } from '@/components/ui/page-header';

export const metadata = { title: 'Marking' };

export default async function MarkingHome() {
  await authorizePage({ kind: 'role', role: 'ta' });
  return (
    <>
      <PageHeader title="Marking" lead="Submissions from the cohorts you mark, with the engine’s proposed marks, ready to accept or adjust." />
      <p className="card text-ink-soft">Nothing is waiting to be marked.</p>
    </>
  );
}
