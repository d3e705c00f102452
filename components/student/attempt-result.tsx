import type { StudentAttemptView, StudentQuantityView } from '@/lib/submissions/view';
import { VerdictTag } from './verdict';
import { speciesDisplay } from '@/lib/grading/species';

function SlipNote({ s }: { s: StudentQuantityView['slips'][number] }) {
  if (s.explainedWith) {
    return (
      <p className="mt-1 text-sm" data-slip={s.code}>
        <strong>{s.title}</strong> — the same slip as in {s.explainedWith}, explained there.
      </p>
    );
  }
  return (
    <p className="mt-1 text-sm" data-slip={s.code}>
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
  );
}

function BasisCell({ label, basis, word }: { label: string; basis: StudentQuantityView['consistency']; word: string }) {
  return (
    <td data-label={label}>
      {basis ? (
        <div>
          <VerdictTag verdict={basis.verdict} />
          <div className="num mt-0.5 text-xs text-ink-soft">
            {word} <span className="nowrap">{basis.expectedDisplay}</span>
          </div>
        </div>
      ) : (
        '—'
      )}
    </td>
  );
}

/** The verdicts of the reported values: a table on wide screens, one block per quantity on a phone. */
/** The fit of each line list in words, and what the check noticed about it. */
export function FitNotes({ fits }: { fits: StudentAttemptView['fits'] }) {
  return (
    <>
      {fits.map((f) => (
        <div key={f.species} className="text-sm" data-testid="student-fit">
          <h4 className="font-bold">Your line list, {speciesDisplay(f.species)}</h4>
          <p>{f.description}</p>
          {f.notices.length > 0 && (
            <ul className="list-disc pl-5">
              {f.notices.map((n) => (
                <li key={n.code} data-notice={n.code}>
                  {n.message}
                </li>
              ))}
            </ul>
          )}
        </div>
      ))}
    </>
  );
}

export function QuantityChecks({ quantities, caption }: { quantities: StudentQuantityView[]; caption: string }) {
  return (
    <table className="data-table stack-table">
      <caption className="sr-only">{caption}</caption>
      <thead>
        <tr>
          <th scope="col">Quantity</th>
          <th scope="col" className="num">
            You reported
          </th>
          <th scope="col" className="min-w-[10.5rem]">
            From your own data
          </th>
          <th scope="col" className="min-w-[10.5rem]">
            Against the accepted value
          </th>
        </tr>
      </thead>
      <tbody>
        {quantities.map((q) => (
          <tr key={`${q.species}:${q.key}`} data-quantity={`${q.species}:${q.key}`}>
            <td data-label="">
              <span className="font-bold sm:font-normal">{q.label}</span>{' '}
              <span className="text-ink-soft">({speciesDisplay(q.species)})</span>
              {q.slips.map((s) => (
                <SlipNote key={s.code} s={s} />
              ))}
            </td>
            <td className="num" data-label="You reported">
              <span className="nowrap">{q.reportedText}</span>
            </td>
            <BasisCell label="From your own data" basis={q.consistency} word="expected" />
            <BasisCell label="Against the accepted value" basis={q.accuracy} word="accepted" />
          </tr>
        ))}
      </tbody>
    </table>
  );
}

/** What the student may see of one attempt's checks (built by lib/submissions/view.ts). */
export function AttemptResult({ view, idPrefix = 'attempt' }: { view: StudentAttemptView; idPrefix?: string }) {
  return (
    <section
      id={`${idPrefix}-${view.id}`}
      className="card scroll-mt-4 space-y-4"
      aria-labelledby={`${idPrefix}-${view.id}-h`}
      data-attempt={view.attempt}
    >
      <h3 id={`${idPrefix}-${view.id}-h`}>
        Attempt {view.attempt}
        {view.submittedAt && (
          <span className="ml-2 text-sm font-normal text-ink-soft">
            submitted {new Date(view.submittedAt).toLocaleString('en-GB', { dateStyle: 'medium', timeStyle: 'short' })}
          </span>
        )}
        {view.isMarkedAttempt && (
          <span className="ml-2 inline-block rounded bg-accent-soft px-1.5 text-xs font-bold text-accent" data-testid="marked-attempt">
            the attempt that is marked
          </span>
        )}
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
        <p className="text-sm text-ink-soft">
          This practical is assessed: verdicts and marks appear here when your marked work is released.
        </p>
      )}
      {view.showVerdicts && view.quantities.length > 0 && (
        <QuantityChecks quantities={view.quantities} caption="Checks of your reported values" />
      )}
      <FitNotes fits={view.fits} />
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
          <table className="data-table stack-table">
            <thead>
              <tr>
                <th scope="col">Item</th>
                <th scope="col" className="num">
                  Marks
                </th>
                <th scope="col">Comment</th>
              </tr>
            </thead>
            <tbody>
              {view.marks.map((m, i) => (
                <tr key={i}>
                  <td data-label="">{m.label}</td>
                  <td className="num" data-label="Marks">
                    <span className="nowrap">
                      {m.awarded ?? '—'} / {m.maxMarks}
                    </span>
                  </td>
                  <td data-label={m.comment ? 'Comment' : ''}>{m.comment ?? ''}</td>
                </tr>
              ))}
            </tbody>
          </table>
          {view.total && (
            <p className="mt-2 text-sm font-bold">
              Total:{' '}
              <span className="num">
                {view.total.awarded ?? '—'} / {view.total.max ?? '—'}
              </span>
            </p>
          )}
          {view.feedbackUrl && (
            <p className="mt-2">
              <a className="btn-quiet" href={view.feedbackUrl}>
                Download feedback (PDF)
              </a>
            </p>
          )}
        </div>
      )}
    </section>
  );
}
