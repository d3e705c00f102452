/**
 * Oscillab's own reading of the student's spectrum, on the marking screen: what it found in each
 * uploaded spectrum, the student's lines counted per band, and — when the practical has it
 * switched on — the third comparison, "from the spectrum", with its own verdicts and legend.
 */
import { SPECTRUM_VERDICT, type SpectrumAnalysisView, type SpectrumVerdict } from '@/lib/submissions/spectrum-analysis-view';
import { ValueNote, splitNote } from '@/components/ui/value-note';

export function SpectrumVerdictBadge({ verdict }: { verdict: SpectrumVerdict }) {
  const v = SPECTRUM_VERDICT[verdict] ?? SPECTRUM_VERDICT['not-checked'];
  return (
    <span className={`inline-flex items-center gap-1 whitespace-nowrap rounded px-1.5 py-0.5 text-xs font-bold ${v.className}`}>
      <span aria-hidden="true">{v.symbol}</span>
      {v.word}
    </span>
  );
}

export function SpectrumAnalysisPanel({ view }: { view: SpectrumAnalysisView | null }) {
  if (!view) return null;
  return (
    <section aria-labelledby="analysis-heading" className="card mb-6" data-testid="spectrum-analysis">
      <h2 id="analysis-heading" className="mb-2">
        Oscillab’s reading of the spectrum
      </h2>
      {view.comparison && (
        <div className="mb-4 overflow-x-auto">
          <h3 className="text-base">Third comparison: from the student’s spectrum</h3>
          <p className="hint mb-2" data-testid="from-spectrum-legend">
            {view.comparison.legend} Verdict words:{' '}
            {Object.values(SPECTRUM_VERDICT)
              .map((v) => `${v.symbol} ${v.word}`)
              .join(' · ')}
            .
          </p>
          {view.comparison.rows.length === 0 ? (
            <p className="text-ink-soft">
              No reported number could be compared with the spectrum (no band of that isotopologue was fitted).
            </p>
          ) : (
            <>
              <table className="data-table hidden md:table">
                <thead>
                  <tr>
                    <th scope="col">Quantity</th>
                    <th scope="col" className="num">
                      Reported
                    </th>
                    <th scope="col" className="num">
                      From the spectrum
                    </th>
                    <th scope="col" className="num">
                      Deviation
                    </th>
                    <th scope="col">Verdict (spectrum)</th>
                  </tr>
                </thead>
                <tbody>
                  {view.comparison.rows.map((r, i) => (
                    <tr key={i}>
                      <th scope="row" className="text-left font-normal">
                        {r.label}
                      </th>
                      <td className="num">
                        <ValueNote {...splitNote(r.reported, ' (')} below />
                      </td>
                      <td className="num">
                        <ValueNote {...splitNote(r.fromSpectrum, ' (')} below />
                      </td>
                      <td className="num">
                        <ValueNote {...splitNote(r.deviation, ' (')} below />
                      </td>
                      <td title={`Judged against ${r.basis}`}>
                        <SpectrumVerdictBadge verdict={r.verdict} />
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
              {/* On a phone: one short block per quantity, the verdict first in view. */}
              <ul className="space-y-2 md:hidden">
                {view.comparison.rows.map((r, i) => (
                  <li key={i} className="rounded border border-rule p-2 text-sm">
                    <p className="font-bold">{r.label}</p>
                    <p className="mt-1">
                      <SpectrumVerdictBadge verdict={r.verdict} />
                    </p>
                    <dl className="mt-1 grid grid-cols-[auto_1fr] gap-x-3">
                      <dt className="text-ink-soft">Reported</dt>
                      <dd className="num">{r.reported}</dd>
                      <dt className="text-ink-soft">From the spectrum</dt>
                      <dd className="num">{r.fromSpectrum}</dd>
                      <dt className="text-ink-soft">Deviation</dt>
                      <dd className="num">{r.deviation}</dd>
                    </dl>
                  </li>
                ))}
              </ul>
            </>
          )}
        </div>
      )}
      {view.perBand.length > 0 && (
        <div className="mb-4">
          <h3 className="text-base">The student’s lines against the spectrum, band by band</h3>
          <ul className="mt-1 list-disc pl-5 text-sm">
            {view.perBand.map((b, i) => (
              <li key={i}>{b.message}</li>
            ))}
          </ul>
        </div>
      )}
      {view.samples.map((s, i) => (
        <div key={i} className="mb-3 text-sm">
          <h3 className="text-base">
            {s.label}
            {s.file ? `: ${s.file}` : ''}
          </h3>
          {s.message && <p className="text-ink-soft">{s.message}</p>}
          {s.lineShape && <p className="text-ink-soft">{s.lineShape}</p>}
          {s.bands.length > 0 && (
            <ul className="mt-1 space-y-1">
              {s.bands.map((b, j) => (
                <li key={j}>
                  <span className="font-bold">{b.label}</span>: {b.status}
                  {b.lines ? `, ${b.lines} lines` : ''}
                  {b.constants && <span className="num block">{b.constants}</span>}
                  {b.warnings.map((w, k) => (
                    <span key={k} className="block text-ink-soft">
                      {w}
                    </span>
                  ))}
                </li>
              ))}
            </ul>
          )}
          {s.calibration && <p className="mt-1">{s.calibration}</p>}
          {s.unassigned && <p className="mt-1 text-ink-soft">{s.unassigned}</p>}
          {s.problems.map((p, k) => (
            <p key={k} className="mt-1 text-ink-soft">
              {p}
            </p>
          ))}
        </div>
      ))}
    </section>
  );
}
