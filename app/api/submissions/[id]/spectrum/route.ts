import { HttpError, idParam, json, route } from '@/lib/http';
import { sampleKeySchema } from '@/lib/schemas/submission';
import { authorizeSubmission } from '@/lib/authz/submission';
import { spectrumFigure } from '@/lib/submissions/spectrum-figure';

type Ctx = { params: Promise<{ id: string }> };

/** The uploaded spectrum with the student's lines drawn over it, and the line-by-peak comparison. */
export const GET = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).id);
  const { submission, practical } = await authorizeSubmission(request, id, 'submission-read');
  const raw = new URL(request.url).searchParams.get('sample');
  const sample = raw === null ? undefined : sampleKeySchema.safeParse(raw);
  if (sample && !sample.success) throw new HttpError(400, 'The sample is named by lower-case letters, digits and dashes.');
  const figure = await spectrumFigure(submission, practical, 'student', sample?.data);
  if (!figure.ok) throw new HttpError(figure.status, figure.message);
  return json({
    plot: figure.plot,
    description: figure.description,
    summary: figure.summary,
    samples: figure.samples,
    sample: figure.sample,
    bands: figure.bands,
    perBand: figure.perBand,
  });
});
