import { notFound } from 'next/navigation';
import { authorizePage } from '@/lib/authz';
import { PageHeader } from '@/components/ui/page-header';
import { VerdictBadge } from '@/components/marking/verdict-badge';
import { MarkingForm } from '@/components/marking/marking-form';
import { SpectrumAnalysisPanel } from '@/components/marking/spectrum-analysis';
import { HttpError } from '@/lib/http';
import { submissionScope } from '@/lib/marking/access';
import { loadMarkingView } from '@/lib/marking/view';
import { fitPlotModel, residualModel } from '@/lib/marking/fit-plot';
import { renderSvg } from '@/lib/spectrum';
import { spectrumFigure } from '@/lib/submissions/spectrum-figure';
import { models } from '@/models';

export const metadata = { title: 'Mark a submission' };
export const dynamic = 'force-dynamic';

export default async function MarkSubmission({ params }: { params: Promise<{ submissionId: string }> }) {
  const raw = (await params).submissionId;
  const id = Number(raw);
  if (!/^\d{1,12}$/.test(raw)) notFound();
  let scope;
  try {
    scope = (await submissionScope(id)).scope;
  } catch (e) {
    if (e instanceof HttpError && e.status === 404) notFound();
    throw e;
  }
  await authorizePage({ kind: 'submission-mark', ...scope });
  const view = await loadMarkingView(id);
  const { Submission, Practical } = models();
  const submissionRow = (await Submission.findByPk(id))!;
  const spectrum = await spectrumFigure(submissionRow, (await Practical.findByPk(submissionRow.practicalId))!, 'staff');
  const plots = view.fits
    .filter((f) => f.residuals.length)
    .map((f, i) => ({
      species: f.species,
      fit: renderSvg(fitPlotModel(f), { title: `Line positions against m with the fit${f.species ? `, ${f.species}` : ''}`, idPrefix: `fit-${i}` }),
      residuals: renderSvg(residualModel(f), { title: `Residuals of the fit${f.species ? `, ${f.species}` : ''}`, idPrefix: `res-${i}` }),
    }));

  return (
    <>
      <PageHeader
        title={`${view.student.name} — ${view.practical.title}`}
        lead={`${view.course.code} · ${view.cohort.name} · attempt ${view.submission.attempt} · submitted ${view.submission.submittedAt ? new Date(view.submission.submittedAt).toLocaleString('en-GB', { dateStyle: 'medium', timeStyle: 'short' }) : '—'}${view.submission.daysLate ? ` · ${view.submission.daysLate} day(s) late, penalty ${view.submission.latePenalty} %` : ''}`}
      >
        <a className="btn-quiet" href="/marking">Back to the queue</a>
        <a className="btn-quiet" href={`/api/marking/${id}/preview`} target="_blank" rel="noopener">Feedback PDF</a>
      </PageHeader>

      <section aria-labelledby="values-heading" className="card mb-6 overflow-x-auto">
        <h2 id="values-heading" className="mb-2">Reported, recomputed and reference values</h2>
        <p className="hint mb-3">Recomputed: from the student’s own data (consistency). Reference: the accepted value (accuracy).</p>
        <table className="data-table">
          <thead>
            <tr>
              <th scope="col">Quantity</th>
              <th scope="col">Reported (as typed)</th>
              <th scope="col" className="num">Recomputed</th>
              <th scope="col" className="num">Deviation</th>
              <th scope="col">Consistency</th>
              <th scope="col" className="num">Reference</th>
              <th scope="col" className="num">Deviation</th>
              <th scope="col">Accuracy</th>
            </tr>
          </thead>
          <tbody>
            {view.quantities.map((q) => (
              <tr key={q.itemKey}>
                <th scope="row" className="text-left font-normal">{q.label}</th>
                <td className="num">{q.reportedTyped}</td>
                <td className="num">{q.consistency?.expectedDisplay ?? '—'}</td>
                <td className="num">{q.consistency ? `${q.consistency.deviationDisplay}${q.consistency.relativeDeviationPercent !== null ? ` (${q.consistency.relativeDeviationPercent.toFixed(2)} %)` : ''}` : '—'}</td>
                <td><VerdictBadge verdict={q.consistency?.verdict} /></td>
                <td className="num">{q.accuracy?.expectedDisplay ?? '—'}</td>
                <td className="num">{q.accuracy ? `${q.accuracy.deviationDisplay}${q.accuracy.relativeDeviationPercent !== null ? ` (${q.accuracy.relativeDeviationPercent.toFixed(2)} %)` : ''}` : '—'}</td>
                <td><VerdictBadge verdict={q.accuracy?.verdict} /></td>
              </tr>
            ))}
          </tbody>
        </table>
      </section>

      <section aria-labelledby="slips-heading" className="card mb-6">
        <h2 id="slips-heading" className="mb-2">Named slips</h2>
        {view.slips.length === 0 ? (
          <p className="text-ink-soft">No slip was recognised.</p>
        ) : (
          <ul className="space-y-3">
            {view.slips.map((s) => (
              <li key={`${s.key}-${s.code}`}>
                <p className="font-bold">{s.title} <span className="font-normal text-ink-soft">— {s.quantityLabel}</span></p>
                <p>{s.explanation}</p>
                <p className="num text-sm">{s.formula}</p>
              </li>
            ))}
          </ul>
        )}
      </section>

      <section aria-labelledby="spectrum-heading" className="card mb-6">
        <h2 id="spectrum-heading" className="mb-2">Spectrum with the student’s lines</h2>
        {spectrum.ok ? (
          <>
            <div className="overflow-x-auto text-ink" data-testid="marking-spectrum" dangerouslySetInnerHTML={{ __html: spectrum.svg }} />
            <p className="mt-2 text-sm">
              {spectrum.summary.ok
                ? `${spectrum.summary.matched} of ${spectrum.summary.reported} reported lines match a peak (within ±${spectrum.summary.tolerance.toFixed(2)} cm⁻¹)${spectrum.summary.missing ? `; ${spectrum.summary.missing} strong peaks are not in the list` : ''}.`
                : spectrum.summary.message}
            </p>
          </>
        ) : (
          <p className="text-ink-soft">{spectrum.message}</p>
        )}
      </section>

      <SpectrumAnalysisPanel view={view.spectrumAnalysis} />

      {plots.map((p, i) => (
        <section key={i} aria-labelledby={`fit-heading-${i}`} className="card mb-6">
          <h2 id={`fit-heading-${i}`} className="mb-2">Line fit and residuals{p.species ? ` (${p.species})` : ''}</h2>
          <div className="overflow-x-auto text-ink" dangerouslySetInnerHTML={{ __html: p.fit }} />
          <div className="overflow-x-auto text-ink" dangerouslySetInnerHTML={{ __html: p.residuals }} />
        </section>
      ))}
      {plots.length === 0 && <p className="card mb-6 text-ink-soft">No line fit is available for this submission.</p>}

      <MarkingForm initial={view} />

      <section aria-labelledby="report-heading" className="card mb-6">
        <h2 id="report-heading" className="mb-2">Report</h2>
        {view.report ? (
          <iframe title={`Report of ${view.student.name}`} src={`/api/marking/${id}/report`} className="h-[80vh] w-full border border-rule" />
        ) : (
          <p className="text-ink-soft">No report PDF was uploaded.</p>
        )}
      </section>
    </>
  );
}
