import Link from 'next/link';
import { Suspense } from 'react';
import { notFound } from 'next/navigation';
import { authorizePage } from '@/lib/authz';
import { PageHeader } from '@/components/ui/page-header';
import { TableScroll } from '@/components/ui/table-scroll';
import { ValueNote, splitNote } from '@/components/ui/value-note';
import { VerdictBadge } from '@/components/marking/verdict-badge';
import { MarkingForm } from '@/components/marking/marking-form';
import { ScoreDelivery } from '@/components/lti/score-delivery';
import { FitPlots, SpectrumSection } from '@/components/marking/plots';
import { cohortName } from '@/lib/display';
import { SpectrumAnalysisPanel } from '@/components/marking/spectrum-analysis';
import { HttpError } from '@/lib/http';
import { submissionScope } from '@/lib/authz/submission';
import { nextToMark } from '@/lib/marking/next';
import { loadMarkingView, type BasisRow, type MarkingView } from '@/lib/marking/view';
import { slipsByCode } from '@/lib/marking/feedback-input';

export const metadata = { title: 'Mark a submission' };
export const dynamic = 'force-dynamic';

function deviation(b: BasisRow | null) {
  if (!b) return '—';
  return (
    <ValueNote value={b.deviationDisplay} note={b.relativeDeviationDisplay === null ? null : `(${b.relativeDeviationDisplay})`} below />
  );
}

/** The submission the address names, with its scope for the authorisation; an address that names none is a 404. */
async function findSubmission(raw: string) {
  if (!/^\d{1,12}$/.test(raw)) notFound();
  try {
    return await submissionScope(Number(raw));
  } catch (e) {
    if (e instanceof HttpError && e.status === 404) notFound();
    throw e;
  }
}

/** Course, cohort, attempt, when it came in, and any lateness, in one line under the title. */
/** One comparison of a reported value (consistency or accuracy): the expected value, the deviation and the verdict. */
function ComparisonCells({ basis, expectedLabel, verdictLabel }: { basis: BasisRow | null; expectedLabel: string; verdictLabel: string }) {
  return (
    <>
      <td className="num" data-label={expectedLabel}>
        <span className="nowrap">{basis?.expectedDisplay ?? '—'}</span>
      </td>
      <td className="num" data-label="Deviation">
        {deviation(basis)}
      </td>
      <td data-label={verdictLabel}>
        <VerdictBadge verdict={basis?.verdict} />
      </td>
    </>
  );
}

function leadLine(view: MarkingView) {
  const { submission } = view;
  const submitted = submission.submittedAt
    ? new Date(submission.submittedAt).toLocaleString('en-GB', { dateStyle: 'medium', timeStyle: 'short' })
    : '—';
  const late = submission.daysLate ? ` · ${submission.daysLate} day(s) late, penalty ${submission.latePenalty} %` : '';
  return `${view.course.code} · ${cohortName(view.cohort)} · attempt ${submission.attempt} · submitted ${submitted}${late}`;
}

function ValuesSection({ quantities }: { quantities: MarkingView['quantities'] }) {
  return (
    <section aria-labelledby="values-heading" className="card mb-6">
      <h2 id="values-heading" className="mb-2">
        Reported, recomputed and reference values
      </h2>
      <p className="hint mb-3">
        Recomputed: from the student’s own data (consistency). Reference: the accepted value (accuracy). Deviation = reported − expected.
      </p>
      <TableScroll label="Reported, recomputed and reference values">
        <table className="data-table stack-table">
          <thead>
            <tr>
              <th scope="col" className="min-w-[8.5rem]">
                Quantity
              </th>
              <th scope="col">Reported (as typed)</th>
              <th scope="col" className="num">
                Recomputed
              </th>
              <th scope="col" className="num">
                Deviation
              </th>
              <th scope="col">Consistency</th>
              <th scope="col" className="num">
                Reference
              </th>
              <th scope="col" className="num">
                Deviation
              </th>
              <th scope="col">Accuracy</th>
            </tr>
          </thead>
          <tbody>
            {quantities.map((q) => (
              <tr key={q.itemKey} data-quantity={q.itemKey}>
                <th scope="row" className="text-left font-bold sm:font-normal">
                  {q.label}
                </th>
                <td className="num" data-label="Reported">
                  <ValueNote {...splitNote(q.reportedTyped, ' ± ')} />
                </td>
                <ComparisonCells basis={q.consistency} expectedLabel="Recomputed" verdictLabel="Consistency" />
                <ComparisonCells basis={q.accuracy} expectedLabel="Reference" verdictLabel="Accuracy" />
              </tr>
            ))}
          </tbody>
        </table>
      </TableScroll>
    </section>
  );
}

function SlipsSection({ slips }: { slips: MarkingView['slips'] }) {
  return (
    <section aria-labelledby="slips-heading" className="card mb-6">
      <h2 id="slips-heading" className="mb-2">
        Named slips
      </h2>
      {slips.length === 0 ? (
        <p className="text-ink-soft">No slip was recognised.</p>
      ) : (
        <ul className="space-y-3">
          {slipsByCode(slips).map((s) => (
            <li key={s.title} data-slip={slips.find((x) => x.title === s.title)?.code}>
              <p className="font-bold">
                {s.title} <span className="font-normal text-ink-soft">— {s.quantity}</span>
              </p>
              <p>{s.explanation}</p>
              {s.formula && <p className="num text-sm">{s.formula}</p>}
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}

/** The slow part: the spectrum and the fit plots, each streamed in behind its own placeholder. */
function Plots({ submissionId, fits }: { submissionId: number; fits: MarkingView['fits'] }) {
  return (
    <>
      <Suspense
        fallback={
          <p className="card mb-6 text-ink-soft" role="status">
            Drawing the spectrum with the student’s lines…
          </p>
        }
      >
        <SpectrumSection submissionId={submissionId} />
      </Suspense>
      <Suspense
        fallback={
          <p className="card mb-6 text-ink-soft" role="status">
            Drawing the line fit…
          </p>
        }
      >
        <FitPlots fits={fits} />
      </Suspense>
    </>
  );
}

function ReportSection({ submissionId, view }: { submissionId: number; view: MarkingView }) {
  return (
    <section aria-labelledby="report-heading" className="card mb-6">
      <h2 id="report-heading" className="mb-2">
        Report
      </h2>
      {view.report ? (
        <>
          <p className="mb-2 text-sm">
            <a href={`/api/marking/${submissionId}/report`} target="_blank" rel="noopener">
              Open {view.report.originalName} in a new tab
            </a>
          </p>
          <iframe
            title={`Report of ${view.student.name}`}
            src={`/api/marking/${submissionId}/report`}
            loading="lazy"
            className="h-[80vh] w-full border border-rule"
          />
        </>
      ) : (
        <p className="text-ink-soft">No report PDF was uploaded.</p>
      )}
    </section>
  );
}

/**
 * The marking screen. The values, slips and marks come with the first bytes; the spectrum and the
 * fit plots, the slow part to draw, stream in after them (Suspense), so the marker can start at once.
 */
export default async function MarkSubmission({ params }: { params: Promise<{ submissionId: string }> }) {
  const raw = (await params).submissionId;
  const id = Number(raw);
  const found = await findSubmission(raw);
  const actor = await authorizePage({ kind: 'submission-mark', ...found.scope });
  const [view, next] = await Promise.all([loadMarkingView(id, found), nextToMark(actor, id)]);

  return (
    <>
      <PageHeader title={`${view.student.name} — ${view.practical.title}`} lead={leadLine(view)}>
        <Link className="btn-quiet" href="/marking">
          Back to the queue
        </Link>
        <a className="btn-quiet" href={`/api/marking/${id}/preview`} target="_blank" rel="noopener">
          Feedback PDF
        </a>
        {next && (
          <Link className="btn-quiet" href={`/marking/${next.id}`} data-testid="next-submission">
            Next to mark: {next.student} →
          </Link>
        )}
      </PageHeader>
      <ValuesSection quantities={view.quantities} />
      <SlipsSection slips={view.slips} />
      <Plots submissionId={id} fits={view.fits} />
      <SpectrumAnalysisPanel view={view.spectrumAnalysis} />
      <MarkingForm initial={view} next={next} />
      <ScoreDelivery submissionId={id} courseId={view.course.id} />
      <ReportSection submissionId={id} view={view} />
    </>
  );
}
