import type { StudentAttemptView } from '@/lib/submissions/view';
import { VerdictTag } from './verdict';
import { speciesDisplay } from '@/lib/grading';

/** What the student may see of one attempt's checks (built by lib/submissions/view.ts). */
export function AttemptResult({ view }: { view: StudentAttemptView }) {
  return (
    <section className="card space-y-4" aria-labelledby={`attempt-${view.id}`}>
      <h3 id={`attempt-${view.id}`}>
        Attempt {view.attempt}
        {view.submittedAt && <span className="ml-2 text-sm font-normal text-ink-soft">submitted {new Date(view.submittedAt).toLocaleString('en-GB')}</span>}
        {view.isMarkedAttempt && <span className="ml-2 text-xs font-normal text-ink-soft">(the attempt that is marked)</span>}
      </h3>
      {view.daysLate > 0 && (
        <p className="text-sm">
          Submitted {view.daysLate} day{view.daysLate === 1 ? '' : 's'} after the deadline
          {view.latePenalty > 0 ? `; a late penalty of ${view.latePenalty} % of the total applies.` : '.'}
        </p>
      )}
      {view.formatNotes.length > 0 && (
        <div>
          <h4 className="text-sm font-bold">Format checks</h4>
          <ul className="list-disc pl-5 text-sm">
            {view.formatNotes.map((n, i) => (
              <li key={i}>{n.message}</li>
            ))}
          </ul>
        </div>
      )}
      {!view.showVerdicts && (
        <p className="text-sm text-ink-soft">This practical is assessed: verdicts and marks appear here when your marked work is released.</p>
      )}
      {view.showVerdicts && view.quantities.length > 0 && (
        <table className="data-table">
          <caption className="sr-only">Checks of your reported values</caption>
          <thead>
            <tr>
              <th scope="col">Quantity</th>
              <th scope="col" className="num">You reported</th>
              <th scope="col">From your own data</th>
              <th scope="col">Against the accepted value</th>
            </tr>
          </thead>
          <tbody>
            {view.quantities.map((q) => (
              <tr key={`${q.species}:${q.key}`}>
                <td>
                  {q.label} <span className="text-ink-soft">({speciesDisplay(q.species)})</span>
                  {q.slips.map((s) => (
                    <p key={s.code} className="mt-1 text-sm" data-slip={s.code}>
                      {s.message.startsWith(s.title) ? (
                        <>
                          <strong>{s.title}</strong>
                          {s.message.slice(s.title.length)}
                        </>
                      ) : (
                        <>
                          <strong>{s.title}.</strong> {s.message}
                        </>
                      )}
                    </p>
                  ))}
                </td>
                <td className="num whitespace-nowrap">{q.reportedText}</td>
                <td>{q.consistency ? <><VerdictTag verdict={q.consistency.verdict} /><div className="num text-xs text-ink-soft">expected {q.consistency.expectedDisplay}</div></> : '—'}</td>
                <td>{q.accuracy ? <><VerdictTag verdict={q.accuracy.verdict} /><div className="num text-xs text-ink-soft">accepted {q.accuracy.expectedDisplay}</div></> : '—'}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
      {view.fits.map((f) => (
        <div key={f.species} className="text-sm" data-testid="student-fit">
          <h4 className="font-bold">Your line list, {speciesDisplay(f.species)}</h4>
          <p>{f.description}</p>
          {f.notices.length > 0 && (
            <ul className="list-disc pl-5">
              {f.notices.map((n) => (
                <li key={n.code} data-notice={n.code}>{n.message}</li>
              ))}
            </ul>
          )}
        </div>
      ))}
      {view.spectrum && (
        <p className="text-sm">
          {view.spectrum.ok
            ? `Your spectrum: ${view.spectrum.matched} of ${view.spectrum.reported} reported lines match a peak (within ±${view.spectrum.tolerance.toFixed(2)} cm⁻¹)${view.spectrum.missing ? `; ${view.spectrum.missing} strong peaks are not in your list` : ''}.`
            : `Your spectrum could not be compared: ${view.spectrum.message}`}
        </p>
      )}
      {view.released && view.marks && (
        <div>
          <h4 className="text-sm font-bold">Marks</h4>
          <table className="data-table">
            <thead>
              <tr><th scope="col">Item</th><th scope="col" className="num">Marks</th><th scope="col">Comment</th></tr>
            </thead>
            <tbody>
              {view.marks.map((m, i) => (
                <tr key={i}><td>{m.label}</td><td className="num">{m.awarded ?? '—'} / {m.maxMarks}</td><td>{m.comment ?? ''}</td></tr>
              ))}
            </tbody>
          </table>
          {view.total && <p className="mt-2 text-sm font-bold">Total: <span className="num">{view.total.awarded ?? '—'} / {view.total.max ?? '—'}</span></p>}
          {view.feedbackUrl && <p className="mt-2"><a className="btn-quiet" href={view.feedbackUrl}>Download feedback (PDF)</a></p>}
        </div>
      )}
    </section>
  );
}
