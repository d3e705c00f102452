import { authorizePage } from '@/lib/authz';
import { PageHeader } from '@/components/ui/page-header';

export const metadata = { title: 'My practicals' };

export default async function StudentHome() {
  const actor = await authorizePage({ kind: 'role', role: 'student' });
  return (
    <>
      <PageHeader title="My practicals" lead={`Signed in as ${actor.name}. Open practicals, deadlines, your submissions and released feedback appear here.`} />
      <p className="card text-ink-soft">No practical is open for your cohorts yet.</p>
    </>
  );
}
