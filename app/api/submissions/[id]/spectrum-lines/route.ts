import { HttpError, idParam, json, route } from '@/lib/http';
import { speciesDisplay } from '@/lib/grading';
import { formatLineListCsv } from '@/lib/linelist';
import { authorizeSubmission } from '@/lib/authz/submission';
import { spectraOfSubmission } from '@/lib/submissions/spectra';
import { bandsFound, linesForSpecies, type StoredAnalysis } from '@/lib/submissions/spectrum-analysis';

type Ctx = { params: Promise<{ id: string }> };

/**
 * "Take the lines from my spectrum": the lines Oscillab found and assigned in the student's own
 * uploaded spectra, per isotopologue of the practical (the fundamental's, which is what the line
 * list holds), as line-list text the student can confirm or edit. Only for the student's draft.
 */
export const GET = route<Ctx>(async (request, { params }) => {
  const id = idParam((await params).id);
  const { submission, practical } = await authorizeSubmission(request, id, 'submission-write');
  if (submission.attempt !== 0) throw new HttpError(409, 'Lines can only be taken into your draft, not into a submitted attempt.');
  const spectra = await spectraOfSubmission(submission, practical);
  const analyses = spectra.map((s) => s.analysis).filter((a): a is StoredAnalysis => a !== null);
  if (analyses.length === 0) throw new HttpError(404, 'Upload your spectrum first; the lines are taken from it.');
  const bySpecies = linesForSpecies(analyses, practical.species);
  const species = Object.fromEntries(
    practical.species.map((sp) => {
      const lines = bySpecies[sp] ?? [];
      return [sp, { display: speciesDisplay(sp), count: lines.length, lines, text: lines.length ? formatLineListCsv(lines) : '' }];
    }),
  );
  return json({ species, bands: bandsFound(analyses), problems: analyses.flatMap((a) => (a.ok ? a.problems : [a.message])) });
});
