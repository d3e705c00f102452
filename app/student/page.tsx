import Link from 'next/link';
import { authorizePage } from '@/lib/authz';
import { PageHeader } from '@/components/ui/page-header';
import { openPracticalsFor, timeLeft } from '@/lib/submissions/student-home';

export const metadata = { title: 'My practicals' };
export const dynamic = 'force-dynamic';

const STATUS_WORDS: Record<string, string> = {
  submitted: 'submitted, awaiting marking',
  marked: 'marked, feedback not yet released',
  released: 'released',
  'resubmission-requested': 'returned: resubmission requested',
};

export default async function StudentHome() {
  const actor = await authorizePage({ kind: 'role', role: 'student' });
  const practicals = await openPracticalsFor(actor);
  return (
    <>
      <PageHeader
        title="My practicals"
        lead={`Signed in as ${actor.name}. Open practicals, deadlines, your submissions and released feedback.`}
      />
      {practicals.length === 0 ? (
        <p className="card text-ink-soft">No practical is open for your cohorts yet.</p>
      ) : (
        <div className="card p-3 sm:p-5">
          <table className="data-table stack-table">
            <caption className="sr-only">Open practicals</caption>
            <thead>
              <tr>
                <th scope="col">Practical</th>
                <th scope="col">Cohort</th>
                <th scope="col">Deadline</th>
                <th scope="col" className="num">
                  Attempts left
                </th>
                <th scope="col">Your work</th>
              </tr>
            </thead>
            <tbody>
              {practicals.map((p) => (
                <tr key={`${p.practicalId}`}>
                  <td data-label="">
                    <Link href={`/student/practicals/${p.practicalId}`} className="font-bold">
                      {p.title}
                    </Link>
                    <div className="text-xs text-ink-soft">{p.mode === 'practice' ? 'Practice: checks shown at once' : 'Assessed'}</div>
                  </td>
                  <td data-label="Cohort">{p.cohortName}</td>
                  <td data-label="Deadline">
                    <div>
                      <span className="num">
                        {new Date(p.deadline).toLocaleString('en-GB', { dateStyle: 'medium', timeStyle: 'short' })}
                      </span>
                      <div className="text-xs text-ink-soft">{timeLeft(new Date(p.deadline))}</div>
                    </div>
                  </td>
                  <td className="num" data-label="Attempts left">
                    {p.attemptsLeft}
                  </td>
                  <td data-label="Your work">
                    {p.released && p.mark ? (
                      <span>
                        Feedback released:{' '}
                        <strong className="num nowrap">
                          {p.mark.awarded ?? '—'} of {p.mark.max ?? '—'}
                        </strong>
                      </span>
                    ) : p.latestStatus ? (
                      `Attempt ${p.attemptsUsed} ${STATUS_WORDS[p.latestStatus] ?? p.latestStatus}`
                    ) : p.hasDraft ? (
                      'Draft saved'
                    ) : (
                      'Not started'
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </>
  );
}
