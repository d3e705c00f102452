import { redirect } from 'next/navigation';
import { authorizePage } from '@/lib/authz';
import { PageHeader } from '@/components/ui/page-header';
import { MarkingQueue } from '@/components/marking/queue';
import { markingScope, queueFilters } from '@/lib/marking/queue';

export const metadata = { title: 'Marking' };
export const dynamic = 'force-dynamic';

export default async function MarkingHome() {
  const actor = await authorizePage({ kind: 'signed-in' });
  if (!(await markingScope(actor))) redirect('/not-permitted');
  const filters = await queueFilters(actor);
  return (
    <>
      <PageHeader
        title="Marking"
        lead="Submissions from the cohorts you mark, with the engine’s proposed marks, ready to accept or adjust."
      />
      <section aria-labelledby="queue-keys-heading" className="mb-4 text-sm text-ink-soft">
        <h2 id="queue-keys-heading" className="sr-only">
          Keyboard
        </h2>
        <p id="queue-keys">
          Keyboard: <kbd>j</kbd> or <kbd>↓</kbd> next, <kbd>k</kbd> or <kbd>↑</kbd> previous, <kbd>Enter</kbd> open, <kbd>a</kbd> accept the
          proposed mark, <kbd>r</kbd> open the report, <kbd>x</kbd> select for release.
        </p>
      </section>
      <MarkingQueue practicals={filters.practicals} cohorts={filters.cohorts} />
    </>
  );
}
