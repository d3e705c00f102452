/**
 * The uploaded spectrum with the student's lines drawn over it, and the line-by-peak comparison:
 * the same picture for the student's form (through the spectrum route) and the marking screen.
 */
import { models } from '@/models';
import type { Practical } from '@/models/practical';
import type { Submission } from '@/models/submission';
import { bandPlotModel, compareLinesToPeaks, pickPeaks, toAbsorbance, type Peak, type PlotModel, type Spectrum } from '@/lib/spectrum';
import { compareWithSpectrum, loadSpectrum } from './check';
import { readDraft } from './service';
import { spectraOfSubmission } from './spectra';
import { bandsFound, matchByBand, type BandMatch, type StoredAnalysis } from './spectrum-analysis';

type FigureLine = { species: string; branch: 'P' | 'R' | null; J: number | null; wavenumber: number };

export type SpectrumFigure =
  | {
      ok: true;
      /** The plot model (drawn by components/plots/plot-figure.tsx), its title and the prefix of its ids. */
      plot: { model: PlotModel; title: string; idPrefix: string };
      description: string;
      summary: ReturnType<typeof compareWithSpectrum>;
      /** The spectra the practical takes, and which have been uploaded. */
      samples: { key: string; label: string; uploaded: string | null }[];
      sample: string;
      /** What Oscillab found in this spectrum, band by band, in words. */
      bands: string[];
      /** The student's lines counted per isotopologue and band against every uploaded spectrum. */
      perBand: BandMatch[];
    }
  | { ok: false; status: 404 | 422; message: string };

/** GET /api/submissions/[id]/spectrum's answer. */
export type SpectrumFigureAnswer = Pick<
  Extract<SpectrumFigure, { ok: true }>,
  'plot' | 'description' | 'summary' | 'samples' | 'sample' | 'bands' | 'perBand'
>;

export async function spectrumFigure(
  submission: Submission,
  practical: Practical,
  audience: 'student' | 'staff' = 'student',
  sampleKey?: string,
): Promise<SpectrumFigure> {
  const { LineAssignment } = models();
  let lines: FigureLine[];
  if (submission.attempt === 0) {
    const draft = readDraft(submission.draft, practical.species);
    lines = Object.entries(draft.species).flatMap(([species, d]) => d.lines.map((l) => ({ species, ...l })));
  } else {
    lines = (await LineAssignment.findAll({ where: { submissionId: submission.id }, order: [['id', 'ASC']] })).map((l) => ({
      species: l.species,
      branch: l.branch,
      J: l.J,
      wavenumber: l.wavenumber,
    }));
  }
  const spectra = await spectraOfSubmission(submission, practical);
  const chosen = (sampleKey ? spectra.find((x) => x.sample.key === sampleKey) : spectra.find((x) => x.upload)) ?? spectra[0];
  const upload = chosen?.upload ?? null;
  if (!upload)
    return {
      ok: false,
      status: 404,
      message:
        sampleKey && spectra.length > 1
          ? `No spectrum has been uploaded for “${chosen?.sample.label ?? sampleKey}”.`
          : 'No spectrum has been uploaded for this submission.',
    };
  const analyses = spectra.map((x) => x.analysis).filter((a): a is StoredAnalysis => a !== null);
  const loaded = loadSpectrum(upload);
  if (!loaded.ok) return { ok: false, status: 422, message: loaded.message };
  const peaks = withAnalysedLines(pickPeaks(loaded.spectrum), loaded.spectrum, chosen.analysis);
  const reported = lines.map((l) => ({ wavenumber: l.wavenumber, branch: l.branch ?? undefined, J: l.J ?? undefined }));
  const comparison = compareLinesToPeaks(reported, peaks);
  const model = bandPlotModel({ spectrum: loaded.spectrum, lines: reported, peaks, comparison });
  const whose = audience === 'student' ? 'your' : "the student's";
  return {
    ok: true,
    plot: { model, title: `Spectrum ${upload.originalName} with ${whose} ${lines.length} lines`, idPrefix: `spec-${submission.id}` },
    description: model.description,
    summary: compareWithSpectrum(upload, lines),
    samples: spectra.map((x) => ({ key: x.sample.key, label: x.sample.label, uploaded: x.upload?.originalName ?? null })),
    sample: chosen.sample.key,
    bands: chosen.analysis ? bandsFound([chosen.analysis]) : [],
    perBand: analyses.length ? matchByBand(lines, analyses) : [],
  };
}

/**
 * The picked peaks plus the lines the analysis found that peak picking missed (weak edge lines,
 * shoulders), so the plot's markers agree with the band-by-band counts beside it.
 */
function withAnalysedLines(peaks: Peak[], spectrum: Spectrum, analysis: StoredAnalysis | null): Peak[] {
  if (!analysis?.ok || spectrum.x.length < 3) return peaks;
  const a = toAbsorbance(spectrum);
  const x = spectrum.x;
  const step = (x[x.length - 1] - x[0]) / (x.length - 1);
  const tol = Math.max(0.3, 0.6 * analysis.lineShape.fwhm);
  const out = peaks.slice();
  for (const w of analysis.found) {
    if (out.some((p) => Math.abs(p.wavenumber - w) <= tol)) continue;
    const i = Math.min(x.length - 1, Math.max(0, Math.round((w - x[0]) / step)));
    out.push({ wavenumber: w, height: a[i], prominence: 0, index: i, spacing: Math.abs(step) });
  }
  return out.sort((p, q) => p.wavenumber - q.wavenumber);
}
