import type { PrecheckView } from '@/lib/submissions/precheck';
import { QuantityChecks } from './attempt-result';

/** What "Check without submitting" found: format notes and, in practice mode, the verdicts. */
export function PrecheckPanel({ view }: { view: PrecheckView }) {
  return (
    <section className="card space-y-3 border-accent" aria-labelledby="precheck-heading" data-testid="precheck">
      <h3 id="precheck-heading">
        Check of your draft <span className="text-sm font-normal text-ink-soft">— nothing submitted, no attempt used</span>
      </h3>
      {view.formatNotes.length === 0 ? (
        <p className="text-sm">
          <span aria-hidden="true" className="text-verdict-within">
            ✓{' '}
          </span>
          No format problems: every value has a number, a unit of the right kind and the uncertainties asked for.
        </p>
      ) : (
        <div>
          <h4 className="text-sm font-bold">Format checks to fix before you submit</h4>
          <ul className="list-disc pl-5 text-sm">
            {view.formatNotes.map((n, i) => (
              <li key={i}>{n.message}</li>
            ))}
          </ul>
        </div>
      )}
      {view.showVerdicts ? (
        view.quantities.length > 0 && <QuantityChecks quantities={view.quantities} caption="Checks of your draft values" />
      ) : (
        <p className="text-sm text-ink-soft">
          This practical is assessed: the verdicts on your numbers come with the marked feedback. The format checks above are all you see
          before then.
        </p>
      )}
      {view.spectrum && (
        <p className="text-sm">
          {view.spectrum.ok
            ? `Your spectrum: ${view.spectrum.matched} of ${view.spectrum.reported} lines match a peak${view.spectrum.missing ? `; ${view.spectrum.missing} strong peaks are not in your list` : ''}.`
            : `Your spectrum could not be compared: ${view.spectrum.message}`}
        </p>
      )}
    </section>
  );
}

/** The confirmation's list: what Submit hands in now and what it costs. */
export function HandInSummary({ view, attemptNumber }: { view: PrecheckView; attemptNumber: number }) {
  const h = view.handIn;
  return (
    <>
      <p>
        This hands in attempt <strong>{attemptNumber}</strong> of <strong>{view.attemptsTotal}</strong>; afterwards you have{' '}
        <strong>{Math.max(0, view.attemptsLeft - 1)}</strong> attempt{view.attemptsLeft - 1 === 1 ? '' : 's'} left. Your last submitted
        attempt is the one marked.
      </p>
      <ul className="list-disc pl-5">
        {h.species.map((s) => (
          <li key={s.name}>
            {s.display}: {s.lines} line{s.lines === 1 ? '' : 's'} ({s.assigned} assigned), {s.values} value{s.values === 1 ? '' : 's'}
          </li>
        ))}
        <li>
          Spectrum: {h.spectrum ?? 'none'} · Report: {h.report ?? 'none'}
        </li>
      </ul>
      {h.missing.length > 0 && (
        <p>
          <strong>Not reported</strong> (these earn no marks): {h.missing.join(', ')}.
        </p>
      )}
      {view.formatNotes.length > 0 && (
        <p className="text-verdict-partial">
          <span aria-hidden="true">◐ </span>
          {view.formatNotes.length} format problem{view.formatNotes.length === 1 ? '' : 's'} still open (listed under “Check of your
          draft”).
        </p>
      )}
      {view.late.days > 0 && (
        <p className="text-verdict-outside">
          <span aria-hidden="true">✗ </span>
          {view.late.accepted
            ? `The deadline has passed: this attempt is ${view.late.days} day${view.late.days === 1 ? '' : 's'} late${view.late.penalty ? ` and loses ${view.late.penalty} % of its total` : ''}.`
            : 'The deadline has passed and late work is not accepted for this practical.'}
        </p>
      )}
      <p>
        {view.mode === 'practice'
          ? 'You see the checks of your numbers as soon as it is in.'
          : 'You see format checks now; verdicts and marks when the marking is released.'}
      </p>
    </>
  );
}
