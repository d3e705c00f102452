/**
 * The uploaded spectrum with the student's lines drawn over it, and the line-by-peak comparison:
 * the same picture for the student's form (through the spectrum route) and the marking screen.
 */
import { models } from '@/models';
import type { Practical } from '@/models/practical';
import type { Submission } from '@/models/submission';
import { bandPlotModel, compareLinesToPeaks, pickPeaks, renderSvg } from '@/lib/spectrum';
import { compareWithSpectrum, loadSpectrum } from './check';
import { readDraft } from './service';

type FigureLine = { species: string; branch: 'P' | 'R' | null; J: number | null; wavenumber: number };

export type SpectrumFigure =
  | { ok: true; svg: string; description: string; summary: ReturnType<typeof compareWithSpectrum> }
  | { ok: false; status: 404 | 422; message: string };

export async function spectrumFigure(submission: Submission, practical: Practical, audience: 'student' | 'staff' = 'student'): Promise<SpectrumFigure> {
  const { Upload, LineAssignment } = models();
  let lines: FigureLine[];
  let upload;
  if (submission.attempt === 0) {
    const draft = readDraft(submission.draft, practical.species);
    upload = draft.spectrumUploadId ? await Upload.findByPk(draft.spectrumUploadId) : null;
    if (upload && upload.ownerId !== submission.studentId) upload = null;
    lines = Object.entries(draft.species).flatMap(([species, d]) => d.lines.map((l) => ({ species, ...l })));
  } else {
    upload = await Upload.findOne({ where: { submissionId: submission.id, kind: 'spectrum' }, order: [['id', 'DESC']] });
    lines = (await LineAssignment.findAll({ where: { submissionId: submission.id }, order: [['id', 'ASC']] })).map((l) => ({ species: l.species, branch: l.branch, J: l.J, wavenumber: l.wavenumber }));
  }
  if (!upload) return { ok: false, status: 404, message: 'No spectrum has been uploaded for this submission.' };
  const loaded = loadSpectrum(upload);
  if (!loaded.ok) return { ok: false, status: 422, message: loaded.message };
  const peaks = pickPeaks(loaded.spectrum);
  const reported = lines.map((l) => ({ wavenumber: l.wavenumber, branch: l.branch ?? undefined, J: l.J ?? undefined }));
  const comparison = compareLinesToPeaks(reported, peaks);
  const model = bandPlotModel({ spectrum: loaded.spectrum, lines: reported, peaks, comparison });
  const whose = audience === 'student' ? 'your' : "the student's";
  const svg = renderSvg(model, { title: `Spectrum ${upload.originalName} with ${whose} ${lines.length} lines`, idPrefix: `spec-${submission.id}` });
  return { ok: true, svg, description: model.description, summary: compareWithSpectrum(upload, lines) };
}
