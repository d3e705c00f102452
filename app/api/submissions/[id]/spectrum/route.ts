import { HttpError, idParam, json, route } from '@/lib/http';
import { loadSubmissionFor } from '@/lib/submissions/access';
import { spectrumFigure } from '@/lib/submissions/spectrum-figure';

type Ctx = { params: Promise<{ id: string }> };

/** The uploaded spectrum with the student's lines drawn over it, and the line-by-peak comparison. */
export const GET = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).id);
  const { submission, practical } = await loadSubmissionFor(request, id, 'submission-read');
  const figure = await spectrumFigure(submission, practical);
  if (!figure.ok) throw new HttpError(figure.status, figure.message);
  return json({ svg: figure.svg, description: figure.description, summary: figure.summary });
});
