/**
 * The marking screen's figures, drawn on the server as SVG (PlotFigure) after the rest of the page
 * has been sent (each sits in its own Suspense boundary on the page).
 */
import { setImmediate as yieldToStream } from 'node:timers/promises';
import { fitPlotModel, residualModel } from '@/lib/marking/fit-plot';
import type { FitData } from '@/lib/marking/view';
import { spectrumFigure } from '@/lib/submissions/spectrum-figure';
import { speciesDisplay } from '@/lib/grading';
import { models } from '@/models';
import { PlotFigure } from '@/components/plots/plot-figure';

export async function SpectrumSection({ submissionId }: { submissionId: number }) {
  await yieldToStream(); // let the page above go out first
  const { Submission, Practical } = models();
  const submission = await Submission.findByPk(submissionId);
  const practical = submission ? await Practical.findByPk(submission.practicalId) : null;
  const spectrum =
    submission && practical ? await spectrumFigure(submission, practical, 'staff') : ({ ok: false, message: 'Not found.' } as const);
  return (
    <section aria-labelledby="spectrum-heading" className="card mb-6">
      <h2 id="spectrum-heading" className="mb-2">
        Spectrum with the student’s lines
      </h2>
      {spectrum.ok ? (
        <>
          <div
            className="table-scroll text-ink"
            role="region"
            aria-label="Spectrum plot (scrolls sideways on a narrow screen)"
            tabIndex={0}
            data-testid="marking-spectrum"
          >
            <PlotFigure {...spectrum.plot} />
          </div>
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
  );
}

export async function FitPlots({ fits }: { fits: FitData[] }) {
  await yieldToStream();
  // Each plot twice: 720 px wide for a laptop, 360 px for a phone (drawn for that width, so its
  // text stays legible instead of being shrunk); CSS shows the one that fits.
  const plots = fits
    .filter((f) => f.residuals.length)
    .map((f, i) => {
      const fitTitle = `Line positions against m with the fit${f.species ? `, ${f.species}` : ''}`;
      const resTitle = `Residuals of the fit${f.species ? `, ${f.species}` : ''}`;
      return {
        species: f.species,
        description: f.description,
        notices: f.notices,
        fit: { model: fitPlotModel(f), title: fitTitle, idPrefix: `fit-${i}` },
        residuals: { model: residualModel(f), title: resTitle, idPrefix: `res-${i}` },
        fitNarrow: { model: fitPlotModel(f, { width: 350, height: 260 }), title: fitTitle, idPrefix: `fitn-${i}` },
        residualsNarrow: { model: residualModel(f, { width: 350, height: 220 }), title: resTitle, idPrefix: `resn-${i}` },
      };
    });
  if (plots.length === 0) return <p className="card mb-6 text-ink-soft">No line fit is available for this submission.</p>;
  return (
    <>
      {plots.map((p, i) => (
        <section key={i} aria-labelledby={`fit-heading-${i}`} className="card mb-6" data-testid="fit-plot">
          <h2 id={`fit-heading-${i}`} className="mb-2">
            Line fit and residuals{p.species ? ` (${speciesDisplay(p.species)})` : ''}
          </h2>
          <p className="mb-2 text-sm" data-testid="fit-description">
            {p.description}
          </p>
          {p.notices.length > 0 && (
            <ul className="mb-2 list-disc pl-5 text-sm" data-testid="fit-notices">
              {p.notices.map((n) => (
                <li key={n.code} data-notice={n.code}>
                  {n.message}
                </li>
              ))}
            </ul>
          )}
          <div className="hidden overflow-x-auto text-ink sm:block">
            <PlotFigure {...p.fit} />
          </div>
          <div className="hidden overflow-x-auto text-ink sm:block">
            <PlotFigure {...p.residuals} />
          </div>
          <div className="text-ink sm:hidden">
            <PlotFigure {...p.fitNarrow} />
          </div>
          <div className="text-ink sm:hidden">
            <PlotFigure {...p.residualsNarrow} />
          </div>
        </section>
      ))}
    </>
  );
}
