import { HttpError, idParam, json, route } from '@/lib/http';
import { loadSubmissionFor } from '@/lib/submissions/access';
import { compareWithSpectrum, loadSpectrum } from '@/lib/submissions/check';
import { readDraft } from '@/lib/submissions/service';
import { bandPlotModel, compareLinesToPeaks, pickPeaks, renderSvg } from '@/lib/spectrum';
import { models } from '@/models';

type Ctx = { params: Promise<{ id: string }> };

/** The uploaded spectrum with the student's lines drawn over it, and the line-by-peak comparison. */
export const GET = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).id);
  const { submission, practical } = await loadSubmissionFor(request, id, 'submission-read');
  const { Upload, LineAssignment } = models();
  let lines: { species: string; branch: 'P' | 'R' | null; J: number | null; wavenumber: number }[];
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
  if (!upload) throw new HttpError(404, 'No spectrum has been uploaded for this submission.');
  const loaded = loadSpectrum(upload);
  if (!loaded.ok) throw new HttpError(422, loaded.message);
  const peaks = pickPeaks(loaded.spectrum);
  const reported = lines.map((l) => ({ wavenumber: l.wavenumber, branch: l.branch ?? undefined, J: l.J ?? undefined }));
  const comparison = compareLinesToPeaks(reported, peaks);
  const model = bandPlotModel({ spectrum: loaded.spectrum, lines: reported, peaks, comparison });
  const svg = renderSvg(model, { title: `Spectrum ${upload.originalName} with your ${lines.length} lines`, idPrefix: `spec-${submission.id}` });
  return json({ svg, description: model.description, summary: compareWithSpectrum(upload, lines) });
});
